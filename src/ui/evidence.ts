/**
 * The evidence, as plain rows for the figures and tables: per-arm curves with
 * intervals, paired differences, per-seed values, the ladder's "what shifted",
 * verdicts and their caveats. Derived from a results document (the same one
 * the CLI writes), so the sheet and the JSON export can never disagree.
 */
import type { ResultsDocument } from '../experiment/results.ts';
import type { VerdictKind } from '../experiment/verdict.ts';
import { summarize } from '../experiment/statistics.ts';
import { Rng } from '../util/rng.ts';
import { armColor } from './palette.ts';
import { metricLabel } from './catalogue.ts';

export interface ArmKey {
  name: string;
  index: number;
  color: string;
}

export interface CurvePoint {
  arm: string;
  armIndex: number;
  size: number;
  scale: number;
  mean: number;
  low: number;
  high: number;
  n: number;
}

export interface DiffPoint {
  pair: string;
  a: string;
  b: string;
  size: number;
  scale: number;
  estimate: number;
  low: number;
  high: number;
  n: number;
  kind: VerdictKind;
}

export interface SeedPoint {
  arm: string;
  armIndex: number;
  seed: number;
  size: number;
  scale: number;
  value: number;
}

export interface LadderRow {
  size: number;
  scale: number;
  depthMean: number;
  meanDegree: number;
  inTrainingRange: boolean;
}

export interface VerdictRow {
  size: number;
  scale: number;
  depthMean: number;
  meanDegree: number;
  inTrainingRange: boolean;
  a: string;
  b: string;
  kind: VerdictKind;
  text: string;
  n: number;
  meanA: number;
  meanB: number;
  diff: number;
  diffLow: number;
  diffHigh: number;
  probabilityOfImprovement: number;
  p: number;
  caveats: string[];
}

/** One rung's arms from lowest to highest mean error (sweeps and many-arm experiments). */
export interface RankingRow {
  size: number;
  scale: number;
  depthMean: number;
  order: Array<{ arm: string; color: string; mean: number; low: number; high: number; n: number }>;
}

export interface CaveatNote {
  text: string;
  /** Where it applies, e.g. "n = 64 (max vs sum)"; empty when it applies everywhere. */
  where: string[];
  /** The "too few seeds" caveat: shown first and in its own colour. */
  tooFewSeeds: boolean;
}

export interface FailureNote {
  arm: string;
  seed: number;
  status: string;
  reason: string;
}

export interface Headline {
  size: number;
  scale: number;
  depthMean: number;
  text: string;
  kind: VerdictKind;
  pair: string;
  detail: string;
}

export interface EvidenceView {
  metric: string;
  metricLabel: string;
  trainSizes: [number, number];
  trainFamily: string;
  testFamily: string;
  arms: ArmKey[];
  scales: number[];
  curves: CurvePoint[];
  /** In-distribution (validation) error per arm, mean and interval over seeds. */
  inDistribution: CurvePoint[];
  diffs: DiffPoint[];
  seeds: SeedPoint[];
  ladder: LadderRow[];
  verdicts: VerdictRow[];
  rankings: RankingRow[];
  caveats: CaveatNote[];
  failures: FailureNote[];
  headline: Headline | null;
  runsDone: number;
  runsExpected: number;
  complete: boolean;
  fingerprint: string;
  specHash: string;
}

export function sizeLabel(size: number, scale: number): string {
  return scale === 1 ? `n = ${size}` : `n = ${size}, weights ×${scale}`;
}

