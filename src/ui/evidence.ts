/**
 * The evidence, as plain rows for the figures and tables: per-arm curves with
 * intervals, paired differences, per-seed values (and the runs that blew up),
 * the ladder's "what shifted", the trivial constant baselines, the fit gate per
 * arm, verdicts with raw and adjusted p and their caveats. Derived from a
 * results document (the same one the CLI writes), so the sheet and the JSON
 * export can never disagree. Every sentence the sheet shows about the
 * statistics is written here; the components only lay it out.
 */
import type { ResultsDocument } from '../experiment/results.ts';
import type { ArmFit, RungComparison } from '../experiment/compare.ts';
import { rungKey } from '../experiment/compare.ts';
import type { RunResult } from '../experiment/run.ts';
import type { MetricName } from '../experiment/spec.ts';
import type { VerdictKind } from '../experiment/verdict.ts';
import { summarize } from '../experiment/statistics.ts';
import { Rng } from '../util/rng.ts';
import { armColor } from './palette.ts';
import { metricLabel } from './catalogue.ts';
import { num, percent } from './format.ts';

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
  /** Runs of this arm that blew up here: ranked worst in the tests, not in this mean. */
  blownUp: number;
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
  /** When the estimate is not finite: which arm blew up, e.g. "sum blew up (ranked worst)"; empty otherwise. */
  blownUp: string;
}

export interface SeedPoint {
  arm: string;
  armIndex: number;
  seed: number;
  size: number;
  scale: number;
  value: number;
}

/** The runs of one arm that blew up at one rung (diverged, failed or a non-finite error): ranked worst, never dropped. */
export interface BlownUpPoint {
  arm: string;
  armIndex: number;
  size: number;
  scale: number;
  seeds: number[];
  /** "blew up (ranked worst)", or "2 blew up (ranked worst)". */
  label: string;
}

/** The error of predicting one number for every node, per rung (mean over seeds, in the preset's metric). */
export interface BaselinePoint {
  size: number;
  scale: number;
  /** The best constant for this rung's own targets. */
  best: number;
  /** The constant fitted on the training graphs. */
  train: number;
  bestRelative: number;
  trainRelative: number;
  noArmBeatsConstant: boolean;
}

export type GateStatus = 'fitted' | 'not-fitted' | 'not-run';

/** The fit gate for one arm, in words with the numbers. */
export interface GateRow {
  arm: string;
  armIndex: number;
  color: string;
  status: GateStatus;
  /** "fitted", "not fitted" or "not run yet". */
  label: string;
  /** Everything after the dash, e.g. "in-distribution relative error 0.6% (median of 10 seeds, all within the 5% gate)". */
  detail: string;
  /** The whole sentence: "max: fitted — in-distribution relative error …". */
  text: string;
  /** Median in-distribution relative error over seeds (NaN before a run finished, ∞ when most blew up). */
  median: number;
  gate: number;
  seeds: number;
  passing: number;
  blownUp: number;
}

/** How the verdicts' p-values were adjusted, with the column heading and the one caveat line that explains it. */
export interface AdjustmentView {
  method: 'holm' | 'primary';
  tests: number;
  /** Column heading, e.g. "p (Holm, 3 tests)" or "p (primary rung)". */
  header: string;
  note: string;
}

export interface LadderRow {
  size: number;
  scale: number;
  /** A graph-file rung: the file's name (its size is the file's node count). */
  file?: string;
  depthMean: number;
  meanDegree: number;
  inTrainingRange: boolean;
}

