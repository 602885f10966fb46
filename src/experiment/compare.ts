/**
 * Per-rung statistics over all finished runs: each arm's summary over seeds,
 * its extrapolation gap, and paired verdicts between arms.
 */
import type { ExperimentSpec, MetricName } from './spec.ts';
import type { RunResult } from './run.ts';
import { summarize, type Summary } from './statistics.ts';
import { verdict, type Verdict } from './verdict.ts';
import { Rng } from '../util/rng.ts';

export interface ArmRung {
  arm: string;
  armIndex: number;
  summary: Summary;
  /** Seeds of the values in `summary.values`, same order. */
  seeds: number[];
  /** Runs not counted: diverged, failed, cancelled, non-finite metric, or not yet run. */
  excluded: number;
  excludedReasons: string[];
  /** Mean error at this rung divided by mean in-distribution error (1 = no degradation). */
  gap: number;
}

export interface PairRung {
  a: string;
  b: string;
  verdict: Verdict;
}

export interface RungComparison {
  family: string;
  size: number;
  scale: number;
  /** Mean propagation depth of the exact algorithm at this rung, and mean in-degree. */
  depthMean: number;
  meanDegree: number;
  inTrainingRange: boolean;
  arms: ArmRung[];
  pairs: PairRung[];
  /** Arm names from lowest to highest mean error (arms without values last). */
  ranking: string[];
}

export interface Comparison {
  metric: MetricName;
  rungs: RungComparison[];
  /** Counts per status, so exclusions are never silent. */
  statusCounts: Record<string, number>;
}

/** Which arm pairs get a verdict: all pairs for up to 6 arms, else every arm against the first. */
export function comparedPairs(armCount: number): Array<[number, number]> {
  const pairs: Array<[number, number]> = [];
  if (armCount <= 6) {
    for (let i = 0; i < armCount; i++) for (let j = i + 1; j < armCount; j++) pairs.push([i, j]);
  } else {
    for (let j = 1; j < armCount; j++) pairs.push([0, j]);
  }
  return pairs;
}

export function rungKey(family: string, size: number, scale: number): string {
  return `${family}|${size}|${scale}`;
}

function metricOf(run: RunResult, key: string, metric: MetricName): number | null {
  if (run.status !== 'ok') return null;
  const rung = run.ladder.find((r) => rungKey(r.family, r.size, r.scale) === key);
  const v = rung?.metrics[metric];
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
}

export function compareRuns(spec: ExperimentSpec, runs: readonly RunResult[]): Comparison {
  const metric = spec.metric;
  const statusCounts: Record<string, number> = {};
  for (const r of runs) statusCounts[r.status] = (statusCounts[r.status] ?? 0) + 1;
  const expected = spec.seeds.count;
  const family = spec.test.family ?? spec.train.family;
  const rungs: RungComparison[] = [];
  const seeds = Array.from({ length: spec.seeds.count }, (_, s) => spec.seeds.base + s);
  const statsRng = new Rng(spec.seeds.base).fork('statistics');
  for (const size of spec.test.sizes) {
    for (const scale of spec.test.weightScales) {
      const key = rungKey(family, size, scale);
      // value[arm][seed]
      const table = spec.arms.map((_, a) =>
        seeds.map((seed) => {
          const run = runs.find((r) => r.armIndex === a && r.seed === seed);
          return run ? metricOf(run, key, metric) : null;
        }),
      );
      const sample = runs.find((r) => r.status === 'ok' && r.ladder.some((l) => rungKey(l.family, l.size, l.scale) === key));
      const sampleRung = sample?.ladder.find((l) => rungKey(l.family, l.size, l.scale) === key);
      const arms: ArmRung[] = spec.arms.map((arm, a) => {
        const values: number[] = [];
        const valueSeeds: number[] = [];
        const reasons: string[] = [];
        table[a]!.forEach((v, s) => {
          if (v !== null) {
            values.push(v);
            valueSeeds.push(seeds[s]!);
          } else {
            const run = runs.find((r) => r.armIndex === a && r.seed === seeds[s]);
            reasons.push(run ? `seed ${seeds[s]}: ${run.status}${run.reason ? ` (${run.reason})` : run.status === 'ok' ? ' (non-finite error)' : ''}` : `seed ${seeds[s]}: not run yet`);
          }
        });
        const inDist = runs
          .filter((r) => r.armIndex === a && r.status === 'ok' && r.inDistribution)
          .map((r) => r.inDistribution![metric])
          .filter((v) => Number.isFinite(v));
        const summary = summarize(values, statsRng.fork(`arm:${a}:${key}`));
        const inMean = inDist.length ? inDist.reduce((x, y) => x + y, 0) / inDist.length : NaN;
        return {
          arm: arm.name,
          armIndex: a,
          summary,
          seeds: valueSeeds,
          excluded: expected - values.length,
          excludedReasons: reasons,
          gap: inMean > 0 ? summary.mean / inMean : NaN,
        };
      });
      const pairs: PairRung[] = comparedPairs(spec.arms.length).map(([i, j]) => {
        const a: number[] = [];
        const b: number[] = [];
        seeds.forEach((_, s) => {
          const va = table[i]![s];
          const vb = table[j]![s];
          if (va !== null && va !== undefined && vb !== null && vb !== undefined) {
            a.push(va);
            b.push(vb);
          }
        });
        return {
          a: spec.arms[i]!.name,
          b: spec.arms[j]!.name,
          verdict: verdict({
            a,
            b,
            nameA: spec.arms[i]!.name,
            nameB: spec.arms[j]!.name,
            failedA: arms[i]!.excluded,
            failedB: arms[j]!.excluded,
            rng: statsRng.fork(`pair:${i}:${j}:${key}`),
          }),
        };
      });
      rungs.push({
        family,
        size,
        scale,
        depthMean: sampleRung?.depthMean ?? NaN,
        meanDegree: sampleRung?.meanDegree ?? NaN,
        inTrainingRange: family === spec.train.family && scale === 1 && size >= spec.train.sizes[0] && size <= spec.train.sizes[1],
        arms,
        pairs,
        ranking: [...arms]
          .sort((x, y) => (Number.isNaN(x.summary.mean) ? Infinity : x.summary.mean) - (Number.isNaN(y.summary.mean) ? Infinity : y.summary.mean))
          .map((x) => x.arm),
      });
    }
  }
  return { metric, rungs, statusCounts };
}
