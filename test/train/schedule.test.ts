/**
 * Learning-rate schedules and the L1 penalty. The warm-up/cosine values are
 * worked by hand from the definition (linear warm-up, then
 * floor + (base − floor)·½(1 + cos πt); common practice).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { initBackend } from '../../src/engine/backend.ts';
import { learningRateAt } from '../../src/train/schedule.ts';
import { executeRun } from '../../src/experiment/run.ts';
import { planRuns } from '../../src/experiment/plan.ts';
import { tinySpec } from '../helpers.ts';

describe('learningRateAt', () => {
  const s = { kind: 'warmup-cosine' as const, warmup: 10, floor: 0.1 };
  it('rises linearly over the warm-up, then follows a cosine down to the floor', () => {
    expect(learningRateAt(0.01, s, 1, 110)).toBeCloseTo(0.001, 15);
    expect(learningRateAt(0.01, s, 10, 110)).toBeCloseTo(0.01, 15);
    // Halfway through the decay (step 60 of 10..110): floor + (base − floor)·½ = 0.001 + 0.0045.
    expect(learningRateAt(0.01, s, 60, 110)).toBeCloseTo(0.0055, 15);
    expect(learningRateAt(0.01, s, 110, 110)).toBeCloseTo(0.001, 15);
  });
  it('constant or absent schedules keep the rate', () => {
    expect(learningRateAt(0.01, null, 5, 10)).toBe(0.01);
    expect(learningRateAt(0.01, { kind: 'constant', warmup: 0, floor: 0 }, 5, 10)).toBe(0.01);
  });
});

describe('training switches in a real run', () => {
  beforeAll(async () => {
    await initBackend('wasm');
  });
  const plan = (spec: ReturnType<typeof tinySpec>) => planRuns(spec)[0]!;

  it('a stated constant schedule is bit-identical to no schedule; a cosine one changes the run', () => {
    const base = tinySpec();
    const constant = tinySpec({ budget: { ...base.budget, schedule: { kind: 'constant', warmup: 0, floor: 0 } } });
    const cosine = tinySpec({ budget: { ...base.budget, schedule: { kind: 'warmup-cosine', warmup: 5, floor: 0.1 } } });
    const a = executeRun(base, plan(base));
    const b = executeRun(constant, plan(constant));
    const c = executeRun(cosine, plan(cosine));
    expect(b.lossCurve).toEqual(a.lossCurve);
    expect(b.ladder).toEqual(a.ladder);
    expect(c.lossCurve).not.toEqual(a.lossCurve);
  });

  it('an L1 penalty pulls the weight matrices towards zero', () => {
    const base = tinySpec();
    const l1 = tinySpec({ arms: [{ ...base.arms[0]!, sparsity: 0.05 }, base.arms[1]!] });
    const weights: Array<Map<string, Float32Array>> = [];
    for (const spec of [base, l1]) {
      executeRun(spec, plan(spec), {
        keepNetwork: (network) => {
          weights.push(network.params.snapshot());
          network.dispose();
        },
      });
    }
    const l1Norm = (w: Map<string, Float32Array>) =>
      [...w.entries()].filter(([name]) => !/\.b\w*$/.test(name)).reduce((sum, [, v]) => sum + v.reduce((s, x) => s + Math.abs(x), 0), 0);
    expect(l1Norm(weights[1]!)).toBeLessThan(l1Norm(weights[0]!));
  });
});
