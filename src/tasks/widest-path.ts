/**
 * `widest-path`: bottleneck capacity of the best path from the source
 * (the max-min semiring): b(v) = max over paths source -> v of the smallest
 * edge weight on the path.
 *
 * - Source value: the bottleneck of the empty path is +Infinity, which no
 *   network can output. We define the source's target as the largest weight
 *   among its outgoing edges (incident edges on an undirected graph). On an
 *   undirected graph that is exactly the widest closed walk from the source
 *   back to itself (go out on the widest edge and return on it), and since it
 *   is >= every first edge of every path it plays the role of +Infinity in the
 *   recursion: the same rule b(v) = max over u->v of min(b(u), w) holds at
 *   every node, the source included, and the other targets are unchanged.
 *   A source with no outgoing edge would get mask 0.
 * - Inputs: node [sourceWidestEdge]; edge [weight].
 * - Node input, in weight units: at the source, the weight of its widest
 *   outgoing (incident) edge, i.e. the value the max-min recursion starts from
 *   there (round 0 of `iterate`, and the source's target); 0 at every other
 *   node, standing in for the recursion's -Infinity (with positive weights, 0
 *   is below every path width, so max(0, width) = width). Why this value: it is
 *   the algorithm's own initial state in the weights' units, and being one of
 *   the weights it scales exactly: at weight scale c the input is exactly c ×
 *   the input at scale 1. A constant marker (1 at the source) would not scale,
 *   so a bias-free network, positively homogeneous only when every input
 *   scales, would not be homogeneous under the scale shift. A source without
 *   outgoing edges gets 0 (and mask 0, see below).
 * - Source: `options.source`, else uniform from `options.rng`.
 * - Scale shift: weight-carrying (`scaleShift: 'graph'`): the caller scales the
 *   weights. At scale c every input (edge weights and the node input) and every
 *   target is exactly c × its value at scale 1 (bottlenecks are weights, no
 *   sums): the shift scales all inputs and the target together.
 * - Unreachable nodes: target 0, mask 0 (cannot happen on the connected
 *   undirected families this task accepts).
 * - depth: synchronous max-min rounds until nothing changes.
 * Exact solver: `widestPath` (Dijkstra with a max-heap on the bottleneck).
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
  messageEdges,
  roundsToFixedPoint,
  runRounds,
} from './common.ts';

const WHERE = 'tasks/widest-path';

/**
 * Widest (maximum-bottleneck) path values from `source`, as the algorithm
 * holds them: +Infinity at the source, -Infinity where unreachable.
 */
export function widestPath(graph: Graph, source: number): number[] {
  const edges = messageEdges(graph, WHERE);
  const n = graph.order;
  checkSource(source, n, WHERE);
  const adj = adjacency(n, edges);
  const width = new Array<number>(n).fill(-Infinity);
  width[source] = Infinity;
  const done = new Array<boolean>(n).fill(false);
  const heap = new MinHeap(); // priorities negated: pops the widest first
  heap.push(-Infinity, source);
  while (heap.size > 0) {
    const [negW, u] = heap.pop()!;
    if (done[u]) continue;
    done[u] = true;
    for (const [v, w] of adj[u]!) {
      const cand = Math.min(-negW, w);
      if (!done[v] && cand > width[v]!) {
        width[v] = cand;
        heap.push(-cand, v);
      }
    }
  }
  return width;
}

/** One synchronous round: b'(v) = max(b(v), max over u->v of min(b(u), w)). */
export function widestRound(n: number, edges: MessageEdges, state: number[]): number[] {
  const next = state.slice(0, n);
  for (let e = 0; e < edges.src.length; e++) {
    const cand = Math.min(state[edges.src[e]!]!, edges.weight[e]!);
    if (cand > next[edges.dst[e]!]!) next[edges.dst[e]!] = cand;
  }
  return next;
}

/** The source's target: the largest weight among its outgoing message edges (-Infinity if none). */
function sourceValue(edges: MessageEdges, source: number): number {
  let best = -Infinity;
  for (let e = 0; e < edges.src.length; e++) if (edges.src[e] === source) best = Math.max(best, edges.weight[e]!);
  return best;
}

function initial(n: number, edges: MessageEdges, source: number): number[] {
  const b = new Array<number>(n).fill(-Infinity);
  b[source] = sourceValue(edges, source);
  return b;
}

function instance(graph: Graph, options: TaskOptions): TaskInstance {
  const edges = messageEdges(graph, WHERE);
  const n = graph.order;
  const source = chooseSource(graph, options.rng, WHERE, options.source);
  const values = widestPath(graph, source);
  const widest = sourceValue(edges, source);
  values[source] = widest;
  const marker = Number.isFinite(widest) ? widest : 0;
  const { target, mask } = maskNonFinite(values);
  const { rounds } = roundsToFixedPoint(initial(n, edges, source), (s) => widestRound(n, edges, s), n, WHERE);
  return {
    nodes: n,
    nodeInputs: Array.from({ length: n }, (_, i) => [i === source ? marker : 0]),
    messageSrc: edges.src,
    messageDst: edges.dst,
    edgeInputs: edges.weight.map((w) => [w]),
    target,
    mask,
    source,
    depth: rounds,
  };
}

/** Max-min rounds from the source (holding its target value); unreached nodes hold -Infinity. */
function iterate(_graph: Graph, inst: TaskInstance, rounds: number): number[] {
  if (inst.source === undefined) throw new Error(`${WHERE}: iterate needs instance.source`);
  checkSource(inst.source, inst.nodes, WHERE);
  const edges = instanceEdges(inst);
  return runRounds(initial(inst.nodes, edges, inst.source), (s) => widestRound(inst.nodes, edges, s), rounds, WHERE);
}

export const widestPathTask: Task = {
  id: 'widest-path',
  title: 'Widest (bottleneck) path from a source',
  describe:
    'Largest achievable minimum edge weight over paths from the source; at the source, its widest incident edge.',
  alignedAggregator: 'max',
  alignedStructure: 'b(v) = max over incoming edges u->v of min(b(u), weight) (max-min), at every node',
  nodeFeatureNames: ['sourceWidestEdge'],
  edgeFeatureNames: ['weight'],
  families: ['er', 'geometric', 'grid', 'path', 'tree'],
  maskPolicy:
    'Unreachable nodes have mask 0 and target 0. The source counts, with target = its widest incident edge weight (standing in for the +Infinity of the empty path).',
  scaleShift: 'graph',
  instance,
  iterate,
};
