/**
 * Per-rung statistics over all finished runs: each arm's summary over seeds,
 * its extrapolation gap and relative error, the trivial baselines, the fit gate
 * per arm, and paired verdicts between arms with p-values adjusted for the
 * number of tests.
 *
 * Outcomes per run, at a rung: a finite error counts as itself; a run that blew
 * up (diverged, failed, or a non-finite error) counts as +Infinity, the worst
 * outcome, so an arm's failures stay in its comparison; a run that was
 * cancelled or has not run yet is missing.
 */
import type { ExperimentSpec, MetricName } from './spec.ts';
import { fitGateOf } from './spec.ts';
import type { RunResult, RungResult } from './run.ts';
import { mean, quantileSorted, summarize, wilcoxonSignedRank, type Summary } from './statistics.ts';
import { holmAdjust } from './multiplicity.ts';
import { verdict, type Adjustment, type Verdict } from './verdict.ts';
import { Rng } from '../util/rng.ts';
import { fileRungFamily } from '../graphs/files/types.ts';
import type { ConstantBaselines } from '../train/baselines.ts';

export interface ArmRung {
  arm: string;
  armIndex: number;
  /** Over the finite values only; `nonFinite` counts the runs that blew up. */
  summary: Summary;
  /** Seeds of the values in `summary.values`, same order. */
  seeds: number[];
  /** Runs not counted at all: cancelled or not yet run. */
  excluded: number;
  /** Why each run of this arm is not in `summary` (excluded, or blew up and ranks worst). */
  excludedReasons: string[];
  /** Runs that blew up at this rung (diverged, failed, non-finite error): ranked worst in every paired test. */
  nonFinite: number;
  /** Mean error at this rung divided by mean in-distribution error (1 = no degradation). */
  gap: number;
  /** Mean over seeds of the relative error (mre) at this rung. */
  relative: number;
  /** Mean error below the mean error of the best constant predictor at this rung (false when a run blew up). */
  beatsConstant: boolean;
  /** Seeds on which this arm's error is below the best constant's. */
  constantWins: number;
}

export interface PairRung {
  a: string;
  b: string;
  verdict: Verdict;
}

export interface RungBaseline {
  /** Mean over seeds of the error of the best constant for this rung (an oracle constant from the rung's own targets). */
  best: number;
  /** Mean over seeds of the error of the constant fitted on the training graphs. */
  train: number;
  /** The same two for the relative error (mre). */
  bestRelative: number;
  trainRelative: number;
}

export interface RungComparison {
  family: string;
  size: number;
  scale: number;
  /** Mean propagation depth of the exact algorithm at this rung, and mean in-degree. */
  depthMean: number;
  meanDegree: number;
  inTrainingRange: boolean;
  /** True where a primary rung is declared and this is it, or where none is declared (every rung tested). */
  tested: boolean;
  baseline: RungBaseline;
  /** No arm beats the best constant predictor here. */
  noArmBeatsConstant: boolean;
  arms: ArmRung[];
  pairs: PairRung[];
  /** Arm names from lowest to highest mean error (arms with blown-up runs or without values last). */
  ranking: string[];
}

/** The fit gate's outcome for one arm. */
export interface ArmFit {
  arm: string;
  armIndex: number;
  /** The gate: largest allowed in-distribution relative error. */
  gate: number;
  /** Per seed, in-distribution relative error on fresh graphs (+Infinity: the run blew up). */
  values: number[];
  seeds: number[];
  /** Median of `values`; the gate is applied to it. NaN before any run finished. */
  median: number;
  /** Seeds whose own error is within the gate. */
  passing: number;
  /** null until a run of the arm has finished. */
  fitted: boolean | null;
  /**
   * Median over seeds of the first training step whose validation relative error was within the
   * gate (+Infinity: some runs never got there; null: no run recorded its validation curve).
   * How much of the budget reaching the gate took.
   */
  gateStep: number | null;
  /** A plain sentence for a missed gate, with the numbers; empty when fitted. */
  message: string;
}

