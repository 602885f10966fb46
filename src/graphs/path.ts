/**
 * `path`: the chain 0-1-2-...-(n-1), undirected. The deepest family per node:
 * hop depth from an end is n - 1. Weights: uniform in `weightRange`, edge i-(i+1)
 * drawn in order of i.
 */
import type Graph from 'graphology';
import type { FamilyOptions, GraphFamily } from './types.ts';
import { addWeightedEdge, checkFamilyOptions, drawWeight, emptyGraph } from './common.ts';

function generate(options: FamilyOptions): Graph {
  checkFamilyOptions('path', options, path.minNodes);
  const { nodes: n, weightRange, rng } = options;
  const graph = emptyGraph('path', n, false, weightRange);
  for (let i = 0; i + 1 < n; i++) addWeightedEdge(graph, i, i + 1, drawWeight(rng, weightRange));
  return graph;
}

export const path: GraphFamily = {
  id: 'path',
  title: 'Path (chain 0-1-...-(n-1))',
  directed: false,
  connected: true,
  hasPositions: false,
  minNodes: 2,
  generate,
};