export interface VerdictRow {
  size: number;
  scale: number;
  /** A graph-file rung: the file's name. */
  file?: string;
  depthMean: number;
  meanDegree: number;
  inTrainingRange: boolean;
  /** False on a rung other than the declared primary one: descriptive only. */
  tested: boolean;
  a: string;
  b: string;
  kind: VerdictKind;
  text: string;
  n: number;
  meanA: number;
  meanB: number;
  /** Each arm's mean relative error at this rung (∞ when a run blew up). */
  relativeA: number;
  relativeB: number;
  /** Runs of each arm that blew up here; they rank as the worst outcome in the test. */
  blownUpA: number;
  blownUpB: number;
  /** "2 blew up (ranked worst)"; empty when none did. */
  blownUpNoteA: string;
  blownUpNoteB: string;
  /** A sentence when the arm does not beat the best constant here (shown as "!" with this as its tooltip); empty otherwise. */
  constantWarningA: string;
  constantWarningB: string;
  /** Best constant's and training constant's error at this rung (mean over seeds). */
  constant: number;
  constantTrain: number;
  diff: number;
  diffLow: number;
  diffHigh: number;
  probabilityOfImprovement: number;
  /** Two-sided signed-rank p, raw and adjusted for the number of tests (NaN where nothing is tested). */
  pRaw: number;
  pAdjusted: number;
  caveats: string[];
}

/** One rung's arms from lowest to highest mean error (sweeps and many-arm experiments). */
export interface RankingRow {
  /** A graph-file rung: the file's name. */
  file?: string;
  size: number;
  scale: number;
  depthMean: number;
  order: Array<{ arm: string; color: string; mean: number; low: number; high: number; n: number; blownUp: number }>;
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
  /** How the statistics treat it: ranked worst (diverged, failed) or left out (cancelled). */
  treatment: string;
}

export interface Headline {
  size: number;
  scale: number;
  depthMean: number;
  /** The verdict's text, e.g. "max extrapolates better" or "not judged: an arm is not fitted". */
  text: string;
  /** The answer line: "At n = 64: max extrapolates better". */
  lead: string;
  kind: VerdictKind;
  /** The arm the verdict calls better; null for every other kind. */
  winner: string | null;
  pair: string;
  /** "the farthest rung" or "the primary rung". */
  where: string;
  /** Why there is no winner (not fitted, no skill, descriptive only, too few seeds); empty otherwise. */
  reason: string;
  detail: string;
}

/** Errors spanning more decades than this switch the figures to a log scale by themselves. */
export const AUTO_LOG_DECADES = 1.5;

