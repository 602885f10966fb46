/**
 * Graph families: node counts, connectivity, degree and weight ranges,
 * determinism under a seed. Connectivity is checked with graphology-traversal's
 * breadth-first search (graphology-components is not installed).
 */
import { describe, expect, it } from 'vitest';
import { Rng } from '../../src/util/rng.ts';
import { families, getFamily } from '../../src/graphs/registry.ts';
import { gridShape } from '../../src/graphs/grid.ts';
import { defaultGeometricRadius } from '../../src/graphs/geometric.ts';
import type Graph from 'graphology';
import { bfsFromNode } from 'graphology-traversal';

/** Nodes reached from `start` by graphology-traversal's breadth-first search, following edge direction. */
function reachedFrom(graph: Graph, start: string): Set<string> {
  const seen = new Set<string>();
  bfsFromNode(graph, start, (key) => {
    seen.add(key);
  });
  return seen;
}

function edgeSignature(graph: Graph): string {
  const parts: string[] = [];
  graph.forEachEdge((_e, a, s, t) => parts.push(`${s}-${t}:${(a['weight'] as number).toFixed(12)}`));
  return parts.join('|');
}

const RANGE: [number, number] = [2, 5];
const SIZES = [2, 3, 4, 7, 10, 16, 33, 64];

function make(id: string, nodes: number, seed: number, params?: Record<string, number>) {
  return getFamily(id).generate({ nodes, weightRange: RANGE, rng: new Rng(seed), params });
}

describe('graph families (common checks)', () => {
  for (const family of Object.values(families)) {
    describe(family.id, () => {
      const sizes = SIZES.filter((n) => n >= family.minNodes);

      it('uses node keys "0".."n-1", a simple graph of the declared direction', () => {
        for (const n of sizes) {
          const g = make(family.id, n, n);
          // grid rounds down (checked separately); every other family gives exactly n nodes.
          if (family.id !== 'grid') expect(g.order).toBe(n);
          for (let i = 0; i < g.order; i++) expect(g.hasNode(String(i))).toBe(true);
          expect(g.type).toBe(family.directed ? 'directed' : 'undirected');
          expect(g.multi).toBe(false);
          g.forEachEdge((_e, _a, s, t) => expect(s).not.toBe(t));
        }
      });

      it('draws weights from weightRange (points: Euclidean distance)', () => {
        for (const n of sizes) {
          const g = make(family.id, n, 100 + n);
          g.forEachEdge((_e, a, s, t) => {
            const w = a['weight'] as number;
            if (family.id === 'points') {
              const p = g.getNodeAttributes(s);
              const q = g.getNodeAttributes(t);
              expect(w).toBeCloseTo(Math.hypot(p['x'] - q['x'], p['y'] - q['y']), 12);
            } else {
              expect(w).toBeGreaterThanOrEqual(RANGE[0]);
              expect(w).toBeLessThanOrEqual(RANGE[1]);
            }
          });
        }
      });

      it('gives x/y in the unit square exactly when hasPositions', () => {
        const g = make(family.id, 20, 5);
        g.forEachNode((_k, a) => {
          if (family.hasPositions) {
            expect(a['x']).toBeGreaterThanOrEqual(0);
            expect(a['x']).toBeLessThan(1);
            expect(a['y']).toBeGreaterThanOrEqual(0);
            expect(a['y']).toBeLessThan(1);
          } else {
            expect(a['x']).toBeUndefined();
          }
        });
      });

      it('is connected when it promises to be (every node reached from node 0 by BFS)', () => {
        expect(family.connected).toBe(true);
        for (let seed = 0; seed < 15; seed++) {
          for (const n of sizes) {
            const g = make(family.id, n, seed * 1000 + n);
            expect(reachedFrom(g, '0').size).toBe(g.order);
          }
        }
      });

      it('is deterministic under a seed and changes with the seed', () => {
        const a = make(family.id, 24, 42);
        const b = make(family.id, 24, 42);
        const c = make(family.id, 24, 43);
        expect(edgeSignature(a)).toBe(edgeSignature(b));
        expect(JSON.stringify(a.export().nodes)).toBe(JSON.stringify(b.export().nodes));
        expect(edgeSignature(a)).not.toBe(edgeSignature(c));
      });

      it('refuses too few nodes with an error naming the family', () => {
        expect(() => make(family.id, family.minNodes - 1, 1)).toThrow(`graphs/${family.id}: nodes must be an integer >= ${family.minNodes}`);
        expect(() => make(family.id, 5.5, 1)).toThrow(`graphs/${family.id}`);
      });
    });
  }
});

