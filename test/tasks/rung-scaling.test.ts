/**
 * The weight-scale rung, task by task: building an instance at scale c (same
 * graph, same rng) multiplies every input by c^p and the target by c^p, with
 * the powers `rungScaling` declares. Where an input is a weight or a duration
 * (or one of them selected, like a median) the match is exact, bit for bit;
 * where the task recomputes it (charge-potential distances from scaled
 * positions) to float rounding. Targets that are sums (distances, finish
 * times, potentials) match to float rounding.
 */
import { describe, expect, it } from 'vitest';
import { Rng } from '../../src/util/rng.ts';
import { buildInstance } from '../../src/tasks/sample.ts';
import { tasks } from '../../src/tasks/registry.ts';
import { rungScaling, scaleLikeRung, scalesEverythingTogether } from '../../src/tasks/rung-scaling.ts';
import type { TaskInstance } from '../../src/tasks/types.ts';

const FACTORS = [2, 10, 0.1, 3.7];
/** Inputs the task recomputes from scaled positions rather than multiplying: compared to float rounding. */
const RECOMPUTED: Record<string, boolean> = { 'charge-potential': true };

/** Largest |b − c^p·a| / max(|c^p·a|, tiny) over all entries; Object.is-exact entries count as 0. */
function worstRelative(a: readonly number[], b: readonly number[], want: (x: number) => number): number {
  expect(b.length).toBe(a.length);
  let worst = 0;
  a.forEach((x, i) => {
    const w = want(x);
    if (Object.is(b[i], w)) return;
    worst = Math.max(worst, Math.abs(b[i]! - w) / Math.max(Math.abs(w), 1e-300));
  });
  return worst;
}

function columns(rows: readonly (readonly number[])[], j: number): number[] {
  return rows.map((r) => r[j]!);
}

function built(task: string, family: string, nodes: number, seed: number, factor: number): TaskInstance {
  return buildInstance(task, family, nodes, new Rng(seed).fork(`${task}:${family}`), { weightScale: factor, params: family === 'er' ? { meanDegree: 3 } : undefined }).instance;
}

describe('the weight-scale rung scales inputs and targets as each task declares', () => {
  for (const task of Object.values(tasks)) {
    it(`${task.id}: inputs at scale c are c^p × inputs at scale 1 (same graph and rng), targets c^p ×`, () => {
      const scaling = rungScaling(task.id);
      for (const family of task.families) {
        for (const seed of [1, 2, 3]) {
          const one = built(task.id, family, 11, seed, 1);
          for (const c of FACTORS) {
            const at = built(task.id, family, 11, seed, c);
            // The graph and the drawn structure are the same: only values change.
            expect(at.messageSrc).toEqual(one.messageSrc);
            expect(at.messageDst).toEqual(one.messageDst);
            expect(at.mask).toEqual(one.mask);
            expect(at.source).toBe(one.source);
            const exact = !RECOMPUTED[task.id];
            const check = (a: number[], b: number[], p: number, what: string) => {
              const worst = worstRelative(a, b, (x) => (p === 0 ? x : p === 1 ? x * c : x * c ** p));
              if (exact && p !== -1) expect(worst, `${task.id} on ${family}, c = ${c}: ${what} must be exactly c^${p} ×`).toBe(0);
              else expect(worst, `${task.id} on ${family}, c = ${c}: ${what}`).toBeLessThan(1e-12);
            };
            scaling.node.forEach((p, j) => check(columns(one.nodeInputs, j), columns(at.nodeInputs, j), p, `node input ${task.nodeFeatureNames[j]}`));
            scaling.edge.forEach((p, j) => check(columns(one.edgeInputs, j), columns(at.edgeInputs, j), p, `edge input ${task.edgeFeatureNames[j]}`));
            // Targets: sums round differently at another scale, so to float rounding (exact where the target is a weight or a count).
            const worst = worstRelative(one.target, at.target, (x) => x * c ** scaling.target);
            expect(worst, `${task.id} on ${family}, c = ${c}: target`).toBeLessThan(1e-12);
            // The audit's stand-in for the rung: bit-identical inputs where the task multiplies by c.
            const copy = scaleLikeRung(one, scaling, c);
            if (exact) {
              expect(copy.nodeInputs).toEqual(at.nodeInputs);
              expect(copy.edgeInputs).toEqual(at.edgeInputs);
            }
          }
        }
      }
    });
  }

  it('weight-carrying tasks scale every input and the target together; hop-count, descendant-count and charge-potential do not', () => {
    expect(Object.keys(tasks).filter((id) => scalesEverythingTogether(rungScaling(id))).sort()).toEqual(['earliest-finish', 'shortest-path', 'widest-path']);
    expect(rungScaling('hop-count')).toEqual({ node: [0], edge: [0], target: 0 });
    expect(rungScaling('charge-potential')).toEqual({ node: [0], edge: [1], target: -1 });
  });

  it('catches an input that does not scale (a constant source marker, as isSource = 1 was)', () => {
    const one = built('shortest-path', 'er', 11, 1, 1);
    const at = built('shortest-path', 'er', 11, 1, 10);
    const constantMarker = (inst: TaskInstance) => inst.nodeInputs.map((r) => (r[0] === 0 ? 1 : 0));
    // 1 at the source at both scales: the ratio is 1, not 10.
    expect(worstRelative(constantMarker(one), constantMarker(at), (x) => x * 10)).toBeGreaterThan(0.5);
  });

  it('refuses unknown tasks and bad factors, naming where the error comes from', () => {
    expect(() => rungScaling('sorting')).toThrow("tasks/registry: unknown task 'sorting'");
    const one = built('widest-path', 'grid', 9, 1, 1);
    expect(() => scaleLikeRung(one, rungScaling('widest-path'), 0)).toThrow('tasks/rung-scaling: factor must be a finite number > 0');
    expect(() => scaleLikeRung(one, { node: [1, 1], edge: [1], target: 1 }, 2)).toThrow('tasks/rung-scaling: node row has 1 features, the scaling lists 2');
  });
});