export interface EvidenceView {
  /** log10(largest / smallest) over the positive errors the figures plot (curves, intervals, seeds); 0 with fewer than two. */
  errorDecades: number;
  metric: string;
  metricLabel: string;
  trainSizes: [number, number];
  trainFamily: string;
  testFamily: string;
  arms: ArmKey[];
  scales: number[];
  curves: CurvePoint[];
  /** In-distribution error per arm on fresh graphs of the training sizes, mean and interval over seeds. */
  inDistribution: CurvePoint[];
  diffs: DiffPoint[];
  seeds: SeedPoint[];
  blownUp: BlownUpPoint[];
  ladder: LadderRow[];
  baselines: BaselinePoint[];
  gates: GateRow[];
  /** What the fit gate is, in one sentence. */
  gateNote: string;
  verdicts: VerdictRow[];
  adjustment: AdjustmentView;
  rankings: RankingRow[];
  caveats: CaveatNote[];
  /** Sentences for rungs where no arm beats the best constant (empty when every rung has one that does). */
  noSkill: string[];
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

function plural(count: number, one: string, many: string): string {
  return `${count} ${count === 1 ? one : many}`;
}

function listWords(items: readonly string[]): string {
  if (items.length <= 1) return items.join('');
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

/** "blew up (ranked worst)" for one run, "2 blew up (ranked worst)" for more; empty for none. */
export function blownUpLabel(count: number): string {
  if (count <= 0) return '';
  return `${count === 1 ? '' : `${count} `}blew up (ranked worst)`;
}

/**
 * Whether a run counts as blown up at a rung, as the comparison ranks it: a
 * diverged or failed run at every rung, a finished one where its error is not
 * a finite number.
 */
function blewUpAt(run: RunResult, key: string, metric: MetricName): boolean {
  if (run.status === 'diverged' || run.status === 'failed') return true;
  if (run.status !== 'ok') return false;
  const rung = run.ladder.find((r) => rungKey(r.family, r.size, r.scale) === key);
  if (!rung) return false;
  const v = rung.metrics[metric];
  return !(typeof v === 'number' && Number.isFinite(v));
}

/** "all within", "2 within", "none within"; "within"/"outside" for a single seed. */
function withinWords(passing: number, n: number): string {
  if (n === 1) return passing ? 'within' : 'outside';
  if (passing === n) return 'all within';
  if (passing === 0) return 'none within';
  return `${passing} within`;
}

/** The fit gate of one arm as words with the numbers. */
export function gateRow(fit: ArmFit, expectedSeeds: number): GateRow {
  const n = fit.values.length;
  const blownUp = fit.values.filter((v) => !Number.isFinite(v)).length;
  const gate = percent(fit.gate);
  const base = { arm: fit.arm, armIndex: fit.armIndex, color: armColor(fit.armIndex), median: fit.median, gate: fit.gate, seeds: n, passing: fit.passing, blownUp };
  if (fit.fitted === null || n === 0) {
    const detail = `no run has finished; the gate (in-distribution relative error at most ${gate}) is read when one does`;
    return { ...base, status: 'not-run', label: 'not run yet', detail, text: `${fit.arm}: not run yet — ${detail}` };
  }
  const soFar = n < expectedSeeds ? ' so far' : '';
  const over = n === 1 ? `1 seed${soFar}` : `median of ${n} seeds${soFar}`;
  const value = Number.isFinite(fit.median) ? percent(fit.median) : 'infinite (most runs blew up)';
  const blew = blownUp ? `, ${blownUp} blew up` : '';
  let detail = `in-distribution relative error ${value} (${over}, ${withinWords(fit.passing, n)} the ${gate} gate${blew})`;
  if (fit.fitted) return { ...base, status: 'fitted', label: 'fitted', detail, text: `${fit.arm}: fitted — ${detail}` };
  detail += `. No verdict calls a winner for ${fit.arm}. Train longer or raise the budget.`;
  return { ...base, status: 'not-fitted', label: 'not fitted', detail, text: `${fit.arm}: not fitted — ${detail}` };
}

function adjustmentView(doc: ResultsDocument): AdjustmentView {
  const { spec, comparison } = doc;
  const adjustment = comparison.adjustment ?? { method: 'holm' as const, tests: comparison.rungs.reduce((sum, r) => sum + r.pairs.length, 0) };
  const tests = adjustment.tests;
  const alpha = comparison.rungs.flatMap((r) => r.pairs)[0]?.verdict.alpha ?? 0.05;
  const pairsWord = plural(tests, 'arm pair', 'arm pairs');
  if (adjustment.method === 'primary') {
    const primary = spec.test.primary;
    const where = primary ? sizeLabel(primary.size, primary.scale) : 'the primary rung';
    return {
      method: 'primary',
      tests,
      header: 'p (primary rung)',
      note:
        `Only the declared primary rung, ${where}, is tested: p (primary rung) is the signed-rank p adjusted by Holm–Bonferroni across its ${pairsWord}, ` +
        `and verdicts use it. Every other rung is descriptive only: its raw p is shown but gives no verdict.`,
    };
  }
  return {
    method: 'holm',
    tests,
    header: `p (Holm, ${plural(tests, 'test', 'tests')})`,
    note:
      tests <= 1
        ? `One test in the table, so the adjusted p equals the raw p; verdicts use it at ${alpha}.`
        : `p (Holm, ${tests} tests) is the signed-rank p adjusted by Holm–Bonferroni across every tested rung and arm pair (${tests} tests), ` +
          `so the chance of even one false "extrapolates better" in this table stays at ${alpha}. Verdicts use the adjusted p; the raw p is shown beside it.`,
  };
}

function constantWarning(arm: string, mean: number, constant: number, metric: string, blownUp: number): string {
  if (blownUp > 0) return `${arm} had a run blow up here, so it does not beat the best constant predictor (error ${num(constant)}).`;
  return `${arm} does not beat the best constant predictor here: its mean ${metric} ${num(mean)} is not below ${num(constant)}, the error of predicting one number for every node.`;
}

export function buildEvidence(doc: ResultsDocument): EvidenceView {
  const { spec, comparison } = doc;
  const metric = spec.metric;
  const arms: ArmKey[] = spec.arms.map((arm, index) => ({ name: arm.name, index, color: armColor(index) }));
  const curves: CurvePoint[] = [];
  const diffs: DiffPoint[] = [];
  const seeds: SeedPoint[] = [];
  const blownUp: BlownUpPoint[] = [];
  const ladder: LadderRow[] = [];
  const baselines: BaselinePoint[] = [];
  const verdicts: VerdictRow[] = [];
  const rankings: RankingRow[] = [];
  const noSkillRungs: string[] = [];
  const gates = (comparison.fit ?? []).map((f) => gateRow(f, spec.seeds.count));
  // The fit messages are said once, with the numbers, in the gate rows; they are not repeated per verdict.
  const fitMessages = new Set((comparison.fit ?? []).map((f) => f.message).filter((m) => m));
  /** caveat text → pair → rung labels it applies to. */
  const caveatMap = new Map<string, Map<string, string[]>>();
  let pairSlots = 0;

  for (const rung of comparison.rungs) {
    const key = rungKey(rung.family, rung.size, rung.scale);
    const tested = rung.tested !== false;
    const base: RungComparison['baseline'] = rung.baseline ?? { best: NaN, train: NaN, bestRelative: NaN, trainRelative: NaN };
    const file = rung.family.startsWith('file:') ? rung.family.slice('file:'.length) : undefined;
    ladder.push({ size: rung.size, scale: rung.scale, ...(file ? { file } : {}), depthMean: rung.depthMean, meanDegree: rung.meanDegree, inTrainingRange: rung.inTrainingRange });
    baselines.push({ size: rung.size, scale: rung.scale, ...base, noArmBeatsConstant: Boolean(rung.noArmBeatsConstant) });
    if (rung.noArmBeatsConstant) noSkillRungs.push(file ? `${file} (n = ${rung.size})` : sizeLabel(rung.size, rung.scale));
    const byName = new Map(rung.arms.map((a) => [a.arm, a]));
    rankings.push({
      size: rung.size,
      ...(file ? { file } : {}),
      scale: rung.scale,
      depthMean: rung.depthMean,
      order: rung.ranking
        .map((name) => byName.get(name))
        .filter((a): a is NonNullable<typeof a> => a !== undefined && (a.summary.n > 0 || (a.nonFinite ?? 0) > 0))
        .map((a) => ({ arm: a.arm, color: armColor(a.armIndex), mean: a.summary.mean, low: a.summary.meanLow, high: a.summary.meanHigh, n: a.summary.n, blownUp: a.nonFinite ?? 0 })),
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
          blownUp: arm.nonFinite ?? 0,
        });
      }
      arm.summary.values.forEach((value, i) => {
        seeds.push({ arm: arm.arm, armIndex: arm.armIndex, seed: arm.seeds[i]!, size: rung.size, scale: rung.scale, value });
      });
      const blown = doc.runs
        .filter((r) => r.armIndex === arm.armIndex && blewUpAt(r, key, metric))
        .map((r) => r.seed)
        .sort((x, y) => x - y);
      if (blown.length) blownUp.push({ arm: arm.arm, armIndex: arm.armIndex, size: rung.size, scale: rung.scale, seeds: blown, label: blownUpLabel(blown.length) });
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
          blownUp: Number.isFinite(v.meanDiff.estimate)
            ? ''
            : `${listWords([v.nonFiniteA ? pair.a : '', v.nonFiniteB ? pair.b : ''].filter((x) => x))} blew up (ranked worst)`,
        });
      }
      const A = byName.get(pair.a);
      const B = byName.get(pair.b);
      const blownA = v.nonFiniteA ?? A?.nonFinite ?? 0;
      const blownB = v.nonFiniteB ?? B?.nonFinite ?? 0;
      const beats = (arm: typeof A) => arm === undefined || arm.beatsConstant !== false || !Number.isFinite(base.best) || (arm.summary.n === 0 && !arm.nonFinite);
      verdicts.push({
        size: rung.size,
        scale: rung.scale,
        ...(file ? { file } : {}),
        depthMean: rung.depthMean,
        meanDegree: rung.meanDegree,
        inTrainingRange: rung.inTrainingRange,
        tested,
        a: pair.a,
        b: pair.b,
        kind: v.kind,
        text: v.text,
        n: v.n,
        meanA: v.meanA,
        meanB: v.meanB,
        relativeA: A?.relative ?? NaN,
        relativeB: B?.relative ?? NaN,
        blownUpA: blownA,
        blownUpB: blownB,
        blownUpNoteA: blownUpLabel(blownA),
        blownUpNoteB: blownUpLabel(blownB),
        constantWarningA: beats(A) ? '' : constantWarning(pair.a, A!.summary.mean, base.best, metric, A!.nonFinite ?? 0),
        constantWarningB: beats(B) ? '' : constantWarning(pair.b, B!.summary.mean, base.best, metric, B!.nonFinite ?? 0),
        constant: base.best,
        constantTrain: base.train,
        diff: v.meanDiff.estimate,
        diffLow: v.meanDiff.low,
        diffHigh: v.meanDiff.high,
        probabilityOfImprovement: v.probabilityOfImprovement,
        pRaw: v.pRaw ?? v.wilcoxon.pTwoSided,
        pAdjusted: tested ? (v.pAdjusted ?? v.wilcoxon.pTwoSided) : NaN,
        caveats: v.caveats,
      });
      for (const caveat of v.caveats) {
        if (fitMessages.has(caveat)) continue;
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

  // In-distribution error per arm: how good each arm is where it was trained (fresh graphs, not the ones that chose its weights).
  const statsRng = new Rng(spec.seeds.base).fork('sheet/in-distribution');
  const inDistribution: CurvePoint[] = [];
  spec.arms.forEach((arm, a) => {
    const values = doc.runs
      .filter((r) => r.armIndex === a && r.status === 'ok' && r.inDistribution)
      .map((r) => r.inDistribution![metric])
      .filter((v) => Number.isFinite(v));
    if (values.length === 0) return;
    const s = summarize(values, statsRng.fork(a), { resamples: 1000 });
    inDistribution.push({ arm: arm.name, armIndex: a, size: NaN, scale: 1, mean: s.mean, low: s.meanLow, high: s.meanHigh, n: s.n, blownUp: 0 });
  });

  const failures: FailureNote[] = doc.runs
    .filter((r) => r.status !== 'ok')
    .map((r) => ({
      arm: r.arm,
      seed: r.seed,
      status: r.status,
      reason: r.reason ?? '',
      treatment:
        r.status === 'cancelled'
          ? 'This run is left out of the statistics until it is run again.'
          : 'It stays in the statistics as the worst outcome at every size (ranked worst in each paired test), and it fails the fit gate for its seed.',
    }));

  const adjustment = adjustmentView(doc);
  const noSkill = noSkillRungs.length
    ? [`No arm beats the best constant predictor at ${listWords(noSkillRungs)}: nothing was learned there that a verdict could compare.`]
    : [];

  return {
    errorDecades: decadesSpanned([...curves.flatMap((c) => [c.low, c.mean, c.high]), ...seeds.map((p) => p.value)]),
    metric,
    metricLabel: metricLabel(metric),
    trainSizes: [spec.train.sizes[0], spec.train.sizes[1]],
    trainFamily: spec.train.family,
    testFamily: spec.test.family ?? spec.train.family,
    arms,
    scales: [...spec.test.weightScales],
    curves,
    inDistribution,
    diffs,
    seeds,
    blownUp,
    ladder,
    baselines,
    gates,
    gateNote: `Before any verdict, each arm must fit what it was trained on: its relative error on fresh graphs of the training sizes (not the graphs that chose its weights), median over seeds, at most ${percent(comparison.fit?.[0]?.gate ?? NaN)}.`,
    verdicts,
    adjustment,
    rankings,
    caveats,
    noSkill,
    failures,
    headline: headlineOf(verdicts, gates, metric, Boolean(spec.test.primary)),
    runsDone: doc.runs.length,
    runsExpected: doc.runsExpected,
    complete: doc.complete,
    fingerprint: doc.fingerprint,
    specHash: doc.specHash,
  };
}