export interface Comparison {
  metric: MetricName;
  rungs: RungComparison[];
  /** Counts per status, so exclusions are never silent. */
  statusCounts: Record<string, number>;
  /** The fit gate per arm: verdicts involving an arm that is not fitted call no winner. */
  fit: ArmFit[];
  /** How p-values were adjusted for the number of tests. */
  adjustment: Adjustment;
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

/** Statuses whose run counts against its arm as the worst outcome. */
function blewUp(run: RunResult): boolean {
  return run.status === 'diverged' || run.status === 'failed';
}

/** A run's outcome at a rung: a number (+Infinity when it blew up) or null when it is missing. */
function outcomeAt(run: RunResult | undefined, key: string, metric: MetricName): number | null {
  if (!run) return null;
  if (blewUp(run)) return Infinity;
  if (run.status !== 'ok') return null;
  const rung = run.ladder.find((r) => rungKey(r.family, r.size, r.scale) === key);
  if (!rung) return null;
  const v = rung.metrics[metric];
  return typeof v === 'number' && Number.isFinite(v) ? v : Infinity;
}

/** Median; +Infinity entries (blown-up runs) sort last and may be the median. */
function median(values: readonly number[]): number {
  const sorted = [...values].sort((p, q) => p - q);
  const upper = sorted[Math.floor(sorted.length / 2)]!;
  // Two infinite middle values would interpolate to NaN.
  return upper === Infinity ? Infinity : quantileSorted(sorted, 0.5);
}

function pct(x: number): string {
  return Number.isFinite(x) ? `${Number((100 * x).toPrecision(2))}%` : 'a blow-up';
}

/** The fit gate for every arm, from the runs' in-distribution relative error on fresh graphs. */
export function armFits(spec: ExperimentSpec, runs: readonly RunResult[]): ArmFit[] {
  const gate = fitGateOf(spec);
  return spec.arms.map((arm, a) => {
    const values: number[] = [];
    const seeds: number[] = [];
    const reachedAt: number[] = [];
    for (const run of runs) {
      if (run.armIndex !== a) continue;
      if (run.validationCurve?.length) reachedAt.push(run.validationCurve.find((p) => p.relative <= gate)?.step ?? Infinity);
      let v: number | null = null;
      if (blewUp(run)) v = Infinity;
      else if (run.status === 'ok' && run.inDistribution) v = Number.isFinite(run.inDistribution.mre) ? run.inDistribution.mre : Infinity;
      if (v === null) continue;
      values.push(v);
      seeds.push(run.seed);
    }
    const med = values.length ? median(values) : NaN;
    const passing = values.filter((v) => v <= gate).length;
    const fitted = values.length ? med <= gate : null;
    const message =
      fitted === false
        ? `${arm.name} is not fitted: its in-distribution relative error on fresh graphs is ${pct(med)} (median of ${values.length} seeds; ${passing} within the gate), above the fit gate of ${pct(gate)}. Train longer or raise the budget.`
        : '';
    const gateStep = reachedAt.length ? median(reachedAt) : null;
    return { arm: arm.name, armIndex: a, gate, values, seeds, median: med, passing, fitted, gateStep, message };
  });
}

function meanFinite(values: readonly number[]): number {
  const finite = values.filter((v) => Number.isFinite(v));
  return finite.length ? mean(finite) : NaN;
}

export function compareRuns(spec: ExperimentSpec, runs: readonly RunResult[]): Comparison {
  const metric = spec.metric;
  const statusCounts: Record<string, number> = {};
  for (const r of runs) statusCounts[r.status] = (statusCounts[r.status] ?? 0) + 1;
  const expected = spec.seeds.count;
  const family = spec.test.family ?? spec.train.family;
  const seeds = Array.from({ length: spec.seeds.count }, (_, s) => spec.seeds.base + s);
  const statsRng = new Rng(spec.seeds.base).fork('statistics');
  const fit = armFits(spec, runs);
  // Looked up for every (rung, arm, seed) several times: a map, not a scan of every run each time.
  const byArmSeed = new Map<string, RunResult>();
  for (const r of runs) if (!byArmSeed.has(`${r.armIndex}:${r.seed}`)) byArmSeed.set(`${r.armIndex}:${r.seed}`, r);
  const runOf = (a: number, seed: number) => byArmSeed.get(`${a}:${seed}`);
  const inDistributionMean = spec.arms.map((_, a) =>
    meanFinite(runs.filter((r) => r.armIndex === a && r.status === 'ok' && r.inDistribution).map((r) => r.inDistribution![metric])),
  );
  const primary = spec.test.primary;
  const pairIndices = comparedPairs(spec.arms.length);

  interface Pending {
    rung: Omit<RungComparison, 'pairs'>;
    pairs: Array<{ i: number; j: number; a: number[]; b: number[]; pRaw: number }>;
  }
  const pending: Pending[] = [];
  // Generated rungs (size × scale), then one per graph file: its size is the file's node count, read off any run that scored it.
  const ladder: Array<{ family: string; size: number; scale: number; file: boolean }> = [];
  for (const size of spec.test.sizes) for (const scale of spec.test.weightScales) ladder.push({ family, size, scale, file: false });
  for (const file of spec.test.files ?? []) {
    const fileFamily = fileRungFamily(file);
    const size = runs.flatMap((r) => r.ladder).find((l) => l.family === fileFamily)?.size ?? 0;
    ladder.push({ family: fileFamily, size, scale: 1, file: true });
  }
  for (const { family, size, scale, file } of ladder) {
    const key = rungKey(family, size, scale);
    // outcome[arm][seed]
    const table = spec.arms.map((_, a) => seeds.map((seed) => outcomeAt(runOf(a, seed), key, metric)));
    const rungOf = (run: RunResult | undefined): RungResult | undefined =>
      run?.status === 'ok' ? run.ladder.find((l) => rungKey(l.family, l.size, l.scale) === key) : undefined;
    const sampleRung = runs.map(rungOf).find((r) => r !== undefined);
    // Baselines depend on the seed's graphs only: one per seed, from any arm's run of it.
    const baselineBySeed = new Map<number, ConstantBaselines>();
    for (const seed of seeds) {
      const found = spec.arms.map((_, a) => rungOf(runOf(a, seed))?.baseline).find((x) => x !== undefined);
      if (found) baselineBySeed.set(seed, found);
    }
    const seedBaselines = [...baselineBySeed.values()];
    const baseline: RungBaseline = {
      best: meanFinite(seedBaselines.map((b) => b.best[metric])),
      train: meanFinite(seedBaselines.map((b) => b.train[metric])),
      bestRelative: meanFinite(seedBaselines.map((b) => b.best.mre)),
      trainRelative: meanFinite(seedBaselines.map((b) => b.train.mre)),
    };
    const arms: ArmRung[] = spec.arms.map((arm, a) => {
      const values: number[] = [];
      const valueSeeds: number[] = [];
      const reasons: string[] = [];
      const relatives: number[] = [];
      let nonFinite = 0;
      let missing = 0;
      let constantWins = 0;
      table[a]!.forEach((v, s) => {
        const seed = seeds[s]!;
        const run = runOf(a, seed);
        if (v === null) {
          missing++;
          reasons.push(run ? `seed ${seed}: ${run.status}${run.reason ? ` (${run.reason})` : ''}` : `seed ${seed}: not run yet`);
          return;
        }
        if (!Number.isFinite(v)) {
          nonFinite++;
          reasons.push(`seed ${seed}: ${run!.status === 'ok' ? 'non-finite error' : run!.status}${run!.reason ? ` (${run!.reason})` : ''}; ranked as the worst outcome`);
          return;
        }
        values.push(v);
        valueSeeds.push(seed);
        const c = baselineBySeed.get(seed)?.best[metric];
        if (c !== undefined && v < c) constantWins++;
        const rel = rungOf(run)?.metrics.mre;
        if (typeof rel === 'number') relatives.push(rel);
      });
      const summary = summarize(values, statsRng.fork(`arm:${a}:${key}`));
      const inMean = inDistributionMean[a]!;
      return {
        arm: arm.name,
        armIndex: a,
        summary,
        seeds: valueSeeds,
        excluded: missing,
        excludedReasons: reasons,
        nonFinite,
        gap: inMean > 0 ? summary.mean / inMean : NaN,
        relative: nonFinite > 0 ? Infinity : meanFinite(relatives),
        beatsConstant: nonFinite === 0 && values.length > 0 && Number.isFinite(baseline.best) && summary.mean < baseline.best,
        constantWins,
      };
    });
    const tested = !primary || (!file && primary.size === size && primary.scale === scale);
    const pairs = pairIndices.map(([i, j]) => {
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
      return { i, j, a, b, pRaw: wilcoxonSignedRank(a, b).pTwoSided };
    });
    pending.push({
      rung: {
        family,
        size,
        scale,
        depthMean: sampleRung?.depthMean ?? NaN,
        meanDegree: sampleRung?.meanDegree ?? NaN,
        inTrainingRange: family === spec.train.family && scale === 1 && size >= spec.train.sizes[0] && size <= spec.train.sizes[1],
        tested,
        baseline,
        noArmBeatsConstant: arms.every((x) => !x.beatsConstant) && arms.some((x) => x.summary.n > 0 || x.nonFinite > 0),
        arms,
        ranking: [...arms]
          .sort((x, y) => sortKey(x) - sortKey(y))
          .map((x) => x.arm),
      },
      pairs,
    });
  }

  // Every tested (rung, pair) is one test of the family: Holm keeps the chance of any false
  // "extrapolates better" at alpha however many rungs and pairs a preset has.
  const testFamily = pending.flatMap((p) => (p.rung.tested ? p.pairs : []));
  const adjusted = holmAdjust(testFamily.map((t) => t.pRaw));
  const adjustedOf = new Map(testFamily.map((t, k) => [t, adjusted[k]!]));
  const adjustment: Adjustment = { method: primary ? 'primary' : 'holm', tests: testFamily.length };
  const notFitted = fit.filter((f) => f.fitted === false);

  const rungs: RungComparison[] = pending.map(({ rung, pairs }) => {
    const key = rungKey(rung.family, rung.size, rung.scale);
    return {
      ...rung,
      pairs: pairs.map((t) => {
        const { i, j } = t;
        const A = rung.arms[i]!;
        const B = rung.arms[j]!;
        return {
          a: A.arm,
          b: B.arm,
          verdict: verdict({
            a: t.a,
            b: t.b,
            nameA: A.arm,
            nameB: B.arm,
            failedA: A.excluded,
            failedB: B.excluded,
            rng: statsRng.fork(`pair:${i}:${j}:${key}`),
            tested: rung.tested,
            pAdjusted: adjustedOf.get(t) ?? t.pRaw,
            adjustment,
            notFitted: notFitted.filter((f) => f.armIndex === i || f.armIndex === j).map((f) => f.message),
            beatsConstantA: A.beatsConstant,
            beatsConstantB: B.beatsConstant,
            constantError: Number.isFinite(rung.baseline.best) ? rung.baseline.best : undefined,
          }),
        };
      }),
    };
  });
  return { metric, rungs, statusCounts, fit, adjustment };
}

function sortKey(arm: ArmRung): number {
  if (arm.nonFinite > 0 || Number.isNaN(arm.summary.mean)) return Infinity;
  return arm.summary.mean;
}
