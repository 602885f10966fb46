/**
 * `tree`: random recursive tree, undirected. Node i (i >= 1) attaches to a
 * uniformly chosen earlier node 0..i-1, so node 0 is a natural root and every
 * edge joins a parent (smaller id) to a child (larger id). Expected depth grows
 * like ln n. Weights: uniform in `weightRange`, drawn right after each parent.
 */
import type Graph from 'graphology';
import type { FamilyOptions, GraphFamily } from './types.ts';
import { addWeightedEdge, checkFamilyOptions, drawWeight, emptyGraph } from './common.ts';

function generate(options: FamilyOptions): Graph {
  checkFamilyOptions('tree', options, tree.minNodes);
  const { nodes: n, weightRange, rng } = options;
  const graph = emptyGraph('tree', n, false, weightRange);
  for (let i = 1; i < n; i++) {
    const parent = rng.int(0, i - 1);
    addWeightedEdge(graph, parent, i, drawWeight(rng, weightRange));
  }
  return graph;
}

export const tree: GraphFamily = {
  id: 'tree',
  title: 'Random recursive tree (node i joins a uniform earlier node)',
  directed: false,
  connected: true,
  hasPositions: false,
  minNodes: 2,
  generate,
};