export function buildEvidence(doc: ResultsDocument): EvidenceView {
  const { spec, comparison } = doc;
  const arms: ArmKey[] = spec.arms.map((arm, index) => ({ name: arm.name, index, color: armColor(index) }));
  const curves: CurvePoint[] = [];
  const diffs: DiffPoint[] = [];
  const seeds: SeedPoint[] = [];
  const ladder: LadderRow[] = [];
  const verdicts: VerdictRow[] = [];
  const rankings: RankingRow[] = [];
  /** caveat text → pair → rung labels it applies to. */
  const caveatMap = new Map<string, Map<string, string[]>>();
  let pairSlots = 0;

  for (const rung of comparison.rungs) {
    ladder.push({ size: rung.size, scale: rung.scale, depthMean: rung.depthMean, meanDegree: rung.meanDegree, inTrainingRange: rung.inTrainingRange });
    const byName = new Map(rung.arms.map((a) => [a.arm, a]));
    rankings.push({
      size: rung.size,
      scale: rung.scale,
      depthMean: rung.depthMean,
      order: rung.ranking
        .map((name) => byName.get(name))
        .filter((a): a is NonNullable<typeof a> => a !== undefined && a.summary.n > 0)
        .map((a) => ({ arm: a.arm, color: armColor(a.armIndex), mean: a.summary.mean, low: a.summary.meanLow, high: a.summary.meanHigh, n: a.summary.n })),
    });
    for (const arm of rung.arms) {
      if (arm.summary.n > 0) {
        curves.push({
          arm: arm.arm,
          armIndex: arm.armIndex,
          size: rung.size,
          scale: rung.scale,
          mean: arm.summary.mean,
          low: arm.summary.meanLow,
          high: arm.summary.meanHigh,
          n: arm.summary.n,
        });
      }
      arm.summary.values.forEach((value, i) => {
        seeds.push({ arm: arm.arm, armIndex: arm.armIndex, seed: arm.seeds[i]!, size: rung.size, scale: rung.scale, value });
      });
    }
    for (const pair of rung.pairs) {
      const v = pair.verdict;
      pairSlots++;
      const label = `${pair.a} − ${pair.b}`;
      if (v.n > 0) {
        diffs.push({
          pair: label,
          a: pair.a,
          b: pair.b,
          size: rung.size,
          scale: rung.scale,
          estimate: v.meanDiff.estimate,
          low: v.meanDiff.low,
          high: v.meanDiff.high,
          n: v.n,
          kind: v.kind,
        });
      }
      verdicts.push({
        size: rung.size,
        scale: rung.scale,
        depthMean: rung.depthMean,
        meanDegree: rung.meanDegree,
        inTrainingRange: rung.inTrainingRange,
        a: pair.a,
        b: pair.b,
        kind: v.kind,
        text: v.text,
        n: v.n,
        meanA: v.meanA,
        meanB: v.meanB,
        diff: v.meanDiff.estimate,
        diffLow: v.meanDiff.low,
        diffHigh: v.meanDiff.high,
        probabilityOfImprovement: v.probabilityOfImprovement,
        p: v.wilcoxon.pTwoSided,
        caveats: v.caveats,
      });
      for (const caveat of v.caveats) {
        const byPair = caveatMap.get(caveat) ?? new Map<string, string[]>();
        caveatMap.set(caveat, byPair);
        const pairName = `${pair.a} vs ${pair.b}`;
        byPair.set(pairName, [...(byPair.get(pairName) ?? []), rung.scale === 1 ? String(rung.size) : `${rung.size} ×${rung.scale}`]);
      }
    }
  }

  const caveats: CaveatNote[] = [...caveatMap.entries()]
    .map(([text, byPair]) => ({
      text,
      // "n = 12, 48 (max vs sum)"; nothing when it applies to every rung and pair.
      where: [...byPair.values()].reduce((sum, rungs) => sum + rungs.length, 0) >= pairSlots ? [] : [...byPair.entries()].map(([pairName, rungs]) => `n = ${rungs.join(', ')} (${pairName})`),
      tooFewSeeds: /smallest possible two-sided signed-rank p|No complete seed pairs/.test(text),
    }))
    .sort((x, y) => Number(y.tooFewSeeds) - Number(x.tooFewSeeds));

  // In-distribution error per arm: how good each arm is where it was trained.
  const statsRng = new Rng(spec.seeds.base).fork('sheet/in-distribution');
  const inDistribution: CurvePoint[] = [];
  spec.arms.forEach((arm, a) => {
    const values = doc.runs
      .filter((r) => r.armIndex === a && r.status === 'ok' && r.inDistribution)
      .map((r) => r.inDistribution![spec.metric])
      .filter((v) => Number.isFinite(v));
    if (values.length === 0) return;
    const s = summarize(values, statsRng.fork(a), { resamples: 1000 });
    inDistribution.push({ arm: arm.name, armIndex: a, size: NaN, scale: 1, mean: s.mean, low: s.meanLow, high: s.meanHigh, n: s.n });
  });

  const failures: FailureNote[] = doc.runs
    .filter((r) => r.status !== 'ok')
    .map((r) => ({ arm: r.arm, seed: r.seed, status: r.status, reason: r.reason ?? '' }));

  // The lab note's answer line: the first pair at the farthest rung (largest size, then largest scale).
  let headline: Headline | null = null;
  const farthest = [...verdicts].sort((x, y) => y.size - x.size || y.scale - x.scale)[0];
  if (farthest) {
    const v = verdicts.find((row) => row.size === farthest.size && row.scale === farthest.scale)!;
    const wins = Math.round(v.probabilityOfImprovement * v.n);
    headline = {
      size: v.size,
      scale: v.scale,
      depthMean: v.depthMean,
      text: v.text,
      kind: v.kind,
      pair: `${v.a} vs ${v.b}`,
      detail: v.n > 0 ? `${v.a} had the lower error in ${wins} of ${v.n} seed pair${v.n === 1 ? '' : 's'}` : 'no complete seed pairs yet',
    };
  }

  return {
    metric: spec.metric,
    metricLabel: metricLabel(spec.metric),
    trainSizes: [spec.train.sizes[0], spec.train.sizes[1]],
    trainFamily: spec.train.family,
    testFamily: spec.test.family ?? spec.train.family,
    arms,
    scales: [...spec.test.weightScales],
    curves,
    inDistribution,
    diffs,
    seeds,
    ladder,
    verdicts,
    rankings,
    caveats,
    failures,
    headline,
    runsDone: doc.runs.length,
    runsExpected: doc.runsExpected,
    complete: doc.complete,
    fingerprint: doc.fingerprint,
    specHash: doc.specHash,
  };
}
