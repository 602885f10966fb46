/**
 * Small helpers shared by the graph families: option checking, graph
 * construction, weight draws. Every family builds node keys "0".."n-1" and
 * records a few graph-level attributes so later steps can tell what they hold:
 *
 * - `family`: the family id;
 * - `weightRange`: the range edge weights were drawn from (tasks that draw their
 *   own values, e.g. durations, fall back to it);
 * - `weightIsDistance`: true when edge weights are Euclidean distances between
 *   node positions (then `scaleWeights` scales positions too).
 */
import Graph from 'graphology';
import type { FamilyOptions } from './types.ts';
import type { Rng } from '../util/rng.ts';

/** Default edge-weight range when a caller does not give one. */
export const DEFAULT_WEIGHT_RANGE: readonly [number, number] = [1, 10];

/** Checks `nodes` and `weightRange`; throws "graphs/<id>: ..." errors. */
export function checkFamilyOptions(familyId: string, options: FamilyOptions, minNodes: number): void {
  const { nodes, weightRange, rng } = options;
  if (!Number.isInteger(nodes) || nodes < minNodes) {
    throw new Error(`graphs/${familyId}: nodes must be an integer >= ${minNodes}, got ${String(nodes)}`);
  }
  if (
    !Array.isArray(weightRange) ||
    weightRange.length !== 2 ||
    !Number.isFinite(weightRange[0]) ||
    !Number.isFinite(weightRange[1]) ||
    weightRange[0] > weightRange[1]
  ) {
    throw new Error(
      `graphs/${familyId}: weightRange must be two finite numbers [lo, hi] with lo <= hi, got ${JSON.stringify(weightRange)}`,
    );
  }
  if (!rng || typeof rng.next !== 'function') {
    throw new Error(`graphs/${familyId}: options.rng (a seeded Rng) is required`);
  }
}

/** Reads a numeric family parameter, with its default in view; throws on non-finite input. */
export function numberParam(
  familyId: string,
  params: Readonly<Record<string, number>> | undefined,
  name: string,
  fallback: number,
): number {
  const value = params?.[name];
  if (value === undefined) return fallback;
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new Error(`graphs/${familyId}: params.${name} must be a finite number, got ${String(value)}`);
  }
  return value;
}

/** An empty simple graph (no parallel edges, no self-loops) with nodes "0".."n-1". */
export function emptyGraph(familyId: string, n: number, directed: boolean, weightRange: readonly [number, number]): Graph {
  const graph = new Graph({ type: directed ? 'directed' : 'undirected', multi: false, allowSelfLoops: false });
  graph.setAttribute('family', familyId);
  graph.setAttribute('weightRange', [weightRange[0], weightRange[1]]);
  graph.setAttribute('weightIsDistance', false);
  for (let i = 0; i < n; i++) graph.addNode(String(i));
  return graph;
}

/** Uniform draw from the closed range (a degenerate range gives its single value). */
export function drawWeight(rng: Rng, weightRange: readonly [number, number]): number {
  const [lo, hi] = weightRange;
  return lo === hi ? lo : rng.uniform(lo, hi);
}

/** Adds edge u-v (or u->v) with the given weight. */
export function addWeightedEdge(graph: Graph, u: number, v: number, weight: number): void {
  graph.addEdge(String(u), String(v), { weight });
}

/** Draws n points uniformly in the unit square and stores them as x/y node attributes. */
export function placeUniformPoints(graph: Graph, rng: Rng): Array<[number, number]> {
  const points: Array<[number, number]> = [];
  for (let i = 0; i < graph.order; i++) {
    const x = rng.next();
    const y = rng.next();
    points.push([x, y]);
    graph.mergeNodeAttributes(String(i), { x, y });
  }
  return points;
}

/** Disjoint-set forest over 0..n-1 (path halving, union by size). */
export class UnionFind {
  private readonly parent: number[];
  private readonly size: number[];
  components: number;

  constructor(n: number) {
    this.parent = Array.from({ length: n }, (_, i) => i);
    this.size = new Array<number>(n).fill(1);
    this.components = n;
  }

  find(a: number): number {
    while (this.parent[a]! !== a) {
      this.parent[a] = this.parent[this.parent[a]!]!;
      a = this.parent[a]!;
    }
    return a;
  }

  /** Joins the sets of a and b; returns false when they were already joined. */
  union(a: number, b: number): boolean {
    let ra = this.find(a);
    let rb = this.find(b);
    if (ra === rb) return false;
    if (this.size[ra]! < this.size[rb]!) [ra, rb] = [rb, ra];
    this.parent[rb] = ra;
    this.size[ra]! += this.size[rb]!;
    this.components--;
    return true;
  }
}
