/** earliest-finish against the textbook job-scheduling example and a brute-force recursion. */
import { describe, expect, it } from 'vitest';
import Graph from 'graphology';
import { topologicalSort } from 'graphology-dag';
import { Rng } from '../../src/util/rng.ts';
import { getFamily } from '../../src/graphs/registry.ts';
import { earliestFinish, earliestFinishTask } from '../../src/tasks/earliest-finish.ts';

describe('earliest-finish: Sedgewick & Wayne jobsPC', () => {
  // Source: R. Sedgewick & K. Wayne, Algorithms, 4th ed. (Addison-Wesley, 2011),
  // §4.4, "Parallel job scheduling" (critical path method), the 10-job example
  // jobsPC.txt and its solution table of start times; FROM MEMORY of the book.
  const durations = [41, 51, 50, 36, 38, 45, 21, 32, 32, 29];
  const mustPrecede: Record<number, number[]> = { 0: [1, 7, 9], 1: [2], 6: [3, 8], 7: [3, 8], 8: [2], 9: [4, 6] };
  const bookStart = [0, 41, 123, 91, 70, 0, 70, 41, 91, 41];

  it('reproduces the start times and the 173 finish time', () => {
    const predecessors: number[][] = durations.map(() => []);
    for (const [u, list] of Object.entries(mustPrecede)) for (const v of list) predecessors[v]!.push(Number(u));
    const s = earliestFinish(durations, predecessors);
    expect(s.start).toEqual(bookStart); // book table (from memory)
    expect(s.finish).toEqual(bookStart.map((t, i) => t + durations[i]!));
    expect(s.makespan).toBe(173); // book: "Finish time: 173" (from memory)
    expect(s.depth).toBe(4); // longest chain 0 -> 9 -> 6 -> 8 -> 2 (common practice: count edges)
  });

  it('reproduces them through the task on the same DAG', () => {
    const g = new Graph({ type: 'directed' });
    for (let i = 0; i < 10; i++) g.addNode(String(i));
    for (const [u, list] of Object.entries(mustPrecede)) for (const v of list) g.addEdge(String(u), String(v), { weight: 1 });
    const inst = earliestFinishTask.instance(g, { rng: new Rng(1), weightScale: 1 });
    // The task draws its own durations; recompute with the book's durations through iterate:
    const withBook = { ...inst, nodeInputs: durations.map((d) => [d]) };
    expect(earliestFinishTask.iterate!(g, withBook, 10)).toEqual(bookStart.map((t, i) => t + durations[i]!));
    expect(inst.messageSrc.length).toBe(g.size);
    expect(inst.depth).toBe(4);
  });
});

describe('earliest-finish against a brute-force recursion on random DAGs', () => {
  it('matches F(v) = d(v) + max over predecessors F(u) evaluated by plain recursion', () => {
    const rng = new Rng(11);
    for (let k = 0; k < 150; k++) {
      const n = rng.int(2, 14);
      const graph = getFamily('dag').generate({ nodes: n, weightRange: [1, 10], rng: rng.fork(k) });
      const inst = earliestFinishTask.instance(graph, { rng: rng.fork(`t${k}`), weightScale: 1, weightRange: [0.5, 3] });
      const d = inst.extras!['durations'] as number[];
      d.forEach((x) => {
        expect(x).toBeGreaterThanOrEqual(0.5);
        expect(x).toBeLessThanOrEqual(3);
      });
      // Common practice: the critical-path recurrence, evaluated without memo or ordering.
      const F = (v: number): number => d[v]! + Math.max(0, ...graph.inNeighbors(String(v)).map((u) => F(Number(u))));
      // Longest chain in edges, same way.
      const L = (v: number): number => Math.max(0, ...graph.inNeighbors(String(v)).map((u) => L(Number(u)) + 1));
      for (let v = 0; v < n; v++) expect(inst.target[v]).toBeCloseTo(F(v), 12);
      expect(inst.depth).toBe(Math.max(...Array.from({ length: n }, (_, v) => L(v))));
      expect(inst.mask.every((m) => m === 1)).toBe(true);
      expect(inst.nodeInputs.map((f) => f[0])).toEqual(d);
      // Edge input: the lower median duration (by hand: sort, index ⌊(n − 1)/2⌋) on every edge.
      const median = [...d].sort((a, b) => a - b)[(n - 1) >> 1]!;
      expect(inst.edgeInputs).toEqual(inst.messageSrc.map(() => [median]));
      // Our order is a valid topological order; so is graphology-dag's (used as an outside check of acyclicity).
      expect(topologicalSort(graph).length).toBe(n);
      // iterate is exact after `depth` rounds. Fewer can suffice for particular
      // durations (a short heavy chain can beat the longest one), but with equal
      // durations f(v) = 1 + longest chain into v, which needs all `depth` rounds.
      expect(earliestFinishTask.iterate!(graph, inst, inst.depth)).toEqual(inst.target);
      const unit = { ...inst, nodeInputs: d.map(() => [1]) };
      const unitTarget = Array.from({ length: n }, (_, v) => 1 + L(v));
      expect(earliestFinishTask.iterate!(graph, unit, inst.depth)).toEqual(unitTarget);
      if (inst.depth > 0) expect(earliestFinishTask.iterate!(graph, unit, inst.depth - 1)).not.toEqual(unitTarget);
    }
  });

  it('applies the scale shift to the durations it draws', () => {
    const g = getFamily('dag').generate({ nodes: 12, weightRange: [1, 10], rng: new Rng(3) });
    const a = earliestFinishTask.instance(g, { rng: new Rng(4), weightScale: 1 });
    const b = earliestFinishTask.instance(g, { rng: new Rng(4), weightScale: 8 });
    b.target.forEach((t, i) => expect(t).toBeCloseTo(8 * a.target[i]!, 9));
  });

  it('refuses cycles and undirected graphs', () => {
    expect(() => earliestFinish([1, 1], [[1], [0]])).toThrow('tasks/earliest-finish: the precedence constraints contain a cycle');
    const g = getFamily('path').generate({ nodes: 3, weightRange: [1, 1], rng: new Rng(1) });
    expect(() => earliestFinishTask.instance(g, { rng: new Rng(1), weightScale: 1 })).toThrow('tasks/earliest-finish: needs a directed acyclic graph');
  });
});
