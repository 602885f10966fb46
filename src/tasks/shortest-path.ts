/**
 * `shortest-path`: single-source shortest-path distance (the min-plus semiring).
 *
 * - Target: d(v) = min over paths source -> v of the summed edge weights;
 *   d(source) = 0. Exact solver: synchronous Bellman-Ford (`bellmanFord`),
 *   cross-checked in tests against our `dijkstra` and graphology's.
 * - Inputs: node [nonSourceMedianWeight]; edge [weight]. Undirected edges give
 *   two message edges; directed edges one (source -> target).
 * - Node input, in weight units: 0 at the source, and at every other node the
 *   instance's median edge weight m (lower median of |weight| over the message
 *   edges; 0 if the graph has no edge). It is Bellman-Ford's initial state,
 *   d(source) = 0 and d(v) = ∞ elsewhere, with ∞ replaced by a finite value in
 *   the weights' units that a network can scale up itself (a bias-free encoder
 *   h = U·x gives 0 at the source and U·m elsewhere, so Bellman-Ford stays
 *   exactly representable without biases). Why the median: it is data-derived,
 *   about the same at every graph size for a given weight range (so it does not
 *   itself shift along the size ladder), and, being one of the weights, it
 *   scales exactly: at weight scale c the input is exactly c × the input at
 *   scale 1 (a mean would differ in the last bits). A constant marker (1 at the
 *   source) would not scale, so a bias-free network, which is positively
 *   homogeneous only when every input scales, would not be homogeneous under
 *   the scale shift.
 * - Source: `options.source` when given, else drawn from `options.rng`
 *   (uniform node; on directed graphs uniform among nodes without incoming
 *   edges, i.e. node 0 for `dag`).
 * - Scale shift: weight-carrying task (`scaleShift: 'graph'`). The caller scales
 *   the graph's weights (`scaleWeights`) before `instance()`; the task never
 *   applies `options.weightScale` itself. At scale c every input (edge weights
 *   and the node input) is exactly c × its value at scale 1, and the distances
 *   are c × (up to float rounding of the sums): the shift scales all inputs and
 *   the target together.
 * - Unreachable nodes: target 0, mask 0.
 * - depth: the number of synchronous Bellman-Ford rounds after which nothing
 *   changes = the largest, over nodes, of the fewest edges on a shortest path.
 */
import type Graph from 'graphology';
import type { Task, TaskInstance, TaskOptions } from './types.ts';
import { MinHeap } from './heap.ts';
import {
  type MessageEdges,
  adjacency,
  checkSource,
  chooseSource,
  instanceEdges,
  maskNonFinite,
  medianMagnitude,
  messageEdges,
  roundsToFixedPoint,
  runRounds,
} from './common.ts';

const WHERE = 'tasks/shortest-path';

/** One synchronous Bellman-Ford round: d'(v) = min(d(v), min over u->v of d(u) + w). */
export function bellmanFordRound(n: number, edges: MessageEdges, state: number[]): number[] {
  const next = state.slice(0, n);
  for (let e = 0; e < edges.src.length; e++) {
    const cand = state[edges.src[e]!]! + edges.weight[e]!;
    if (cand < next[edges.dst[e]!]!) next[edges.dst[e]!] = cand;
  }
  return next;
}

function initialDistances(n: number, source: number): number[] {
  const d = new Array<number>(n).fill(Infinity);
  d[source] = 0;
  return d;
}

/**
 * Synchronous Bellman-Ford from `source` (node keys "0".."n-1"; undirected
 * edges count both ways). Returns distances (Infinity when unreachable) and the
 * number of rounds that changed something. Throws on a negative cycle
 * reachable from the source.
 */
export function bellmanFord(graph: Graph, source: number): { distance: number[]; rounds: number } {
  const edges = messageEdges(graph, WHERE);
  const n = graph.order;
  checkSource(source, n, WHERE);
  const { state, rounds } = roundsToFixedPoint(
    initialDistances(n, source),
    (s) => bellmanFordRound(n, edges, s),
    Math.max(0, n - 1),
    WHERE,
  );
  return { distance: state, rounds };
}

/** Dijkstra with a binary heap (non-negative weights only); Infinity when unreachable. */
export function dijkstra(graph: Graph, source: number): number[] {
  const edges = messageEdges(graph, WHERE);
  const n = graph.order;
  checkSource(source, n, WHERE);
  for (const w of edges.weight) {
    if (!(w >= 0)) throw new Error(`${WHERE}: dijkstra needs non-negative weights, found ${w}`);
  }
  const adj = adjacency(n, edges);
  const dist = initialDistances(n, source);
  const done = new Array<boolean>(n).fill(false);
  const heap = new MinHeap();
  heap.push(0, source);
  while (heap.size > 0) {
    const [d, u] = heap.pop()!;
    if (done[u]) continue;
    done[u] = true;
    for (const [v, w] of adj[u]!) {
      const cand = d + w;
      if (cand < dist[v]!) {
        dist[v] = cand;
        heap.push(cand, v);
      }
    }
  }
  return dist;
}

function instance(graph: Graph, options: TaskOptions): TaskInstance {
  const edges = messageEdges(graph, WHERE);
  const n = graph.order;
  const source = chooseSource(graph, options.rng, WHERE, options.source);
  const { distance, rounds } = bellmanFord(graph, source);
  const { target, mask } = maskNonFinite(distance);
  const unit = medianMagnitude(edges.weight);
  return {
    nodes: n,
    nodeInputs: Array.from({ length: n }, (_, i) => [i === source ? 0 : unit]),
    messageSrc: edges.src,
    messageDst: edges.dst,
    edgeInputs: edges.weight.map((w) => [w]),
    target,
    mask,
    source,
    depth: rounds,
  };
}

function iterate(_graph: Graph, inst: TaskInstance, rounds: number): number[] {
  if (inst.source === undefined) throw new Error(`${WHERE}: iterate needs instance.source`);
  checkSource(inst.source, inst.nodes, WHERE);
  const edges = instanceEdges(inst);
  return runRounds(initialDistances(inst.nodes, inst.source), (s) => bellmanFordRound(inst.nodes, edges, s), rounds, WHERE);
}

export const shortestPath: Task = {
  id: 'shortest-path',
  title: 'Shortest-path distance from a source',
  describe: 'Sum of edge weights along the cheapest path from the source node (0 at the source).',
  alignedAggregator: 'min',
  alignedStructure: 'd(v) = min over incoming edges u->v of (d(u) + weight), d(source) = 0 (Bellman-Ford, min-plus)',
  nodeFeatureNames: ['nonSourceMedianWeight'],
  edgeFeatureNames: ['weight'],
  families: ['er', 'geometric', 'grid', 'path', 'tree', 'dag'],
  maskPolicy: 'Nodes the source cannot reach have mask 0 and target 0; every other node, the source included, counts.',
  scaleShift: 'graph',
  instance,
  iterate,
};
