/**
 * `grid`: 2-D lattice, undirected, 4-neighbour.
 *
 * Node count: the requested `nodes` is rounded DOWN to rows x cols with
 * rows = floor(sqrt(nodes)) and cols = floor(nodes / rows), so the grid is as
 * square as possible (cols - rows is 0, 1 or 2) and never larger than asked
 * (e.g. 10 -> 3 x 3 = 9, 20 -> 4 x 5 = 20, 17 -> 4 x 4 = 16). Minimum 4 (2 x 2).
 * Node r * cols + c is at row r, column c; the graph attributes `rows` and
 * `cols` record the shape. Weights: uniform in `weightRange`, row-major order
 * (for each node, its right edge then its down edge).
 */
import type Graph from 'graphology';
import type { FamilyOptions, GraphFamily } from './types.ts';
import { addWeightedEdge, checkFamilyOptions, drawWeight, emptyGraph } from './common.ts';

/** The grid shape used for a requested node count. */
export function gridShape(nodes: number): { rows: number; cols: number } {
  const rows = Math.floor(Math.sqrt(nodes));
  return { rows, cols: Math.floor(nodes / rows) };
}

function generate(options: FamilyOptions): Graph {
  checkFamilyOptions('grid', options, grid.minNodes);
  const { nodes, weightRange, rng } = options;
  const { rows, cols } = gridShape(nodes);
  const graph = emptyGraph('grid', rows * cols, false, weightRange);
  graph.setAttribute('rows', rows);
  graph.setAttribute('cols', cols);
  for (let r = 0; r < rows; r++) {
    for (let c = 0; c < cols; c++) {
      const id = r * cols + c;
      if (c + 1 < cols) addWeightedEdge(graph, id, id + 1, drawWeight(rng, weightRange));
      if (r + 1 < rows) addWeightedEdge(graph, id, id + cols, drawWeight(rng, weightRange));
    }
  }
  return graph;
}

export const grid: GraphFamily = {
  id: 'grid',
  title: '2-D grid (node count rounded down to rows x cols)',
  directed: false,
  connected: true,
  hasPositions: false,
  minNodes: 4,
  generate,
};
