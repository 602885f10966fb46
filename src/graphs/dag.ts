/**
 * `dag`: random directed acyclic graph whose node ids are a topological order.
 *
 * Node i >= 1 gets k = uniform{1, ..., min(3, i)} distinct predecessors among
 * 0..i-1, each drawn as j = i - 1 - floor(u^2 * i) with u uniform in [0, 1)
 * (biased toward recent nodes, so the longest path grows with n: measured
 * means over 20 seeds were about 6, 10, 14, 19 and 26 edges at n = 8, 16, 32,
 * 64 and 128); edges are pred -> i. Node 0 is the only node without predecessors,
 * so following predecessors from any node ends at 0: every node is reachable
 * from node 0 (the family is "connected" from source 0, and weakly connected).
 * Weights: uniform in `weightRange`, drawn per edge in creation order.
 */
import type Graph from 'graphology';
import type { FamilyOptions, GraphFamily } from './types.ts';
import { addWeightedEdge, checkFamilyOptions, drawWeight, emptyGraph } from './common.ts';

export const DAG_MAX_PREDECESSORS = 3;

function generate(options: FamilyOptions): Graph {
  checkFamilyOptions('dag', options, dag.minNodes);
  const { nodes: n, weightRange, rng } = options;
  const graph = emptyGraph('dag', n, true, weightRange);
  for (let i = 1; i < n; i++) {
    const k = rng.int(1, Math.min(DAG_MAX_PREDECESSORS, i));
    const preds = new Set<number>();
    let tries = 0;
    while (preds.size < k) {
      let j: number;
      if (tries++ < 64) {
        const u = rng.next();
        j = i - 1 - Math.floor(u * u * i);
      } else {
        // Fallback after many repeats: uniform among the remaining earlier nodes.
        const rest = Array.from({ length: i }, (_, x) => x).filter((x) => !preds.has(x));
        j = rng.pick(rest);
      }
      preds.add(j);
    }
    for (const j of [...preds].sort((a, b) => a - b)) addWeightedEdge(graph, j, i, drawWeight(rng, weightRange));
  }
  return graph;
}

export const dag: GraphFamily = {
  id: 'dag',
  title: 'Random DAG (1-3 predecessors per node, biased to recent nodes)',
  directed: true,
  connected: true,
  hasPositions: false,
  minNodes: 2,
  generate,
};
