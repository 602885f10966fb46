/**
 * `er`: connected Erdős–Rényi-style random graph, undirected.
 *
 * Construction (so that connectivity is guaranteed, not hoped for):
 * 1. a random spanning tree: nodes are visited in a random order and each one
 *    attaches to a uniformly chosen node visited before it (a random recursive
 *    tree on a shuffled labelling), n - 1 edges;
 * 2. extra edges between uniformly chosen unlinked pairs until the edge count is
 *    round(meanDegree * n / 2) (capped at n(n-1)/2, the complete graph).
 * So the mean degree is `params.meanDegree` (default 3) whenever that is at
 * least the tree's 2(n-1)/n. With `params.edgeProbability` = p instead, the
 * edge count is round(p · n(n-1)/2), as in G(n, p) on average: the mean degree
 * then grows with n (p · (n-1)), so a size ladder also shifts degree. The law
 * is not exactly G(n, m): the tree part is biased toward a random recursive
 * tree. Weights: uniform in `weightRange`,
 * drawn in edge-creation order.
 */
import type Graph from 'graphology';
import type { FamilyOptions, GraphFamily } from './types.ts';
import { addWeightedEdge, checkFamilyOptions, drawWeight, emptyGraph, numberParam } from './common.ts';

export const DEFAULT_MEAN_DEGREE = 3;

function generate(options: FamilyOptions): Graph {
  checkFamilyOptions('er', options, er.minNodes);
  const { nodes: n, weightRange, rng, params } = options;
  const meanDegree = numberParam('er', params, 'meanDegree', DEFAULT_MEAN_DEGREE);
  if (meanDegree < 0) throw new Error(`graphs/er: params.meanDegree must be >= 0, got ${meanDegree}`);
  const edgeProbability = params?.['edgeProbability'] === undefined ? null : numberParam('er', params, 'edgeProbability', 0);
  if (edgeProbability !== null) {
    if (!(edgeProbability >= 0 && edgeProbability <= 1)) {
      throw new Error(`graphs/er: params.edgeProbability must be in 0..1, got ${edgeProbability}`);
    }
    if (params?.['meanDegree'] !== undefined) throw new Error('graphs/er: give params.meanDegree or params.edgeProbability, not both');
  }
  const graph = emptyGraph('er', n, false, weightRange);

  const order = rng.shuffle(Array.from({ length: n }, (_, i) => i));
  for (let k = 1; k < n; k++) {
    const parent = order[rng.int(0, k - 1)]!;
    addWeightedEdge(graph, order[k]!, parent, drawWeight(rng, weightRange));
  }

  const maxEdges = (n * (n - 1)) / 2;
  const target = edgeProbability === null ? (meanDegree * n) / 2 : edgeProbability * maxEdges;
  const wanted = Math.min(maxEdges, Math.max(n - 1, Math.round(target)));
  if (wanted - graph.size > (maxEdges - graph.size) / 2) {
    // Dense request: enumerate the missing pairs and take a random subset
    // (rejection sampling would stall near the complete graph).
    const missing: Array<[number, number]> = [];
    for (let u = 0; u < n; u++) {
      for (let v = u + 1; v < n; v++) if (!graph.hasEdge(String(u), String(v))) missing.push([u, v]);
    }
    rng.shuffle(missing);
    for (let k = 0; graph.size < wanted; k++) {
      const [u, v] = missing[k]!;
      addWeightedEdge(graph, u, v, drawWeight(rng, weightRange));
    }
  } else {
    while (graph.size < wanted) {
      const u = rng.int(0, n - 1);
      const v = rng.int(0, n - 1);
      if (u === v || graph.hasEdge(String(u), String(v))) continue;
      addWeightedEdge(graph, u, v, drawWeight(rng, weightRange));
    }
  }
  return graph;
}

export const er: GraphFamily = {
  id: 'er',
  title: 'Connected Erdős–Rényi (random spanning tree + random extra edges)',
  directed: false,
  connected: true,
  hasPositions: false,
  minNodes: 2,
  generate,
};
