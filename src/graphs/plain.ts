/**
 * Conversions between graphology graphs and plain numbers, and the scale shift.
 * Node keys must be "0".."n-1" (as every family builds them).
 */
import Graph from 'graphology';
import type { PlainGraph } from './types.ts';

function nodeNumber(key: string, n: number, where: string): number {
  const i = Number(key);
  if (!Number.isInteger(i) || i < 0 || i >= n || String(i) !== key) {
    throw new Error(`${where}: node key '${key}' is not one of "0".."${n - 1}"`);
  }
  return i;
}

/** Plain form: node ids 0..n-1, edges [u, v, weight] in insertion order (undirected edges once). */
export function toPlainGraph(graph: Graph): PlainGraph {
  const n = graph.order;
  const edges: Array<[number, number, number]> = [];
  graph.forEachEdge((_edge, attr, source, target) => {
    const w = attr['weight'];
    if (typeof w !== 'number') throw new Error(`graphs/plain: edge ${source}-${target} has no numeric weight`);
    edges.push([nodeNumber(source, n, 'graphs/plain'), nodeNumber(target, n, 'graphs/plain'), w]);
  });
  const plain: PlainGraph = { nodes: n, directed: graph.type === 'directed', edges };
  const positions: Array<[number, number]> = [];
  let hasAll = n > 0;
  for (let i = 0; i < n && hasAll; i++) {
    const key = String(i);
    if (!graph.hasNode(key)) throw new Error(`graphs/plain: node key '${key}' is missing (keys must be "0".."${n - 1}")`);
    const { x, y } = graph.getNodeAttributes(key);
    if (typeof x === 'number' && typeof y === 'number') positions.push([x, y]);
    else hasAll = false;
  }
  if (hasAll) plain.positions = positions;
  return plain;
}

/** Rebuilds a simple graphology graph from the plain form (nodes "0".."n-1", `weight`, `x`/`y`). */
export function fromPlainGraph(plain: PlainGraph): Graph {
  const graph = new Graph({ type: plain.directed ? 'directed' : 'undirected', multi: false, allowSelfLoops: false });
  for (let i = 0; i < plain.nodes; i++) {
    const p = plain.positions?.[i];
    graph.addNode(String(i), p ? { x: p[0], y: p[1] } : {});
  }
  for (const [u, v, w] of plain.edges) {
    if (u < 0 || u >= plain.nodes || v < 0 || v >= plain.nodes) {
      throw new Error(`graphs/plain: edge ${u}-${v} is out of range 0..${plain.nodes - 1}`);
    }
    graph.addEdge(String(u), String(v), { weight: w });
  }
  return graph;
}

/**
 * The scale shift: a copy of `graph` with every edge weight multiplied by
 * `factor`. When the weights are Euclidean distances (graph attribute
 * `weightIsDistance`, set by the `points` family) the x/y positions are scaled
 * too, so weights stay equal to distances; otherwise positions are untouched
 * (e.g. `geometric`, whose weights are drawn independently of positions).
 * The graph attribute `weightScale` accumulates the factors applied.
 */
export function scaleWeights(graph: Graph, factor: number): Graph {
  if (!Number.isFinite(factor) || factor <= 0) {
    throw new Error(`graphs/scaleWeights: factor must be a finite number > 0, got ${String(factor)}`);
  }
  const copy = graph.copy();
  copy.updateEachEdgeAttributes((_edge, attr) => {
    const w = attr['weight'];
    return typeof w === 'number' ? { ...attr, weight: w * factor } : attr;
  });
  if (copy.getAttribute('weightIsDistance') === true) {
    copy.updateEachNodeAttributes((_node, attr) => {
      const { x, y } = attr;
      return typeof x === 'number' && typeof y === 'number' ? { ...attr, x: x * factor, y: y * factor } : attr;
    });
  }
  const previous = copy.getAttribute('weightScale');
  copy.setAttribute('weightScale', (typeof previous === 'number' ? previous : 1) * factor);
  return copy;
}