/**
 * The lab note's answer line: the first pair at the primary rung when one is
 * declared, else at the farthest tested rung (largest size, then largest
 * scale). It names a winner only for "A/B extrapolates better"; every other
 * verdict is shown with its words and the reason.
 */
export function headlineOf(verdicts: readonly VerdictRow[], gates: readonly GateRow[], metric: string, primary: boolean): Headline | null {
  const byFar = [...verdicts].sort((x, y) => y.size - x.size || y.scale - x.scale);
  const farthest = byFar.find((row) => row.tested) ?? byFar[0];
  if (!farthest) return null;
  const v = verdicts.find((row) => row.size === farthest.size && row.scale === farthest.scale && row.tested === farthest.tested)!;
  const wins = Math.round(v.probabilityOfImprovement * v.n);
  const winner = v.kind === 'a-better' ? v.a : v.kind === 'b-better' ? v.b : null;
  const at = v.file ? `On ${v.file} (n = ${v.size})` : v.scale === 1 ? `At n = ${v.size}` : `At n = ${v.size} (weights ×${v.scale})`;
  const missed = gates.filter((g) => g.status === 'not-fitted' && (g.arm === v.a || g.arm === v.b));
  const missedWords = missed.length
    ? `${listWords(missed.map((g) => g.arm))} missed the fit gate: in-distribution relative error ${listWords(missed.map((g) => percent(g.median)))} against the ${percent(missed[0]!.gate)} gate`
    : '';
  let reason = '';
  switch (v.kind) {
    case 'not-fitted':
      reason = `${missedWords || 'An arm missed the fit gate'}, so no winner is called. Train longer or raise the budget.`;
      break;
    case 'no-skill':
      reason = `Predicting one number for every node gives ${metric} ${num(v.constant)} here, against ${v.a} ${num(v.meanA)} and ${v.b} ${num(v.meanB)} (means over seeds): the lower error is no better than a constant, so no winner is called.`;
      break;
    case 'not-tested':
      reason = 'Only the declared primary rung is tested; this rung is descriptive, so no winner is called.';
      break;
    case 'too-few-seeds':
      reason = v.caveats.find((c) => /smallest possible two-sided signed-rank p|No complete seed pairs/.test(c)) ?? '';
      break;
    default:
      reason = '';
  }
  // "Too few seeds" comes before the gate in the rules; the gate still deserves a word on the answer line.
  if (missedWords && v.kind !== 'not-fitted') reason = `${reason ? `${reason} ` : ''}Also, ${missedWords}.`;
  const blown = [v.blownUpA ? `${v.a}: ${v.blownUpNoteA}` : '', v.blownUpB ? `${v.b}: ${v.blownUpNoteB}` : ''].filter((x) => x);
  return {
    size: v.size,
    scale: v.scale,
    depthMean: v.depthMean,
    text: v.text,
    lead: `${at}${v.text.includes(':') ? ' — ' : ': '}${v.text}`,
    kind: v.kind,
    winner,
    pair: `${v.a} vs ${v.b}`,
    where: primary && v.tested ? 'the primary rung' : 'the farthest rung',
    reason,
    detail:
      (v.n > 0 ? `${v.a} had the lower error in ${wins} of ${v.n} seed pair${v.n === 1 ? '' : 's'}` : 'no complete seed pairs yet') +
      (blown.length ? `; ${blown.join(', ')}` : ''),
  };
}

/** How many decades the positive finite values span. */
export function decadesSpanned(values: readonly number[]): number {
  const positive = values.filter((v) => Number.isFinite(v) && v > 0);
  if (positive.length < 2) return 0;
  return Math.log10(Math.max(...positive) / Math.min(...positive));
}
