/** descendant-count against exhaustive search with graphology-traversal. */
import { describe, expect, it } from 'vitest';
import { bfsFromNode, dfsFromNode } from 'graphology-traversal';
import { Rng } from '../../src/util/rng.ts';
import { getFamily } from '../../src/graphs/registry.ts';
import { descendantCount, descendantCounts } from '../../src/tasks/descendant-count.ts';

describe('descendant-count against exhaustive search', () => {
  it('dag: equals the number of nodes a DFS from the node visits (itself included)', () => {
    const rng = new Rng(21);
    for (let k = 0; k < 150; k++) {
      const n = rng.int(2, 30);
      const graph = getFamily('dag').generate({ nodes: n, weightRange: [1, 1], rng: rng.fork(k) });
      const inst = descendantCount.instance(graph, { rng: rng.fork(`t${k}`), weightScale: 1 });
      for (let v = 0; v < n; v++) {
        // Reference: graphology-traversal 0.3 dfsFromNode (follows out-edges; visits the start node too).
        let visited = 0;
        dfsFromNode(graph, String(v), () => {
          visited++;
        });
        expect(inst.target[v]).toBe(visited);
      }
      // Messages flow child -> parent: every message edge reverses a graph edge.
      for (let e = 0; e < inst.messageSrc.length; e++) {
        expect(graph.hasDirectedEdge(String(inst.messageDst[e]), String(inst.messageSrc[e]))).toBe(true);
      }
      expect(inst.target[0]).toBe(n); // node 0 reaches everything in this family
      expect(descendantCount.iterate!(graph, inst, inst.depth)).toEqual(inst.target);
      if (inst.depth > 0) expect(descendantCount.iterate!(graph, inst, inst.depth - 1)).not.toEqual(inst.target);
    }
  });

  it('tree (rooted at 0): subtree sizes; sum over children + 1 holds exactly', () => {
    const rng = new Rng(22);
    for (let k = 0; k < 150; k++) {
      const n = rng.int(2, 30);
      const graph = getFamily('tree').generate({ nodes: n, weightRange: [1, 1], rng: rng.fork(k) });
      const inst = descendantCount.instance(graph, { rng: rng.fork(`t${k}`), weightScale: 1 });
      for (let v = 0; v < n; v++) {
        // Reference: BFS from the root that does not expand v (graphology-traversal
        // bfsFromNode, callback returning true skips a node's neighbours); the
        // nodes not reached besides v are exactly v's subtree (common practice).
        let reached = 0;
        bfsFromNode(graph, '0', (key) => {
          reached++;
          return key === String(v);
        });
        expect(inst.target[v]).toBe(v === 0 ? n : n - reached + 1);
      }
      // Sum alignment on trees (common practice: subtree size recursion).
      const sums = new Array<number>(n).fill(1);
      for (let e = 0; e < inst.messageSrc.length; e++) sums[inst.messageDst[e]!]! += inst.target[inst.messageSrc[e]!]!;
      expect(sums).toEqual(inst.target);
      expect(inst.messageSrc.length).toBe(n - 1);
      // depth = tree height from root 0.
      let height = 0;
      bfsFromNode(graph, '0', (_k, _a, depth) => {
        height = Math.max(height, depth);
      });
      expect(inst.depth).toBe(height);
    }
  });

  it('descendantCounts on a diamond counts shared descendants once', () => {
    // 0 -> 1, 0 -> 2, 1 -> 3, 2 -> 3: node 0 reaches 4 nodes (a sum over children would give 5).
    expect(descendantCounts([[1, 2], [3], [3], []])).toEqual([4, 2, 2, 1]);
  });

  it('refuses an undirected graph that is not a tree', () => {
    const g = getFamily('er').generate({ nodes: 8, weightRange: [1, 1], rng: new Rng(1), params: { meanDegree: 4 } });
    expect(() => descendantCount.instance(g, { rng: new Rng(1), weightScale: 1 })).toThrow('tasks/descendant-count: an undirected graph must be a tree');
  });
});
