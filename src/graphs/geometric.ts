/**
 * `geometric`: random geometric graph, undirected, with positions.
 *
 * Points are uniform in the unit square (node attributes `x`, `y`); every pair
 * closer than `params.radius` is joined. The default radius sqrt(4 / (pi n))
 * gives a mean degree of about 4 away from the border (n pi r^2 = 4; nodes
 * near the border see fewer neighbours, so the measured mean is a bit lower).
 * The graph is then made connected Kruskal-style: all pairs are scanned in
 * order of distance and a pair is joined whenever it links two different
 * components, i.e. each added edge is the nearest pair between two components
 * at the time it is added.
 *
 * Weights: uniform in `weightRange`, drawn in edge-creation order; they are NOT
 * the Euclidean lengths (positions only decide which edges exist). Because the
 * weights are not distances, `scaleWeights` leaves positions alone here.
 */
import type Graph from 'graphology';
import type { FamilyOptions, GraphFamily } from './types.ts';
import {
  UnionFind,
  addWeightedEdge,
  checkFamilyOptions,
  drawWeight,
  emptyGraph,
  numberParam,
  placeUniformPoints,
} from './common.ts';

/** Radius that gives a mean degree of about 4 (ignoring border effects). */
export function defaultGeometricRadius(n: number): number {
  return Math.sqrt(4 / (Math.PI * n));
}

function generate(options: FamilyOptions): Graph {
  checkFamilyOptions('geometric', options, geometric.minNodes);
  const { nodes: n, weightRange, rng, params } = options;
  const radius = numberParam('geometric', params, 'radius', defaultGeometricRadius(n));
  if (radius < 0) throw new Error(`graphs/geometric: params.radius must be >= 0, got ${radius}`);
  const graph = emptyGraph('geometric', n, false, weightRange);
  const points = placeUniformPoints(graph, rng);
  const uf = new UnionFind(n);

  const pairs: Array<[number, number, number]> = [];
  for (let u = 0; u < n; u++) {
    for (let v = u + 1; v < n; v++) {
      const d = Math.hypot(points[u]![0] - points[v]![0], points[u]![1] - points[v]![1]);
      pairs.push([d, u, v]);
      if (d <= radius) {
        addWeightedEdge(graph, u, v, drawWeight(rng, weightRange));
        uf.union(u, v);
      }
    }
  }
  if (uf.components > 1) {
    pairs.sort((a, b) => a[0] - b[0] || a[1] - b[1] || a[2] - b[2]);
    for (const [, u, v] of pairs) {
      if (uf.components === 1) break;
      if (uf.union(u, v)) addWeightedEdge(graph, u, v, drawWeight(rng, weightRange));
    }
  }
  return graph;
}

export const geometric: GraphFamily = {
  id: 'geometric',
  title: 'Random geometric graph in the unit square (joined into one component)',
  directed: false,
  connected: true,
  hasPositions: true,
  minNodes: 2,
  generate,
};
