/**
 * The run bar's time estimate against the wall times written into the
 * shipped presets' expectations (measured by bench/presets.ts on 2 cores).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { validateSpec } from '../../src/experiment/check.ts';
import { estimateCost } from '../../src/experiment/cost.ts';
import { planRuns } from '../../src/experiment/plan.ts';

const ROOT = resolve(import.meta.dirname, '../..');

function measured(preset: string): { spec: ReturnType<typeof validateSpec>; seconds: number } {
  const raw = JSON.parse(readFileSync(join(ROOT, 'presets', `${preset}.json`), 'utf8')) as { expectation: string };
  // The latest timing: the bench's sentence for the current engine (fused process kernels).
  const m = /fused process kernels \([^)]*\): (\d+) s on 2 cores/.exec(raw.expectation);
  if (!m) throw new Error(`${preset}: no "… fused process kernels (…): T s on 2 cores" in its expectation`);
  return { spec: validateSpec(raw), seconds: Number(m[1]) };
}

function estimate(preset: string): { predicted: number; seconds: number } {
  const { spec, seconds } = measured(preset);
  const arms = planRuns(spec).map((p) => p.armIndex);
  return { predicted: estimateCost(spec, arms, 2).wallSeconds, seconds };
}

describe('cost model', () => {
  it('reproduces its two calibration presets within 15%', () => {
    for (const preset of ['quick-demo', 'shortest-path-max-vs-sum']) {
      const { predicted, seconds } = estimate(preset);
      expect(predicted / seconds, preset).toBeGreaterThan(0.85);
      expect(predicted / seconds, preset).toBeLessThan(1.15);
    }
  });

  it('stays within a factor of two of every other timed preset', () => {
    for (const preset of ['hop-count-min-vs-mean-on-grids', 'shortest-path-hard-vs-smooth-max', 'earliest-finish-max-vs-sum', 'shortest-path-bias-vs-bias-free']) {
      const { predicted, seconds } = estimate(preset);
      expect(predicted / seconds, `${preset}: ${predicted.toFixed(0)} s predicted, ${seconds} s measured`).toBeGreaterThan(0.5);
      expect(predicted / seconds, `${preset}: ${predicted.toFixed(0)} s predicted, ${seconds} s measured`).toBeLessThan(2);
    }
  });

  it('spreads runs over workers, never below the longest run, and costs nothing when nothing is left', () => {
    const { spec } = measured('quick-demo');
    const one = estimateCost(spec, [0, 1, 0, 1], 1);
    const four = estimateCost(spec, [0, 1, 0, 1], 4);
    expect(four.wallSeconds).toBeCloseTo(one.wallSeconds / 4, 6);
    expect(estimateCost(spec, [0], 8).wallSeconds).toBeCloseTo(one.workerSeconds / 4, 6);
    expect(estimateCost(spec, [], 2)).toEqual({ runs: 0, workerSeconds: 0, wallSeconds: 0 });
  });

  it('rescales by the median measured / modelled ratio of runs already finished here', () => {
    const { spec } = measured('quick-demo');
    const plain = estimateCost(spec, [0, 1], 1);
    const perRun = plain.workerSeconds / 2;
    const slow = estimateCost(spec, [0, 1], 1, [
      { armIndex: 0, seconds: 3 * perRun },
      { armIndex: 1, seconds: 2 * perRun },
      { armIndex: 0, seconds: 50 * perRun },
    ]);
    expect(slow.workerSeconds).toBeCloseTo(3 * plain.workerSeconds, 6);
    expect(estimateCost(spec, [0, 1], 1, [{ armIndex: 0, seconds: NaN }]).workerSeconds).toBeCloseTo(plain.workerSeconds, 6);
  });
});
