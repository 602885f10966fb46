/**
 * The trivial baselines: each optimal constant really is optimal for its
 * metric, checked against a brute-force scan of candidate constants scored by
 * the same metric code the networks are scored with.
 *
 * Reference facts (textbook; common practice): a median minimises the mean
 * absolute deviation; a weighted median minimises a weighted sum of absolute
 * deviations (here weights 1/|t|, the relative error).
 */
import { describe, expect, it } from 'vitest';
import { constantBaselines, constantMetrics, countedTargets, optimalConstant, optimalConstants, weightedMedian } from '../../src/train/baselines.ts';
import type { TaskInstance } from '../../src/tasks/types.ts';
import { Rng } from '../../src/util/rng.ts';

function instance(target: number[], mask = target.map(() => 1)): TaskInstance {
  return {
    nodes: target.length,
    nodeInputs: target.map(() => [0]),
    messageSrc: [],
    messageDst: [],
    edgeInputs: [],
    target,
    mask,
    depth: 1,
  };
}

function bruteForceBest(instances: TaskInstance[], metric: 'mae' | 'mre' | 'miss'): number {
  const targets = countedTargets(instances);
  const lo = Math.min(...targets) - 1;
  const hi = Math.max(...targets) + 1;
  let best = Infinity;
  for (let k = 0; k <= 20000; k++) {
    const c = lo + ((hi - lo) * k) / 20000;
    best = Math.min(best, constantMetrics(instances, c)[metric]);
  }
  // The candidates themselves and their tolerance edges, where optima of piecewise-linear metrics sit.
  for (const t of targets) for (const c of [t, t * 0.95, t * 1.05, t - 0.05, t + 0.05]) best = Math.min(best, constantMetrics(instances, c)[metric]);
  return best;
}

describe('constant baselines', () => {
  it('median for mae, with masked nodes left out (hand-worked)', () => {
    const set = [instance([0, 1, 2, 100, 7], [0, 1, 1, 1, 1])];
    // Counted targets 1, 2, 7, 100: any c in [2, 7] gives mean |c − t| = (1 + 0 + 5 + 98)/4 = 26 at c = 2.
    expect(optimalConstant('mae', countedTargets(set))).toBe(2);
    expect(constantMetrics(set, 2).mae).toBe(26);
    expect(constantMetrics(set, 7).mae).toBe(26);
  });

  it('weighted median', () => {
    expect(weightedMedian([1, 2, 3], [1, 1, 1])).toBe(2);
    expect(weightedMedian([1, 2, 3], [10, 1, 1])).toBe(1);
    expect(weightedMedian([], [])).toBeNaN();
  });

  it('each metric’s constant is as good as the best of a fine scan', () => {
    const rng = new Rng(11);
    for (let trial = 0; trial < 5; trial++) {
      const set = [0, 1, 2].map(() => instance(Array.from({ length: 9 }, () => Math.round(rng.uniform(0, 30) * 10) / 10)));
      const targets = countedTargets(set);
      for (const metric of ['mae', 'mre', 'miss'] as const) {
        const c = optimalConstant(metric, targets);
        const got = constantMetrics(set, c)[metric];
        expect(got).toBeLessThanOrEqual(bruteForceBest(set, metric) + 1e-12);
      }
    }
  });

  it('miss: the point inside the most tolerance intervals', () => {
    // Tolerance max(5%·t, 0.05): 10 → [9.5, 10.5], 10.4 → [9.88, 10.92], 11 → [10.45, 11.55], 40 → [38, 42].
    const set = [instance([10, 10.4, 11, 40])];
    const c = optimalConstant('miss', countedTargets(set));
    expect(constantMetrics(set, c).miss).toBe(0.25);
  });

  it('reports the rung’s own best constant and the training constant scored on the rung', () => {
    const rung = [instance([4, 5, 6])];
    const b = constantBaselines(rung, optimalConstants([1, 1, 1, 2]));
    expect(b.bestConstant.mae).toBe(5);
    expect(b.best.mae).toBeCloseTo(2 / 3, 12);
    expect(b.trainConstant.mae).toBe(1);
    expect(b.train.mae).toBeCloseTo((3 + 4 + 5) / 3, 12);
    expect(b.train.mae).toBeGreaterThan(b.best.mae);
  });
});
