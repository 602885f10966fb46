/**
 * Helpers shared by the tasks: node-key checks, message edges, source choice,
 * the weight unit of an instance (`medianMagnitude`), and the synchronous-round
 * loop used both for `iterate` and for `depth`.
 */
import type Graph from 'graphology';
import type { Rng } from '../util/rng.ts';
import type { TaskInstance } from './types.ts';

/** Edge list in message form: undirected edges appear twice (u->v and v->u). */
export interface MessageEdges {
  src: number[];
  dst: number[];
  weight: number[];
}

/** Checks that node keys are "0".."n-1" and returns n. */
export function checkNodeKeys(graph: Graph, where: string): number {
  const n = graph.order;
  for (let i = 0; i < n; i++) {
    if (!graph.hasNode(String(i))) {
      throw new Error(`${where}: node keys must be "0".."${n - 1}"; "${i}" is missing`);
    }
  }
  return n;
}

/** The numeric weight of an edge, or a clear error. */
export function edgeWeightOf(attr: Record<string, unknown>, u: string, v: string, where: string): number {
  const w = attr['weight'];
  if (typeof w !== 'number' || Number.isNaN(w)) {
    throw new Error(`${where}: edge ${u}-${v} has no numeric 'weight' attribute`);
  }
  return w;
}

/**
 * Directed message edges of a graph, in edge insertion order. Directed edges
 * give one message edge source->target; undirected edges give two, u->v then
 * v->u.
 */
export function messageEdges(graph: Graph, where: string): MessageEdges {
  checkNodeKeys(graph, where);
  const src: number[] = [];
  const dst: number[] = [];
  const weight: number[] = [];
  graph.forEachEdge((_edge, attr, s, t, _sa, _ta, undirected) => {
    const w = edgeWeightOf(attr, s, t, where);
    const a = Number(s);
    const b = Number(t);
    if (undirected) {
      src.push(a, b);
      dst.push(b, a);
      weight.push(w, w);
    } else {
      src.push(a);
      dst.push(b);
      weight.push(w);
    }
  });
  return { src, dst, weight };
}

/** Outgoing adjacency lists (to, weight) built from message edges. */
export function adjacency(n: number, edges: MessageEdges): Array<Array<[number, number]>> {
  const adj: Array<Array<[number, number]>> = Array.from({ length: n }, () => []);
  for (let e = 0; e < edges.src.length; e++) adj[edges.src[e]!]!.push([edges.dst[e]!, edges.weight[e]!]);
  return adj;
}

/** Checks a source node index. */
export function checkSource(source: number, n: number, where: string): void {
  if (!Number.isInteger(source) || source < 0 || source >= n) {
    throw new Error(`${where}: source node ${String(source)} is out of range 0..${n - 1}`);
  }
}

/**
 * The source a task uses: `fixed` when given; otherwise, on graphs with
 * undirected edges, a uniform node; on directed graphs, a uniform node among
 * those with no incoming edge (for the `dag` family that is always node 0,
 * which reaches every node).
 */
export function chooseSource(graph: Graph, rng: Rng, where: string, fixed?: number, reversed = false): number {
  const n = graph.order;
  if (n === 0) throw new Error(`${where}: the graph has no nodes`);
  if (fixed !== undefined) {
    checkSource(fixed, n, where);
    return fixed;
  }
  if (graph.type === 'directed') {
    // `reversed`: paths run against the edges, so the candidates are the nodes with no outgoing edge.
    const roots: number[] = [];
    for (let i = 0; i < n; i++) if ((reversed ? graph.outDegree(String(i)) : graph.inDegree(String(i))) === 0) roots.push(i);
    if (roots.length > 0) return rng.pick(roots);
  }
  return rng.int(0, n - 1);
}

/** Edges of an instance in message form, reading the first edge feature as the weight. */
export function instanceEdges(instance: TaskInstance): MessageEdges {
  return {
    src: instance.messageSrc,
    dst: instance.messageDst,
    weight: instance.edgeInputs.map((f) => f[0] ?? 1),
  };
}

/**
 * Runs `step` synchronously until the state stops changing (or `maxRounds`),
 * returning the final state and the number of rounds that changed something.
 */
export function roundsToFixedPoint(
  initial: number[],
  step: (state: number[]) => number[],
  maxRounds: number,
  where: string,
): { state: number[]; rounds: number } {
  let state = initial;
  for (let round = 1; round <= maxRounds + 1; round++) {
    const next = step(state);
    let changed = false;
    for (let i = 0; i < next.length; i++) {
      if (!Object.is(next[i], state[i])) {
        changed = true;
        break;
      }
    }
    if (!changed) return { state, rounds: round - 1 };
    state = next;
  }
  throw new Error(`${where}: no fixed point after ${maxRounds} rounds (negative cycle?)`);
}

/** Refuses a round count that is not an integer >= 0. */
export function checkRounds(rounds: number, where: string): void {
  if (!Number.isInteger(rounds) || rounds < 0) {
    throw new Error(`${where}: rounds must be an integer >= 0, got ${String(rounds)}`);
  }
}

/** Same for a fixed number of rounds (the alignment trace). */
export function runRounds(initial: number[], step: (state: number[]) => number[], rounds: number, where: string): number[] {
  checkRounds(rounds, where);
  let state = initial;
  for (let r = 0; r < rounds; r++) state = step(state);
  return state;
}

/**
 * The lower median of |values| (the element at index ⌊(m − 1)/2⌋ of the sorted
 * magnitudes); 0 for an empty list. Tasks use it as the weight unit of an
 * instance. Being one of the values themselves (no sum, no division), it
 * commutes exactly with the scale shift: multiplying every value by c > 0 in
 * floating point is monotone, so the selected element of the scaled list is
 * exactly c × the selected element of the original (a mean would not be:
 * Σ c·w and c·Σ w round differently). Listing every value twice (an undirected
 * edge as two message edges) leaves the lower median unchanged.
 */
export function medianMagnitude(values: readonly number[]): number {
  if (values.length === 0) return 0;
  const sorted = values.map((v) => Math.abs(v)).sort((a, b) => a - b);
  return sorted[(sorted.length - 1) >> 1]!;
}

/** Per node, 1 where finite, else 0; and the target with non-finite entries replaced by 0. */
export function maskNonFinite(values: number[]): { target: number[]; mask: number[] } {
  return {
    target: values.map((v) => (Number.isFinite(v) ? v : 0)),
    mask: values.map((v) => (Number.isFinite(v) ? 1 : 0)),
  };
}
