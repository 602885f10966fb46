/**
 * shortest-path: our Bellman-Ford and Dijkstra against graphology-shortest-path
 * on hundreds of random graphs, plus the textbook tinyEWD example.
 */
import { describe, expect, it } from 'vitest';
import Graph from 'graphology';
import { Rng } from '../../src/util/rng.ts';
import { getFamily } from '../../src/graphs/registry.ts';
import { bellmanFord, dijkstra, shortestPath } from '../../src/tasks/shortest-path.ts';
import { graphologyDistances } from '../helpers.ts';

describe('shortest-path against graphology-shortest-path', () => {
  for (const family of shortestPath.families) {
    it(`matches graphology Dijkstra on 40 random '${family}' graphs`, () => {
      const rng = new Rng(2024).fork(family);
      for (let k = 0; k < 40; k++) {
        const n = rng.int(Math.max(4, getFamily(family).minNodes), 40);
        const graph = getFamily(family).generate({ nodes: n, weightRange: [0.1, 10], rng: rng.fork(k) });
        const inst = shortestPath.instance(graph, { rng: rng.fork(`t${k}`), weightScale: 1 });
        const source = inst.source!;
        // Reference: graphology-shortest-path 2.1 dijkstra.singleSource (common practice: Dijkstra is exact for non-negative weights).
        const ref = graphologyDistances(graph, source);
        const bf = bellmanFord(graph, source).distance;
        const dj = dijkstra(graph, source);
        for (let i = 0; i < graph.order; i++) {
          if (ref[i] === Infinity) {
            expect(bf[i]).toBe(Infinity);
            expect(inst.mask[i]).toBe(0);
            expect(inst.target[i]).toBe(0);
          } else {
            expect(bf[i]).toBeCloseTo(ref[i]!, 9);
            expect(dj[i]).toBeCloseTo(ref[i]!, 9);
            expect(inst.target[i]).toBeCloseTo(ref[i]!, 9);
            expect(inst.mask[i]).toBe(1);
          }
        }
        // Our own structure checks (common practice): source 0, inputs shaped as declared.
        expect(inst.target[source]).toBe(0);
        // Node input: 0 at the source, the lower median edge weight elsewhere (median by hand: sort, take index ⌊(m − 1)/2⌋).
        const weights = graph.mapEdges((_e, a) => a['weight'] as number).sort((x, y) => x - y);
        const median = weights[(weights.length - 1) >> 1]!;
        expect(median).toBeGreaterThan(0);
        expect(inst.nodeInputs.map((f) => f[0])).toEqual(Array.from({ length: graph.order }, (_, i) => (i === source ? 0 : median)));
        expect(inst.messageSrc.length).toBe(graph.type === 'directed' ? graph.size : 2 * graph.size);
        // iterate: after `depth` synchronous Bellman-Ford rounds the estimates are final, not before.
        const it = shortestPath.iterate!(graph, inst, inst.depth);
        for (let i = 0; i < graph.order; i++) if (inst.mask[i]) expect(it[i]).toBe(bf[i]);
        if (inst.depth > 0) expect(shortestPath.iterate!(graph, inst, inst.depth - 1)).not.toEqual(it);
      }
    });
  }

  it('masks nodes the source cannot reach', () => {
    const g = new Graph({ type: 'directed' });
    for (let i = 0; i < 4; i++) g.addNode(String(i));
    g.addEdge('0', '1', { weight: 2 });
    g.addEdge('2', '3', { weight: 1 });
    const inst = shortestPath.instance(g, { rng: new Rng(1), weightScale: 1, source: 0 });
    expect(inst.target).toEqual([0, 2, 0, 0]);
    expect(inst.mask).toEqual([1, 1, 0, 0]);
    expect(shortestPath.iterate!(g, inst, 3)).toEqual([0, 2, Infinity, Infinity]);
  });

  it('refuses an out-of-range source with an error saying where it comes from', () => {
    const g = getFamily('path').generate({ nodes: 10, weightRange: [1, 1], rng: new Rng(1) });
    expect(() => shortestPath.instance(g, { rng: new Rng(1), weightScale: 1, source: 12 })).toThrow(
      'tasks/shortest-path: source node 12 is out of range 0..9',
    );
  });

  it('detects a negative cycle', () => {
    const g = new Graph({ type: 'directed' });
    for (let i = 0; i < 3; i++) g.addNode(String(i));
    g.addEdge('0', '1', { weight: 1 });
    g.addEdge('1', '2', { weight: -3 });
    g.addEdge('2', '1', { weight: 1 });
    expect(() => bellmanFord(g, 0)).toThrow(/tasks\/shortest-path: no fixed point/);
  });
});

describe('shortest-path: Sedgewick & Wayne tinyEWD', () => {
  // Source: R. Sedgewick & K. Wayne, Algorithms, 4th ed. (Addison-Wesley, 2011),
  // §4.4 Shortest Paths, the 8-vertex, 15-edge weighted digraph tinyEWD.txt and
  // its shortest-path distances from vertex 0. Edges and distances are FROM
  // MEMORY of the book; they are cross-checked with graphology's Dijkstra below.
  const tinyEWD: Array<[number, number, number]> = [
    [4, 5, 0.35], [5, 4, 0.35], [4, 7, 0.37], [5, 7, 0.28], [7, 5, 0.28],
    [5, 1, 0.32], [0, 4, 0.38], [0, 2, 0.26], [7, 3, 0.39], [1, 3, 0.29],
    [2, 7, 0.34], [6, 2, 0.4], [3, 6, 0.52], [6, 0, 0.58], [6, 4, 0.93],
  ];
  const bookDistances = [0.0, 1.05, 0.26, 0.99, 0.38, 0.73, 1.51, 0.6];

  it('reproduces the distances from vertex 0 (Bellman-Ford, Dijkstra, graphology)', () => {
    const g = new Graph({ type: 'directed' });
    for (let i = 0; i < 8; i++) g.addNode(String(i));
    for (const [u, v, w] of tinyEWD) g.addEdge(String(u), String(v), { weight: w });
    expect(g.size).toBe(15);
    const bf = bellmanFord(g, 0).distance;
    const dj = dijkstra(g, 0);
    const ref = graphologyDistances(g, 0); // graphology-shortest-path 2.1
    for (let i = 0; i < 8; i++) {
      expect(bf[i]).toBeCloseTo(bookDistances[i]!, 10); // book value (from memory), printed to 2 decimals; sums are exact to 2 dp
      expect(dj[i]).toBeCloseTo(bookDistances[i]!, 10);
      expect(ref[i]).toBeCloseTo(bookDistances[i]!, 10);
    }
    // Through the task: depth = edges on the deepest shortest path (0->2->7->3->6 has 4).
    const inst = shortestPath.instance(g, { rng: new Rng(0), weightScale: 1, source: 0 });
    expect(inst.depth).toBe(4);
  });
});
