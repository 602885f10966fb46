/**
 * The comparison over runs: the fit gate per arm, the trivial baselines per rung,
 * Holm adjustment across every (rung, pair) test, a declared primary rung, and
 * blown-up runs ranked as the worst outcome. Runs are made up so every number
 * below can be worked by hand.
 */
import { describe, expect, it } from 'vitest';
import { compareRuns } from '../../src/experiment/compare.ts';
import { planRuns } from '../../src/experiment/plan.ts';
import type { RunResult } from '../../src/experiment/run.ts';
import { unmeasuredResult } from '../../src/experiment/run-record.ts';
import type { ConstantBaselines } from '../../src/train/baselines.ts';
import { tinySpec } from '../helpers.ts';

const SEEDS = 8;

function baseline(best: number): ConstantBaselines {
  return {
    best: { mae: best, mre: 0.4, miss: 0.9 },
    train: { mae: best * 1.5, mre: 0.6, miss: 0.95 },
    bestConstant: { mae: 3, mre: 2, miss: 3 },
    trainConstant: { mae: 4, mre: 2.5, miss: 4 },
  };
}

interface Shape {
  /** Error of arm a on seed index s at size. */
  error: (arm: number, seed: number, size: number) => number;
  fitMre?: (arm: number, seed: number) => number;
  status?: (arm: number, seed: number) => RunResult['status'];
  constant?: number;
}

function runs(spec: ReturnType<typeof tinySpec>, shape: Shape): RunResult[] {
  return planRuns(spec).map((plan) => {
    const status = shape.status?.(plan.armIndex, plan.seedIndex) ?? 'ok';
    const base = { ...unmeasuredResult(plan, status), stepsDone: spec.budget.steps, keptStep: spec.budget.steps, parameters: 10, seconds: 1 };
    if (status !== 'ok') return base;
    return {
      ...base,
      inDistribution: { mae: 0.1, mre: shape.fitMre?.(plan.armIndex, plan.seedIndex) ?? 0.01, miss: 0, nodes: 50 },
      ladder: spec.test.sizes.map((size) => {
        const e = shape.error(plan.armIndex, plan.seedIndex, size);
        return {
          family: spec.train.family,
          size,
          scale: 1,
          metrics: { mae: e, mre: e / 4, miss: 0.5, nodes: 50 },
          baseline: baseline(shape.constant ?? 2),
          depthMean: 3,
          depthMax: 4,
          meanDegree: 3,
        };
      }),
    };
  });
}

const spec = (over: Parameters<typeof tinySpec>[0] = {}) => tinySpec({ seeds: { count: SEEDS, base: 1 }, ...over });
// Arm 0 beats arm 1 on every seed at every size (by 0.5 + a little per seed).
const clearWin: Shape = { error: (arm, seed, size) => size / 10 + arm * (0.5 + 0.01 * seed) };

