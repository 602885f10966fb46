/** descendant-count against exhaustive search with graphology-traversal. */
import { describe, expect, it } from 'vitest';
import Graph from 'graphology';
import { bfsFromNode, dfsFromNode } from 'graphology-traversal';
import { topologicalSort } from 'graphology-dag';
import { Rng } from '../../src/util/rng.ts';
import { getFamily } from '../../src/graphs/registry.ts';
import { descendantCount, descendantCounts } from '../../src/tasks/descendant-count.ts';
import type { TaskInstance } from '../../src/tasks/types.ts';

function dagOf(n: number, edges: Array<[number, number]>): Graph {
  const g = new Graph({ type: 'directed' });
  for (let i = 0; i < n; i++) g.addNode(String(i));
  for (const [u, v] of edges) g.addEdge(String(u), String(v), { weight: 1 });
  return g;
}

/** Longest path in edges: dynamic programming over graphology-dag 0.4's topologicalSort (common practice). */
function longestPath(graph: Graph): number {
  const best = new Map<string, number>();
  let longest = 0;
  for (const v of topologicalSort(graph)) {
    let b = 0;
    graph.forEachInNeighbor(v, (u) => {
      b = Math.max(b, best.get(u)! + 1);
    });
    best.set(v, b);
    longest = Math.max(longest, b);
  }
  return longest;
}

/** Rounds after which `step` stops changing the state (the last round that changed something). */
function roundsUntilStable(step: (k: number) => number[], cap: number): number {
  let last = 0;
  for (let k = 1; k <= cap; k++) if (JSON.stringify(step(k)) !== JSON.stringify(step(k - 1))) last = k;
  return last;
}

/** The sum recursion count_k(v) = 1 + sum over children of count_{k-1}(child), count_0 = 1, on the instance's messages (child -> parent). */
function sumRecursion(inst: TaskInstance, rounds: number): number[] {
  let c = new Array<number>(inst.nodes).fill(1);
  for (let r = 0; r < rounds; r++) {
    const next = new Array<number>(inst.nodes).fill(1);
    for (let e = 0; e < inst.messageSrc.length; e++) next[inst.messageDst[e]!]! += c[inst.messageSrc[e]!]!;
    c = next;
  }
  return c;
}

/** Breadth-first reach sets R_k(v) = {v} ∪ R_{k-1}(children), sizes (for comparison only). */
function reachSizes(inst: TaskInstance, rounds: number): number[] {
  let sets = Array.from({ length: inst.nodes }, (_, v) => new Set([v]));
  for (let r = 0; r < rounds; r++) {
    const next = sets.map((x) => new Set(x));
    for (let e = 0; e < inst.messageSrc.length; e++) for (const x of sets[inst.messageSrc[e]!]!) next[inst.messageDst[e]!]!.add(x);
    sets = next;
  }
  return sets.map((x) => x.size);
}

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
      // depth = the longest path (reference: DP over graphology-dag's topological order) = the rounds
      // iterate needs until it stops changing = the rounds the sum recursion needs (common practice).
      expect(inst.depth).toBe(longestPath(graph));
      expect(roundsUntilStable((k) => descendantCount.iterate!(graph, inst, k), n + 1)).toBe(inst.depth);
      expect(roundsUntilStable((k) => sumRecursion(inst, k), n + 1)).toBe(inst.depth);
      // iterate never over-counts: at every round at most the target.
      for (let k = 0; k <= inst.depth; k++) descendantCount.iterate!(graph, inst, k).forEach((c, v) => expect(c).toBeLessThanOrEqual(inst.target[v]!));
    }
  });

  it('hand-built DAGs: depth is the longest path, which the sum recursion and iterate both need, even where reach sets settle sooner', () => {
    // 0 -> 1 -> 2 -> 3 with a shortcut 0 -> 3. Worked by hand (the author of this test):
    // longest path 0-1-2-3 = 3 edges; fewest hops from 0 to 3 is 1, so reach sets settle after 2 rounds.
    const g = dagOf(4, [[0, 1], [1, 2], [2, 3], [0, 3]]);
    const inst = descendantCount.instance(g, { rng: new Rng(1), weightScale: 1 });
    expect(inst.target).toEqual([4, 3, 2, 1]);
    expect(inst.depth).toBe(3);
    expect(longestPath(g)).toBe(3);
    // iterate, by hand: the node plus the descendants all of whose paths from it have <= k edges.
    expect([0, 1, 2, 3, 4].map((k) => descendantCount.iterate!(g, inst, k))).toEqual([
      [1, 1, 1, 1],
      [2, 2, 2, 1],
      [3, 3, 2, 1],
      [4, 3, 2, 1],
      [4, 3, 2, 1],
    ]);
    // The sum recursion, by hand: 1, 3, 4, 5 at node 0 (it counts 3 twice, via 1-2-3 and directly), settled after 3 rounds.
    expect([0, 1, 2, 3, 4].map((k) => sumRecursion(inst, k))).toEqual([
      [1, 1, 1, 1],
      [3, 2, 2, 1],
      [4, 3, 2, 1],
      [5, 3, 2, 1],
      [5, 3, 2, 1],
    ]);
    // Breadth-first reach sets (with node identities) are exact after 2 rounds: what depth used to report.
    expect(reachSizes(inst, 2)).toEqual(inst.target);
    expect(roundsUntilStable((k) => reachSizes(inst, k), 8)).toBe(2);

    // Diamond 0 -> {1, 2} -> 3: longest path 2 (by hand), shared descendant counted once.
    const diamond = dagOf(4, [[0, 1], [0, 2], [1, 3], [2, 3]]);
    const d = descendantCount.instance(diamond, { rng: new Rng(1), weightScale: 1 });
    expect(d.target).toEqual([4, 2, 2, 1]);
    expect(d.depth).toBe(2);
    expect(roundsUntilStable((k) => descendantCount.iterate!(diamond, d, k), 8)).toBe(2);

    // A 6-node chain 0-1-2-3-4-5 with shortcuts 0->5, 0->3, 1->4: longest path 5 (by hand); reach sets settle
    // after 3 (the fewest hops from 2 to 5 are 2-3-4-5; every other node reaches all its descendants in <= 2).
    const chain = dagOf(6, [[0, 1], [1, 2], [2, 3], [3, 4], [4, 5], [0, 5], [0, 3], [1, 4]]);
    const c = descendantCount.instance(chain, { rng: new Rng(1), weightScale: 1 });
    expect(c.depth).toBe(5);
    expect(longestPath(chain)).toBe(5);
    expect(roundsUntilStable((k) => descendantCount.iterate!(chain, c, k), 10)).toBe(5);
    expect(roundsUntilStable((k) => reachSizes(c, k), 10)).toBe(3);

    // No edges: nothing to propagate.
    const lone = descendantCount.instance(dagOf(3, []), { rng: new Rng(1), weightScale: 1 });
    expect(lone.depth).toBe(0);
    expect(descendantCount.iterate!(dagOf(3, []), lone, 0)).toEqual([1, 1, 1]);
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
      // On a tree iterate is the sum recursion itself at every round.
      for (let k = 0; k <= height + 1; k++) expect(descendantCount.iterate!(graph, inst, k)).toEqual(sumRecursion(inst, k));
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
