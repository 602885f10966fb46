/**
 * The fingerprint of a set of runs is the same whether it is taken from the
 * runs in memory or after they went through JSON (a results file, a journal
 * for --resume, shards for merge), which writes NaN and ±Infinity as null
 * (ECMA-262, JSON.stringify: non-finite numbers serialise as "null").
 */
import { describe, expect, it } from 'vitest';
import { fingerprint } from '../../src/experiment/results.ts';
import { planRuns } from '../../src/experiment/plan.ts';
import type { RunResult } from '../../src/experiment/run.ts';
import { unmeasuredResult } from '../../src/experiment/run-record.ts';
import { tinySpec } from '../helpers.ts';

function runsWith(values: number[]): RunResult[] {
  const spec = tinySpec({ seeds: { count: 2, base: 1 } });
  return planRuns(spec).map((plan, i) => ({
    ...unmeasuredResult(plan, i === 0 ? 'diverged' : 'ok'),
    inDistribution: { mae: values[i % values.length]!, mre: 0.01, miss: 0, nodes: 10 },
    ladder: spec.test.sizes.map((size) => ({
      family: spec.train.family,
      size,
      scale: 1,
      metrics: { mae: values[(i + size) % values.length]!, mre: 0.2, miss: 0.5, nodes: 10 },
      depthMean: 3,
      depthMax: 4,
      meanDegree: 3,
    })),
  })) as RunResult[];
}

describe('fingerprint', () => {
  it('is unchanged by a JSON round trip when some metrics are NaN or infinite', () => {
    const runs = runsWith([NaN, Infinity, 0.25, -Infinity]);
    const viaJson = JSON.parse(JSON.stringify(runs)) as RunResult[];
    expect(fingerprint(viaJson)).toBe(fingerprint(runs));
  });

  it('still changes when a finite metric changes', () => {
    expect(fingerprint(runsWith([0.25, 0.5]))).not.toBe(fingerprint(runsWith([0.25, 0.5001])));
  });
});
