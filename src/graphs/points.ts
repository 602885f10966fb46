/**
 * `points`: complete graph over n points uniform in the unit square, for
 * pairwise physics. Undirected, positions as `x`, `y`; the weight of edge u-v
 * is the Euclidean distance |p_u - p_v| (`weightRange` is ignored, apart from
 * being recorded). `weightIsDistance` is set, so `scaleWeights` scales the
 * positions together with the weights and they stay consistent.
 */
import type Graph from 'graphology';
import type { FamilyOptions, GraphFamily } from './types.ts';
import { addWeightedEdge, checkFamilyOptions, emptyGraph, placeUniformPoints } from './common.ts';

function generate(options: FamilyOptions): Graph {
  checkFamilyOptions('points', options, points.minNodes);
  const { nodes: n, weightRange, rng } = options;
  const graph = emptyGraph('points', n, false, weightRange);
  graph.setAttribute('weightIsDistance', true);
  const xy = placeUniformPoints(graph, rng);
  for (let u = 0; u < n; u++) {
    for (let v = u + 1; v < n; v++) {
      addWeightedEdge(graph, u, v, Math.hypot(xy[u]![0] - xy[v]![0], xy[u]![1] - xy[v]![1]));
    }
  }
  return graph;
}

export const points: GraphFamily = {
  id: 'points',
  title: 'Complete graph over random points (weight = distance)',
  directed: false,
  connected: true,
  hasPositions: true,
  minNodes: 2,
  generate,
};