describe('graph families (specific shapes)', () => {
  it('er: mean degree meets params.meanDegree (default 3), spanning tree included', () => {
    for (const n of [10, 40, 100]) {
      const g = make('er', n, 9);
      expect(g.size).toBe(Math.round((3 * n) / 2));
      const g5 = make('er', n, 9, { meanDegree: 5 });
      expect(g5.size).toBe(Math.round((5 * n) / 2));
    }
    // Sparse request: never fewer than n - 1 edges (the spanning tree).
    expect(make('er', 30, 1, { meanDegree: 0.5 }).size).toBe(29);
    // Over-dense request: capped at the complete graph.
    expect(make('er', 6, 1, { meanDegree: 50 }).size).toBe(15);
    expect(make('er', 12, 3, { meanDegree: 9 }).size).toBe(54);
  });

  it('er: params.edgeProbability gives round(p · n(n-1)/2) edges, so degree grows with n', () => {
    // 0.3 · 48·47/2 = 338.4 -> 338 edges, mean degree 2·338/48 ≈ 14.1; at 8 nodes 0.3 · 28 = 8.4 -> 8, but the spanning tree needs 7.
    expect(make('er', 48, 2, { edgeProbability: 0.3 }).size).toBe(338);
    expect(make('er', 8, 2, { edgeProbability: 0.3 }).size).toBe(8);
    expect(make('er', 8, 2, { edgeProbability: 0 }).size).toBe(7);
    expect(make('er', 8, 2, { edgeProbability: 1 }).size).toBe(28);
    expect(() => make('er', 8, 2, { edgeProbability: 1.5 })).toThrow(/edgeProbability must be in 0..1, got 1.5/);
    expect(() => make('er', 8, 2, { edgeProbability: 0.2, meanDegree: 3 })).toThrow(/not both/);
  });

  it('geometric: every pair within the radius is joined; mean degree near 4', () => {
    let degreeSum = 0;
    let nodeSum = 0;
    let missing = 0;
    for (let seed = 0; seed < 10; seed++) {
      const n = 150;
      const g = make('geometric', n, seed);
      const r = defaultGeometricRadius(n);
      const xy = Array.from({ length: n }, (_, i) => g.getNodeAttributes(String(i)));
      for (let u = 0; u < n; u++) {
        for (let v = u + 1; v < n; v++) {
          const d = Math.hypot(xy[u]!['x'] - xy[v]!['x'], xy[u]!['y'] - xy[v]!['y']);
          if (d <= r && !g.hasEdge(String(u), String(v))) missing++;
        }
      }
      degreeSum += 2 * g.size;
      nodeSum += n;
    }
    expect(missing).toBe(0);
    // Border effects lower the mean below n*pi*r^2 = 4 (common practice: a
    // disk near the square's edge is cut off); 3 to 4.5 also allows the
    // connecting edges.
    const mean = degreeSum / nodeSum;
    expect(mean).toBeGreaterThan(3);
    expect(mean).toBeLessThan(4.5);
  });

  it('geometric: a tiny radius still yields a connected graph (nearest-pair joins = n - 1 edges)', () => {
    const g = make('geometric', 30, 4, { radius: 0 });
    expect(g.size).toBe(29);
    expect(reachedFrom(g, '0').size).toBe(30);
  });

  it('grid: node count rounds down to rows x cols, as square as possible; degrees 2..4', () => {
    expect(gridShape(4)).toEqual({ rows: 2, cols: 2 });
    expect(gridShape(10)).toEqual({ rows: 3, cols: 3 });
    expect(gridShape(17)).toEqual({ rows: 4, cols: 4 });
    expect(gridShape(20)).toEqual({ rows: 4, cols: 5 });
    expect(gridShape(35)).toEqual({ rows: 5, cols: 7 });
    expect(gridShape(64)).toEqual({ rows: 8, cols: 8 });
    for (let n = 4; n <= 200; n++) {
      const { rows, cols } = gridShape(n);
      expect(rows * cols).toBeLessThanOrEqual(n);
      expect(cols - rows).toBeGreaterThanOrEqual(0);
      expect(cols - rows).toBeLessThanOrEqual(2);
      expect(n - rows * cols).toBeLessThan(rows);
    }
    const g = make('grid', 20, 1);
    expect(g.order).toBe(20);
    expect(g.size).toBe(4 * 4 + 3 * 5); // rows*(cols-1) + (rows-1)*cols
    expect(g.getAttribute('rows')).toBe(4);
    expect(g.getAttribute('cols')).toBe(5);
    g.forEachNode((k) => {
      expect(g.degree(k)).toBeGreaterThanOrEqual(2);
      expect(g.degree(k)).toBeLessThanOrEqual(4);
    });
  });

  it('path: the chain 0-1-...-(n-1)', () => {
    const g = make('path', 9, 2);
    expect(g.size).toBe(8);
    for (let i = 0; i < 8; i++) expect(g.hasEdge(String(i), String(i + 1))).toBe(true);
  });

  it('tree: n - 1 edges, each joining a node to an earlier one', () => {
    for (let seed = 0; seed < 20; seed++) {
      const g = make('tree', 40, seed);
      expect(g.size).toBe(39);
      for (let i = 1; i < 40; i++) {
        const earlier = g.neighbors(String(i)).filter((k) => Number(k) < i);
        expect(earlier.length).toBe(1);
      }
    }
  });

  it('dag: edges go forward, node 0 has no predecessor, others 1..3, depth grows with n', () => {
    const longest = (n: number, seed: number) => {
      const g = make('dag', n, seed);
      const L = new Array<number>(n).fill(0);
      for (let i = 0; i < n; i++) {
        const preds = g.inNeighbors(String(i)).map(Number);
        if (i === 0) expect(preds.length).toBe(0);
        else {
          expect(preds.length).toBeGreaterThanOrEqual(1);
          expect(preds.length).toBeLessThanOrEqual(3);
        }
        for (const p of preds) {
          expect(p).toBeLessThan(i);
          L[i] = Math.max(L[i]!, L[p]! + 1);
        }
      }
      return Math.max(...L);
    };
    let small = 0;
    let large = 0;
    for (let seed = 0; seed < 10; seed++) {
      small += longest(16, seed);
      large += longest(64, seed);
    }
    expect(large).toBeGreaterThan(2 * small);
  });

  it('points: complete graph', () => {
    const g = make('points', 9, 3);
    expect(g.size).toBe(36);
    expect(g.getAttribute('weightIsDistance')).toBe(true);
  });

  it('registry: unknown id lists the valid ids', () => {
    expect(() => getFamily('nope')).toThrow(/graphs\/registry: unknown graph family 'nope'; valid ids: er, geometric, grid, path, tree, dag, points/);
  });

  it('refuses a bad weightRange', () => {
    expect(() => getFamily('er').generate({ nodes: 5, weightRange: [3, 1], rng: new Rng(1) })).toThrow('graphs/er: weightRange');
  });
});
