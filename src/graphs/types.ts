import type Graph from 'graphology';
import type { Rng } from '../util/rng.ts';

/**
 * Graph families build graphology graphs. Node keys are the strings "0".."n-1";
 * every edge carries a numeric `weight` attribute; families with geometry give
 * every node `x` and `y` attributes.
 */
export interface FamilyOptions {
  /** Number of nodes (for `grid`, the nearest rows x cols product at or below it is used; see the family). */
  nodes: number;
  /** Edge weights are drawn uniformly from this closed range. */
  weightRange: readonly [number, number];
  /** Seeded stream; the family must draw only from it. */
  rng: Rng;
  /** Family-specific knobs, e.g. `meanDegree` for `er`, `radius` for `geometric`. */
  params?: Readonly<Record<string, number>>;
}

export interface GraphFamily {
  id: string;
  title: string;
  /** Whether edges are directed (e.g. `dag`). */
  directed: boolean;
  /** True when every node is reachable from node 0 (for directed families: from the source the task picks). */
  connected: boolean;
  /** Whether nodes carry x/y positions. */
  hasPositions: boolean;
  /** Smallest node count the family supports. */
  minNodes: number;
  generate(options: FamilyOptions): Graph;
}

/** Plain-number form of a graph, the shape printed by `farfield sample`. */
export interface PlainGraph {
  nodes: number;
  directed: boolean;
  /** [u, v, w]; undirected edges appear once. */
  edges: Array<[number, number, number]>;
  positions?: Array<[number, number]>;
}