describe('compareRuns', () => {
  it('adjusts every (rung, pair) test together with Holm and decides from the adjusted p', () => {
    const s = spec();
    const c = compareRuns(s, runs(s, clearWin));
    expect(c.adjustment).toEqual({ method: 'holm', tests: 2 });
    // 8 of 8 pairs for max: raw exact two-sided p = 2/2^8 at both rungs (common practice); Holm: 2·p, then max(2p, p) = 2p.
    for (const rung of c.rungs) {
      const v = rung.pairs[0]!.verdict;
      expect(v.pRaw).toBe(2 / 256);
      expect(v.pAdjusted).toBe(4 / 256);
      expect(v.kind).toBe('a-better');
    }
  });

  it('tests only a declared primary rung and leaves the rest descriptive', () => {
    const s = spec({ test: { sizes: [8, 12], graphsPerRung: 4, validationGraphs: 8, primary: { size: 12, scale: 1 } } });
    const c = compareRuns(s, runs(s, clearWin));
    expect(c.adjustment).toEqual({ method: 'primary', tests: 1 });
    const [small, large] = c.rungs;
    expect(small!.tested).toBe(false);
    expect(small!.pairs[0]!.verdict.kind).toBe('not-tested');
    expect(large!.tested).toBe(true);
    expect(large!.pairs[0]!.verdict.pAdjusted).toBe(2 / 256);
    expect(large!.pairs[0]!.verdict.kind).toBe('a-better');
  });

  it('calls no winner when an arm misses the fit gate, and gives the numbers', () => {
    const s = spec();
    // sum reaches 8% in distribution on 6 of 8 seeds: median 8% > the default 5% gate.
    const c = compareRuns(s, runs(s, { ...clearWin, fitMre: (arm, seed) => (arm === 1 && seed < 6 ? 0.08 : 0.01) }));
    expect(c.fit.map((f) => f.fitted)).toEqual([true, false]);
    expect(c.fit[1]!.median).toBeCloseTo(0.08, 12);
    expect(c.fit[1]!.passing).toBe(2);
    expect(c.fit[1]!.message).toMatch(/sum is not fitted: .* 8% \(median of 8 seeds; 2 within the gate\), above the fit gate of 5%\. Train longer or raise the budget\./);
    for (const rung of c.rungs) {
      expect(rung.pairs[0]!.verdict.kind).toBe('not-fitted');
      expect(rung.pairs[0]!.verdict.caveats).toContain(c.fit[1]!.message);
    }
  });

  it('a preset may set its own gate', () => {
    const s = spec({ budget: { steps: 20, batchGraphs: 8, learningRate: 0.003, clipNorm: 1, loss: 'huber', validateEvery: 10, fitGate: 0.1 } });
    const c = compareRuns(s, runs(s, { ...clearWin, fitMre: (arm) => (arm === 1 ? 0.08 : 0.01) }));
    expect(c.fit.map((f) => f.fitted)).toEqual([true, true]);
    expect(c.fit[0]!.gate).toBe(0.1);
  });

  it('counts a diverged run against its arm: in the fit gate and as the worst outcome at every rung', () => {
    const s = spec();
    const c = compareRuns(s, runs(s, { ...clearWin, status: (arm, seed) => (arm === 0 && seed === 0 ? 'diverged' : 'ok') }));
    const max = c.rungs[1]!.arms[0]!;
    expect(max.nonFinite).toBe(1);
    expect(max.summary.n).toBe(7);
    expect(max.excluded).toBe(0);
    expect(max.excludedReasons.join(' ')).toMatch(/seed 1: diverged.*ranked as the worst outcome/);
    expect(max.beatsConstant).toBe(false);
    const v = c.rungs[1]!.pairs[0]!.verdict;
    // 7 pairs favour max, the blown-up pair favours sum with the largest rank: W+ = 8, W- = 28.
    expect(v.n).toBe(8);
    expect(v.wilcoxon.wPlus).toBe(8);
    expect(v.nonFiniteA).toBe(1);
    expect(c.fit[0]!.values.filter((x) => x === Infinity)).toHaveLength(1);
    // A cancelled run is missing, not a failure.
    const cancelled = compareRuns(s, runs(s, { ...clearWin, status: (arm, seed) => (arm === 0 && seed === 0 ? 'cancelled' : 'ok') }));
    expect(cancelled.rungs[1]!.arms[0]!.excluded).toBe(1);
    expect(cancelled.rungs[1]!.arms[0]!.nonFinite).toBe(0);
    expect(cancelled.rungs[1]!.pairs[0]!.verdict.n).toBe(7);
  });

  it('reports both baselines per rung and refuses to crown an arm a constant beats', () => {
    const s = spec();
    // Both arms are worse than the best constant (0.5) at both rungs: max still has the lower error.
    const c = compareRuns(s, runs(s, { ...clearWin, constant: 0.5 }));
    for (const rung of c.rungs) {
      expect(rung.baseline.best).toBe(0.5);
      expect(rung.baseline.train).toBeCloseTo(0.75, 12);
      expect(rung.baseline.bestRelative).toBeCloseTo(0.4, 12);
      expect(rung.noArmBeatsConstant).toBe(true);
      expect(rung.arms.map((a) => a.beatsConstant)).toEqual([false, false]);
      expect(rung.pairs[0]!.verdict.kind).toBe('no-skill');
    }
    const fine = compareRuns(s, runs(s, { ...clearWin, constant: 5 }));
    expect(fine.rungs.every((r) => !r.noArmBeatsConstant)).toBe(true);
    expect(fine.rungs[0]!.arms[0]!.constantWins).toBe(SEEDS);
    expect(fine.rungs[0]!.arms[0]!.relative).toBeCloseTo(0.8 / 4, 12);
  });

  it('says when validation reached the gate, and when it never did', () => {
    const s = spec();
    const made = runs(s, clearWin).map((r) => ({
      ...r,
      validationCurve:
        r.armIndex === 0
          ? [{ step: 50, value: 1, relative: 0.2 }, { step: 100, value: 0.1, relative: 0.04 + 0.001 * r.seedIndex }]
          : [{ step: 50, value: 1, relative: 0.2 }, { step: 100, value: 0.5, relative: r.seedIndex < 5 ? 0.09 : 0.03 }],
    }));
    const c = compareRuns(s, made);
    expect(c.fit[0]!.gateStep).toBe(100);
    // 5 of 8 runs of sum never reach 5% on validation: the median is infinite.
    expect(c.fit[1]!.gateStep).toBe(Infinity);
    expect(compareRuns(s, runs(s, clearWin)).fit[0]!.gateStep).toBeNull();
  });
});
