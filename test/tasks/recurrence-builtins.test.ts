/**
 * The recurrence task reproduces the built-in path tasks bit for bit: for every
 * graph family a built-in task accepts, the same (family, size, rng) through
 * the built-in task and through its recurrence gives the same source, mask and
 * targets under Object.is, at weight scale 1 and at a scale-shift rung.
 */
import { describe, expect, it } from 'vitest';
import { Rng } from '../../src/util/rng.ts';
import { getFamily } from '../../src/graphs/registry.ts';
import { buildInstance } from '../../src/tasks/sample.ts';
import { getTask } from '../../src/tasks/registry.ts';
import type { RecurrenceSpec } from '../../src/tasks/recurrence/options.ts';
import type { TaskInstance } from '../../src/tasks/types.ts';

const EQUIVALENT: Array<{ builtin: string; recurrence: RecurrenceSpec; sameInputs: boolean }> = [
  { builtin: 'shortest-path', recurrence: { semiring: 'min-plus', source: 'drawn', others: 'edge-weights', direction: 'forward' }, sameInputs: true },
  // hop-count's node input is the marker isSource; the recurrence gives 1 − isSource (0 at the source, median factor 1 elsewhere).
  { builtin: 'hop-count', recurrence: { semiring: 'min-plus', source: 'drawn', others: 'unit', direction: 'forward' }, sameInputs: false },
  { builtin: 'widest-path', recurrence: { semiring: 'max-min', source: 'drawn-widest-edge', others: 'edge-weights', direction: 'forward' }, sameInputs: true },
  { builtin: 'earliest-finish', recurrence: { semiring: 'max-plus', source: 'none', others: 'node-weights', direction: 'forward' }, sameInputs: true },
];

function sameBits(a: readonly number[], b: readonly number[]): boolean {
  return a.length === b.length && a.every((x, i) => Object.is(x, b[i]));
}

function firstDifference(a: TaskInstance, b: TaskInstance): string | null {
  if (a.source !== b.source) return `source ${a.source} vs ${b.source}`;
  if (!sameBits(a.mask, b.mask)) return 'mask';
  const i = a.target.findIndex((t, k) => !Object.is(t, b.target[k]));
  return i >= 0 || a.target.length !== b.target.length ? `target at node ${i}: ${a.target[i]} vs ${b.target[i]}` : null;
}

describe('recurrence reproduces the built-in targets exactly', () => {
  for (const { builtin, recurrence, sameInputs } of EQUIVALENT) {
    const ref = { recurrence };
    const task = getTask(builtin);
    it(`${builtin}: the recurrence accepts every family the built-in accepts`, () => {
      expect(getTask(ref).families).toEqual(expect.arrayContaining(task.families));
    });
    for (const family of task.families) {
      it(`${builtin} on '${family}': 60 graphs, scales 1 and 3`, () => {
        const rng = new Rng(16).fork(builtin).fork(family);
        for (let k = 0; k < 60; k++) {
          const n = rng.int(Math.max(3, getFamily(family).minNodes), 48);
          for (const weightScale of [1, 3]) {
            const options = { weightRange: [0.5, 10] as const, weightScale };
            const a = buildInstance(builtin, family, n, rng.fork(k), options).instance;
            const b = buildInstance(ref, family, n, rng.fork(k), options).instance;
            expect(firstDifference(a, b), `graph ${k}, ${n} nodes, scale ${weightScale}`).toBeNull();
            expect(sameBits(a.messageSrc, b.messageSrc) && sameBits(a.messageDst, b.messageDst)).toBe(true);
            if (sameInputs) {
              expect(sameBits(a.nodeInputs.flat(), b.nodeInputs.flat())).toBe(true);
              expect(sameBits(a.edgeInputs.flat(), b.edgeInputs.flat())).toBe(true);
            } else {
              expect(b.nodeInputs.map((r) => r[0])).toEqual(a.nodeInputs.map((r) => 1 - r[0]!));
            }
            // Depth: rounds that changed something. earliest-finish reports its longest chain, which bounds them.
            if (builtin === 'earliest-finish') expect(b.depth).toBeLessThanOrEqual(a.depth);
            else expect(b.depth).toBe(a.depth);
          }
        }
      });
    }
  }

  it('per-round states agree with the built-in iterate where both start alike', () => {
    const rng = new Rng(7);
    for (let k = 0; k < 20; k++) {
      const a = buildInstance('shortest-path', 'er', 20, rng.fork(k));
      const b = buildInstance({ recurrence: EQUIVALENT[0]!.recurrence }, 'er', 20, rng.fork(k));
      for (let r = 0; r <= a.instance.depth + 1; r++) {
        expect(sameBits(b.task.iterate!(b.graph, b.instance, r), a.task.iterate!(a.graph, a.instance, r))).toBe(true);
      }
    }
  });
});
