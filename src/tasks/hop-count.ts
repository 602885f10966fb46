/**
 * `hop-count`: number of edges on a shortest unweighted path from the source
 * (breadth-first search depth).
 *
 * - Inputs: node [isSource]; edge [1] (a constant: weights play no part, and
 *   giving them would only add noise the network must learn to ignore).
 * - Source: as `shortest-path` (`options.source`, else drawn from `options.rng`;
 *   node 0 on `dag`).
 * - Scale shift: weights play no part, so neither the inputs (a 0/1 source
 *   marker and a constant 1 per edge: counts, not weight units) nor the target
 *   change with the weight scale; `scaleShift: 'graph'` for uniformity (the
 *   caller may scale; nothing changes). A weight-scale rung is therefore the
 *   in-distribution rung again, and homogeneity (f(λx) = λ f(x)) is not what
 *   the shift asks of a network here: the target does not scale.
 * - Unreachable nodes: target 0, mask 0.
 * - depth: the largest hop count (the source's eccentricity) = the number of
 *   breadth-first frontier rounds.
 */
import type Graph from 'graphology';
import type { Task, TaskInstance, TaskOptions } from './types.ts';
import { adjacency, checkSource, chooseSource, instanceEdges, maskNonFinite, messageEdges, runRounds } from './common.ts';
import { bellmanFordRound } from './shortest-path.ts';

const WHERE = 'tasks/hop-count';

/** Breadth-first hop counts from `source`; Infinity when unreachable. */
export function bfsHops(graph: Graph, source: number): number[] {
  const edges = messageEdges(graph, WHERE);
  const n = graph.order;
  checkSource(source, n, WHERE);
  const adj = adjacency(n, edges);
  const hops = new Array<number>(n).fill(Infinity);
  hops[source] = 0;
  let frontier = [source];
  for (let depth = 1; frontier.length > 0; depth++) {
    const next: number[] = [];
    for (const u of frontier) {
      for (const [v] of adj[u]!) {
        if (hops[v] === Infinity) {
          hops[v] = depth;
          next.push(v);
        }
      }
    }
    frontier = next;
  }
  return hops;
}

function instance(graph: Graph, options: TaskOptions): TaskInstance {
  const edges = messageEdges(graph, WHERE);
  const n = graph.order;
  const source = chooseSource(graph, options.rng, WHERE, options.source);
  const hops = bfsHops(graph, source);
  const { target, mask } = maskNonFinite(hops);
  return {
    nodes: n,
    nodeInputs: Array.from({ length: n }, (_, i) => [i === source ? 1 : 0]),
    messageSrc: edges.src,
    messageDst: edges.dst,
    edgeInputs: edges.src.map(() => [1]),
    target,
    mask,
    source,
    depth: Math.max(0, ...target),
  };
}

/** Frontier rounds: after k rounds, nodes within k hops hold their count, the rest Infinity. */
function iterate(_graph: Graph, inst: TaskInstance, rounds: number): number[] {
  if (inst.source === undefined) throw new Error(`${WHERE}: iterate needs instance.source`);
  checkSource(inst.source, inst.nodes, WHERE);
  const edges = { ...instanceEdges(inst), weight: inst.messageSrc.map(() => 1) };
  const initial = new Array<number>(inst.nodes).fill(Infinity);
  initial[inst.source] = 0;
  return runRounds(initial, (s) => bellmanFordRound(inst.nodes, edges, s), rounds, WHERE);
}

export const hopCount: Task = {
  id: 'hop-count',
  title: 'Hop count from a source (breadth-first search)',
  describe: 'Number of edges on a shortest unweighted path from the source node (0 at the source).',
  alignedAggregator: 'min',
  alignedStructure: 'h(v) = min over incoming edges u->v of (h(u) + 1), h(source) = 0 (breadth-first search)',
  nodeFeatureNames: ['isSource'],
  edgeFeatureNames: ['one'],
  families: ['er', 'geometric', 'grid', 'path', 'tree', 'dag'],
  maskPolicy: 'Nodes the source cannot reach have mask 0 and target 0; every other node, the source included, counts.',
  scaleShift: 'graph',
  instance,
  iterate,
};
