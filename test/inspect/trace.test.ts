/**
 * The alignment trace: the exact algorithm's per-round states against a
 * hand-worked textbook example, and a network that runs Bellman-Ford step for
 * step lining up with it round by round.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import Graph from 'graphology';
import { initBackend } from '../../src/engine/backend.ts';
import { alignmentTrace, traceGraph, traceNodes } from '../../src/inspect/trace.ts';
import type { FeatureTransforms } from '../../src/train/batch.ts';
import { shortestPath } from '../../src/tasks/shortest-path.ts';
import { Rng } from '../../src/util/rng.ts';
import { tinySpec, bellmanFordNetwork } from '../helpers.ts';

const identity: FeatureTransforms = { node: ['identity'], edge: ['identity'], nodeStats: [], edgeStats: [] };

// Source: R. Sedgewick & K. Wayne, Algorithms, 4th ed. (Addison-Wesley, 2011), §4.4,
// the 8-vertex weighted digraph tinyEWD.txt; shortest-path distances from vertex 0:
// 0, 1.05, .26, .99, .38, .73, 1.51, .60 (the book's table).
const tinyEWD: Array<[number, number, number]> = [
  [4, 5, 0.35], [5, 4, 0.35], [4, 7, 0.37], [5, 7, 0.28], [7, 5, 0.28],
  [5, 1, 0.32], [0, 4, 0.38], [0, 2, 0.26], [7, 3, 0.39], [1, 3, 0.29],
  [2, 7, 0.34], [6, 2, 0.4], [3, 6, 0.52], [6, 0, 0.58], [6, 4, 0.93],
];
const INF = Infinity;
// Synchronous Bellman-Ford rounds from vertex 0, worked by hand (by the author of this
// test, not taken from the book): round k uses only the estimates of round k − 1,
// d_k(v) = min(d_{k−1}(v), min over u->v of d_{k−1}(u) + w).
//   k=1: from 0: 4 ← .38, 2 ← .26
//   k=2: from 2 (.26): 7 ← .26+.34 = .60; from 4 (.38): 5 ← .73, 7 via 4 = .75 (worse than .60)
//   k=3: from 5 (.73): 1 ← 1.05 (4 via 5 = 1.08, 7 via 5 = 1.01: worse); from 7 (.60): 3 ← .99 (5 via 7 = .88: worse)
//   k=4: from 3 (.99): 6 ← 1.51 (3 via 1 = 1.34: worse)
//   k=5: from 6 (1.51): 2 via 6 = 1.91, 0 via 6 = 2.09, 4 via 6 = 2.44: nothing changes
const handRounds: number[][] = [
  [0, INF, INF, INF, INF, INF, INF, INF],
  [0, INF, 0.26, INF, 0.38, INF, INF, INF],
  [0, INF, 0.26, INF, 0.38, 0.73, INF, 0.6],
  [0, 1.05, 0.26, 0.99, 0.38, 0.73, INF, 0.6],
  [0, 1.05, 0.26, 0.99, 0.38, 0.73, 1.51, 0.6],
  [0, 1.05, 0.26, 0.99, 0.38, 0.73, 1.51, 0.6],
];
const bookDistances = [0, 1.05, 0.26, 0.99, 0.38, 0.73, 1.51, 0.6];

function tinyEWDInput() {
  const graph = new Graph({ type: 'directed' });
  for (let i = 0; i < 8; i++) graph.addNode(String(i));
  for (const [u, v, w] of tinyEWD) graph.addEdge(String(u), String(v), { weight: w });
  const instance = shortestPath.instance(graph, { rng: new Rng(0), weightScale: 1, source: 0 });
  return { task: shortestPath, family: 'tinyEWD', graph, instance };
}


beforeAll(async () => {
  await initBackend('wasm');
});

describe('exact per-round states (Sedgewick & Wayne, Algorithms 4th ed., §4.4, tinyEWD; rounds hand-worked)', () => {
  it('task.iterate gives the hand-worked synchronous Bellman-Ford rounds, ending at the book distances', () => {
    const { graph, instance } = tinyEWDInput();
    handRounds.forEach((want, k) => {
      const got = shortestPath.iterate!(graph, instance, k);
      want.forEach((w, v) => {
        if (w === INF) expect(got[v], `round ${k} vertex ${v}`).toBe(Infinity);
        else expect(got[v], `round ${k} vertex ${v}`).toBeCloseTo(w, 10);
      });
    });
    const final = shortestPath.iterate!(graph, instance, 7);
    bookDistances.forEach((d, v) => expect(final[v]).toBeCloseTo(d, 10));
    expect(instance.depth).toBe(4);
  });
});

describe('alignment trace', () => {
  it('a network that runs Bellman-Ford lines up with the exact algorithm at every step', () => {
    const net = bellmanFordNetwork();
    const trace = alignmentTrace(net, identity, tinyEWDInput());
    expect(trace.nodes).toBe(8);
    expect(trace.directed).toBe(true);
    expect(trace.edges).toHaveLength(15);
    expect(trace.source).toBe(0);
    expect(trace.stepsRun).toBe(8); // step rule 'nodes'
    expect(trace.steps.map((s) => s.k)).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8]);
    trace.steps.forEach((step, k) => {
      const want = handRounds[Math.min(k, 5)]!;
      want.forEach((w, v) => {
        if (w === INF) {
          expect(step.exact[v], `k=${k} v=${v}`).toBeNull();
          // the network's "not reached yet" is its large initial value
          expect(step.predicted[v]).toBeGreaterThan(1e3);
        } else {
          expect(step.exact[v], `k=${k} v=${v}`).toBeCloseTo(w, 10);
          expect(step.predicted[v], `k=${k} v=${v}`).toBeCloseTo(w, 5);
        }
      });
      expect(step.mae).toBeLessThan(1e-5);
      expect(step.counted).toBe(want.filter((w) => w !== INF).length);
    });
    for (const [x, y] of trace.positions) {
      expect(x).toBeGreaterThanOrEqual(0);
      expect(x).toBeLessThanOrEqual(1);
      expect(y).toBeGreaterThanOrEqual(0);
      expect(y).toBeLessThanOrEqual(1);
    }
    // JSON round trip keeps "not reached" as null
    const back = JSON.parse(JSON.stringify(trace));
    expect(back.steps[1].exact[1]).toBeNull();
    net.dispose();
  });

  it('a network that relaxes with half the edge weight drifts from the algorithm (the trace can show misalignment)', () => {
    const net = bellmanFordNetwork();
    net.params.set('message.we', [0.5]);
    const trace = alignmentTrace(net, identity, tinyEWDInput());
    expect(trace.steps[0]!.mae).toBe(0); // before any message only the source counts, and it is right
    // after one step nodes 2 and 4 hold .13 and .19 instead of .26 and .38: mae over {0, 2, 4} = (.13 + .19) / 3
    expect(trace.steps[1]!.mae!).toBeCloseTo(0.32 / 3, 5);
    expect(trace.steps[4]!.mae!).toBeGreaterThan(0.1);
    net.dispose();
  });

  it('traceGraph draws a small seeded graph from the training family', () => {
    const spec = tinySpec();
    expect(traceNodes(spec)).toBe(8);
    const a = traceGraph(spec, 3);
    const b = traceGraph(spec, 3);
    expect(a.instance.nodes).toBe(8);
    expect(a.instance.target).toEqual(b.instance.target);
    expect(a.instance.messageSrc).toEqual(b.instance.messageSrc);
    expect(traceGraph(spec, 4).instance.target).not.toEqual(a.instance.target);
  });
});
