/** sampleGraphs / buildInstance: shape, seeding, scale shift, refusals. */
import { describe, expect, it } from 'vitest';
import { Rng } from '../../src/util/rng.ts';
import { buildInstance, sampleGraphs } from '../../src/tasks/sample.ts';
import { getTask, tasks } from '../../src/tasks/registry.ts';
import { families } from '../../src/graphs/registry.ts';

describe('sampleGraphs', () => {
  it('returns plain graphs with targets, masks and depth for every valid combination', () => {
    for (const task of Object.values(tasks)) {
      for (const family of task.families) {
        const s = sampleGraphs({ task: task.id, family, nodes: 10, count: 3, seed: 5 });
        expect(s.task).toBe(task.id);
        expect(s.family).toBe(family);
        expect(s.seed).toBe(5);
        expect(s.graphs.length).toBe(3);
        for (const g of s.graphs) {
          expect(g.directed).toBe(families[family]!.directed);
          expect(g.target.length).toBe(g.nodes);
          expect(g.mask.length).toBe(g.nodes);
          expect(Number.isInteger(g.depth)).toBe(true);
          expect(g.target.every(Number.isFinite)).toBe(true);
          for (const [u, v, w] of g.edges) {
            expect(u).toBeGreaterThanOrEqual(0);
            expect(v).toBeLessThan(g.nodes);
            expect(Number.isFinite(w)).toBe(true);
          }
          if (['shortest-path', 'hop-count', 'widest-path'].includes(task.id)) expect(g.source).toBeDefined();
        }
        expect(JSON.parse(JSON.stringify(s))).toEqual(s);
      }
    }
  });

  it('puts task extras beside the core fields', () => {
    const ef = sampleGraphs({ task: 'earliest-finish', family: 'dag', nodes: 8, count: 1, seed: 1 });
    expect((ef.graphs[0]!['durations'] as number[]).length).toBe(8);
    const cp = sampleGraphs({ task: 'charge-potential', family: 'points', nodes: 6, count: 1, seed: 1 });
    expect((cp.graphs[0]!['charges'] as number[]).length).toBe(6);
    expect(cp.graphs[0]!.positions!.length).toBe(6);
  });

  it('is deterministic per seed; graph i uses Rng(seed).fork("sample").fork(i)', () => {
    const a = sampleGraphs({ task: 'shortest-path', family: 'er', nodes: 12, count: 4, seed: 9 });
    const b = sampleGraphs({ task: 'shortest-path', family: 'er', nodes: 12, count: 4, seed: 9 });
    const c = sampleGraphs({ task: 'shortest-path', family: 'er', nodes: 12, count: 4, seed: 10 });
    expect(a).toEqual(b);
    expect(c.graphs[0]!.edges).not.toEqual(a.graphs[0]!.edges);
    const third = buildInstance('shortest-path', 'er', 12, new Rng(9).fork('sample').fork(2));
    expect(third.instance.target).toEqual(a.graphs[2]!.target);
    // Graphs are paired across tasks: the same seed gives the same graph to every task on a family.
    const h = sampleGraphs({ task: 'hop-count', family: 'er', nodes: 12, count: 4, seed: 9 });
    expect(h.graphs.map((g) => g.edges)).toEqual(a.graphs.map((g) => g.edges));
  });

  it('applies the scale shift where the task says (graph weights vs task-drawn values)', () => {
    const one = sampleGraphs({ task: 'shortest-path', family: 'grid', nodes: 9, count: 2, seed: 3 });
    const ten = sampleGraphs({ task: 'shortest-path', family: 'grid', nodes: 9, count: 2, seed: 3, weightScale: 10 });
    ten.graphs.forEach((g, k) => {
      g.edges.forEach(([, , w], e) => expect(w).toBeCloseTo(10 * one.graphs[k]!.edges[e]![2], 9));
      g.target.forEach((t, i) => expect(t).toBeCloseTo(10 * one.graphs[k]!.target[i]!, 9));
    });
    const ef1 = sampleGraphs({ task: 'earliest-finish', family: 'dag', nodes: 9, count: 1, seed: 3 });
    const ef3 = sampleGraphs({ task: 'earliest-finish', family: 'dag', nodes: 9, count: 1, seed: 3, weightScale: 3 });
    expect(ef3.graphs[0]!.edges).toEqual(ef1.graphs[0]!.edges); // graph untouched ('task' scale shift)
    ef3.graphs[0]!.target.forEach((t, i) => expect(t).toBeCloseTo(3 * ef1.graphs[0]!.target[i]!, 9));
    const cp1 = sampleGraphs({ task: 'charge-potential', family: 'points', nodes: 7, count: 1, seed: 3 });
    const cp2 = sampleGraphs({ task: 'charge-potential', family: 'points', nodes: 7, count: 1, seed: 3, weightScale: 2 });
    cp2.graphs[0]!.target.forEach((t, i) => expect(t).toBeCloseTo(cp1.graphs[0]!.target[i]! / 2, 9));
    expect(getTask('earliest-finish').scaleShift).toBe('task');
    expect(getTask('shortest-path').scaleShift).toBe('graph');
  });

  it('refuses nonsensical combinations, naming task, family and the allowed families', () => {
    expect(() => sampleGraphs({ task: 'earliest-finish', family: 'grid', nodes: 9, count: 1, seed: 1 })).toThrow(
      "tasks/sample: task 'earliest-finish' does not make sense on graph family 'grid'; allowed families for 'earliest-finish': dag",
    );
    expect(() => buildInstance('charge-potential', 'er', 9, new Rng(1))).toThrow(/allowed families for 'charge-potential': points/);
    expect(() => buildInstance('descendant-count', 'er', 9, new Rng(1))).toThrow(/allowed families for 'descendant-count': dag, tree/);
  });

  it('refuses unknown ids and bad counts', () => {
    expect(() => sampleGraphs({ task: 'nope', family: 'er', nodes: 9, count: 1, seed: 1 })).toThrow(
      "tasks/registry: unknown task 'nope'; valid ids: shortest-path, hop-count, widest-path, earliest-finish, descendant-count, charge-potential",
    );
    expect(() => sampleGraphs({ task: 'hop-count', family: 'ring', nodes: 9, count: 1, seed: 1 })).toThrow(/graphs\/registry: unknown graph family 'ring'/);
    expect(() => sampleGraphs({ task: 'hop-count', family: 'er', nodes: 9, count: -1, seed: 1 })).toThrow('tasks/sample: count must be an integer >= 0');
    expect(() => sampleGraphs({ task: 'hop-count', family: 'er', nodes: 9, count: 1, seed: 1, weightScale: 0 })).toThrow('tasks/sample: weightScale must be');
  });
});
