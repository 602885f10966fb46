/**
 * The sheet's logic without a browser: editing a draft, naming bad fields,
 * the evidence rows (fit gate, constant baselines, raw and adjusted p, the
 * answer line, runs that blew up) and the CSV export built from a results
 * document.
 */
import { describe, expect, it } from 'vitest';
import { applyEdit, armCards, parseNumberList, problemFields, uniqueArmName, validateDraft } from '../../src/ui/spec-draft.ts';
import { buildEvidence, type EvidenceView } from '../../src/ui/evidence.ts';
import { CSV_COLUMNS, resultsCsv, resultsJson } from '../../src/ui/export.ts';
import { progressView, sparklinePath } from '../../src/ui/progress-view.ts';
import { buildResults } from '../../src/experiment/results.ts';
import { planRuns } from '../../src/experiment/plan.ts';
import type { RunResult } from '../../src/experiment/run.ts';
import { tinySpec } from '../helpers.ts';
import { unmeasuredResult } from '../../src/experiment/run-record.ts';
import type { ConstantBaselines } from '../../src/train/baselines.ts';

const engine = { name: 'farfield', version: '0.1.0', backend: 'wasm', threads: 1, host: 'browser' } as const;

interface FakeOptions {
  /** In-distribution relative error per arm (default 0.006: inside the 5% gate). */
  fitMre?: (arm: number, seed: number) => number;
  /** The best constant's mae at a size (default size/10 + 5: both arms beat it). */
  bestMae?: (size: number) => number;
}

function baselineAt(size: number, bestMae: number): ConstantBaselines {
  return {
    best: { mae: bestMae, mre: 0.5, miss: 0.9 },
    train: { mae: bestMae + 1, mre: 0.7, miss: 0.95 },
    bestConstant: { mae: size / 5, mre: size / 6, miss: size / 5 },
    trainConstant: { mae: 1, mre: 1, miss: 1 },
  };
}

/**
 * Made-up results: arm 0 has lower error than arm 1 on every rung and seed
 * (mae = size/10 + arm + 0.01·seed), relative error 2% + 1% per arm, and a
 * constant baseline per rung.
 */
function fakeRuns(spec = tinySpec(), options: FakeOptions = {}): RunResult[] {
  const fitMre = options.fitMre ?? (() => 0.006);
  const bestMae = options.bestMae ?? ((size: number) => size / 10 + 5);
  return planRuns(spec).map((plan) => ({
    ...unmeasuredResult(plan),
    stepsDone: spec.budget.steps,
    keptStep: spec.budget.steps,
    lossCurve: [3, 2, 1],
    lossEvery: 1,
    parameters: 10,
    inDistribution: { mae: 0.5 + plan.armIndex, mre: fitMre(plan.armIndex, plan.seedIndex), miss: 0.2, nodes: 10 },
    validation: { mae: 0.4 + plan.armIndex, mre: 0.005, miss: 0.1, nodes: 10 },
    ladder: spec.test.sizes.map((size) => ({
      family: spec.train.family,
      size,
      scale: 1,
      metrics: { mae: size / 10 + plan.armIndex + plan.seedIndex * 0.01, mre: 0.02 + 0.01 * plan.armIndex, miss: 0.2, nodes: 10 },
      baseline: baselineAt(size, bestMae(size)),
      depthMean: size / 4,
      depthMax: size / 2,
      meanDegree: 3,
    })),
    seconds: 1,
  }));
}

/** Eight seeds: enough for a verdict after adjusting for both rungs (2/2^8 · 2 < 0.05). */
const manySeeds = (overrides: Parameters<typeof tinySpec>[0] = {}) => tinySpec({ seeds: { count: 8, base: 3 }, ...overrides });

function evidenceOf(spec: ReturnType<typeof tinySpec>, runs: RunResult[]): EvidenceView {
  return buildEvidence(buildResults(spec, runs, engine));
}

describe('editing the draft', () => {
  it('adds, duplicates and removes arms with unique names, never below two', () => {
    let draft = tinySpec();
    draft = applyEdit(draft, { kind: 'arm-duplicate', arm: 0 });
    expect(draft.arms.map((a) => a.name)).toEqual(['max', 'max copy', 'sum']);
    expect(draft.arms[1]!.model).toEqual(draft.arms[0]!.model);
    draft = applyEdit(draft, { kind: 'arm-duplicate', arm: 0 });
    expect(draft.arms[1]!.name).toBe('max copy 2');
    draft = applyEdit(draft, { kind: 'arm-add' });
    expect(draft.arms).toHaveLength(5);
    expect(validateDraft(draft).ok).toBe(true);
    for (let i = 0; i < 6; i++) draft = applyEdit(draft, { kind: 'arm-remove', arm: 0 });
    expect(draft.arms).toHaveLength(2);
    expect(uniqueArmName('x'.repeat(60), [])).toHaveLength(34);
  });

  it('sets an arm switch as an override and marks it as differing', () => {
    let draft = tinySpec();
    draft = applyEdit(draft, { kind: 'arm-switch', arm: 1, key: 'bias', value: false });
    draft = applyEdit(draft, { kind: 'arm-step', arm: 1, key: 'rule', value: 'fixed' });
    const cards = armCards(draft, () => '#000');
    expect(cards[1]!.model.bias).toBe(false);
    expect(cards[0]!.model.bias).toBe(true);
    expect(cards[1]!.overridden.has('bias')).toBe(true);
    expect(cards[0]!.differs.has('bias')).toBe(true);
    expect(cards[0]!.differs.has('aggregator')).toBe(true);
    expect(cards[0]!.differs.has('hidden')).toBe(false);
    expect(cards[0]!.differs.has('steps.rule')).toBe(true);
    expect(validateDraft(draft).ok).toBe(true);
  });

  it('keeps families and transforms consistent when the task changes', () => {
    let draft = tinySpec();
    draft = applyEdit(draft, { kind: 'task', task: 'charge-potential' });
    expect(draft.train.family).toBe('points');
    expect(validateDraft(draft).ok).toBe(true);
  });

  it('names every bad field, so the sheet can mark its input', () => {
    let draft = tinySpec();
    draft = applyEdit(draft, { kind: 'field', path: ['test', 'sizes'], value: parseNumberList('8, x, 700') });
    draft = applyEdit(draft, { kind: 'arm-switch', arm: 0, key: 'hidden', value: NaN });
    const v = validateDraft(draft);
    expect(v.ok).toBe(false);
    const fields = problemFields(v.ok ? [] : v.problems);
    expect(fields.has('test.sizes')).toBe(true);
    expect(fields.has('arms[0].model.hidden')).toBe(true);
  });

  it('parses loose number lists', () => {
    expect(parseNumberList('16, 32 64;128')).toEqual([16, 32, 64, 128]);
    expect(parseNumberList('1e2, .5')).toEqual([100, 0.5]);
    expect(parseNumberList('8, abc')[1]).toBeNaN();
  });

  it('removes an optional field set to undefined', () => {
    let draft = tinySpec();
    draft = applyEdit(draft, { kind: 'field', path: ['test', 'family'], value: 'er' });
    expect(draft.test.family).toBe('er');
    draft = applyEdit(draft, { kind: 'field', path: ['test', 'family'], value: undefined });
    expect('family' in draft.test).toBe(false);
  });
});

describe('evidence and exports', () => {
  it('builds curves, differences, seeds, verdicts and the too-few-seeds caveat from a results document', () => {
    const spec = tinySpec();
    const doc = buildResults(spec, fakeRuns(spec), engine);
    const view = buildEvidence(doc);
    expect(view.curves).toHaveLength(spec.arms.length * spec.test.sizes.length);
    expect(view.diffs).toHaveLength(spec.test.sizes.length);
    expect(view.diffs.every((d) => d.estimate < 0)).toBe(true);
    expect(view.seeds).toHaveLength(spec.arms.length * spec.seeds.count * spec.test.sizes.length);
    expect(view.verdicts.every((v) => v.kind === 'too-few-seeds')).toBe(true);
    expect(view.caveats[0]!.tooFewSeeds).toBe(true);
    expect(view.headline!.size).toBe(Math.max(...spec.test.sizes));
    expect(view.ladder.map((r) => r.depthMean)).toEqual(spec.test.sizes.map((s) => s / 4));
    expect(view.inDistribution).toHaveLength(2);
    expect(view.fingerprint).toBe(doc.fingerprint);
  });

  it('writes one CSV row per run and rung plus an in-distribution and a validation row per run', () => {
    const spec = tinySpec();
    const doc = buildResults(spec, fakeRuns(spec), engine);
    const lines = resultsCsv(doc).trim().split('\n');
    expect(lines[0]).toBe(CSV_COLUMNS.join(','));
    expect(lines).toHaveLength(1 + doc.runs.length * (2 + spec.test.sizes.length));
    expect(lines[1]).toContain(',in-distribution,');
    expect(lines[2]).toContain(',validation,');
    expect(lines.every((l) => l.split(',').length === CSV_COLUMNS.length)).toBe(true);
  });

  it('exports the per-rung baselines, relative errors, tested flag and fit gate in the CSV', () => {
    const spec = tinySpec();
    const runs = fakeRuns(spec, { fitMre: (arm) => (arm === 0 ? 0.006 : 0.081), bestMae: (size) => (size === 12 ? 1.5 : 9) });
    const csv = resultsCsv(buildResults(spec, runs, engine));
    const [header, ...body] = csv.trim().split('\n').map((l) => l.split(','));
    const col = (row: string[], name: (typeof CSV_COLUMNS)[number]) => row[header!.indexOf(name)];
    const test = body.filter((r) => col(r, 'set') === 'test');
    // Arm sum (index 1) at n = 12: mae 2.2 + 0.01·seed against a best constant of 1.5.
    const sum12 = test.find((r) => col(r, 'arm') === 'sum' && col(r, 'nodes') === '12')!;
    expect(col(sum12, 'best_constant_mae')).toBe('1.5');
    expect(col(sum12, 'train_constant_mae')).toBe('2.5');
    expect(col(sum12, 'best_constant_mre')).toBe('0.5');
    expect(col(sum12, 'beats_best_constant')).toBe('false');
    expect(col(sum12, 'arm_beats_constant')).toBe('false');
    expect(Number(col(sum12, 'arm_relative_error'))).toBeCloseTo(0.03, 12);
    expect(col(sum12, 'rung_tested')).toBe('true');
    expect(col(sum12, 'metric')).toBe('mae');
    expect(col(sum12, 'blew_up')).toBe('false');
    // Arm max at n = 12 (mae 1.2) beats 1.5; at n = 8 both arms beat 9.
    const max12 = test.find((r) => col(r, 'arm') === 'max' && col(r, 'nodes') === '12')!;
    expect(col(max12, 'beats_best_constant')).toBe('true');
    expect(col(max12, 'no_arm_beats_constant')).toBe('false');
    // The fit gate, on every row of the arm.
    for (const row of body) {
      expect(col(row, 'fit_gate')).toBe('0.05');
      expect(col(row, 'arm_fitted')).toBe(col(row, 'arm') === 'max' ? 'true' : 'false');
      expect(Number(col(row, 'arm_fit_median_mre'))).toBe(col(row, 'arm') === 'max' ? 0.006 : 0.081);
    }
  });

  it('lists a run that blew up in the CSV at every rung instead of dropping it', () => {
    const spec = tinySpec();
    const runs = fakeRuns(spec);
    runs[1] = { ...unmeasuredResult(planRuns(spec)[1]!, 'diverged', 'loss became NaN at step 7'), divergedAt: 7 };
    const lines = resultsCsv(buildResults(spec, runs, engine)).trim().split('\n');
    const header = lines[0]!.split(',');
    const rows = lines.filter((l) => l.includes(',diverged,')).map((l) => l.split(','));
    expect(rows).toHaveLength(spec.test.sizes.length);
    for (const r of rows) {
      expect(r[header.indexOf('set')]).toBe('test');
      expect(r[header.indexOf('blew_up')]).toBe('true');
      expect(r[header.indexOf('mae')]).toBe('');
    }
  });

  it('keeps the JSON export the CLI document, with the fit gate, baselines and adjustment in it', () => {
    const spec = tinySpec();
    const doc = buildResults(spec, fakeRuns(spec), engine);
    const parsed = JSON.parse(resultsJson(doc)) as typeof doc;
    expect(parsed.comparison.fit.map((f) => f.fitted)).toEqual([true, true]);
    expect(parsed.comparison.adjustment).toEqual({ method: 'holm', tests: 2 });
    expect(parsed.comparison.rungs[0]!.baseline.best).toBeCloseTo(5.8, 12);
    expect(parsed.comparison.rungs[0]!.arms[1]!.relative).toBeCloseTo(0.03, 12);
  });

  it('quotes CSV cells that could split a row or start a formula', () => {
    const spec = tinySpec();
    const runs = fakeRuns(spec);
    runs[0] = { ...runs[0]!, status: 'failed', reason: '=HYPERLINK("x"), "quoted"', ladder: [], inDistribution: null };
    const csv = resultsCsv(buildResults(spec, runs, engine));
    expect(csv).toContain('"=HYPERLINK(""x""), ""quoted"""');
  });
});

describe('fit gate, baselines, adjusted p and the answer line', () => {
  it('states each arm\'s fit gate in words with the numbers: fitted, not fitted, not yet run', () => {
    const spec = tinySpec({ seeds: { count: 4, base: 3 } });
    const runs = fakeRuns(spec, { fitMre: (arm, seed) => (arm === 0 ? 0.006 : [0.081, 0.02, 0.09, 0.07][seed]!) });
    const view = evidenceOf(spec, runs);
    expect(view.gates.map((g) => g.status)).toEqual(['fitted', 'not-fitted']);
    expect(view.gates[0]!.text).toBe('max: fitted — in-distribution relative error 0.6% (median of 4 seeds, all within the 5% gate)');
    // Median of 0.02, 0.07, 0.081, 0.09 is 0.0755; one seed of four is within.
    expect(view.gates[1]!.text).toBe(
      'sum: not fitted — in-distribution relative error 7.6% (median of 4 seeds, 1 within the 5% gate). No verdict calls a winner for sum. Train longer or raise the budget.',
    );
    expect(view.gates[1]!.label).toBe('not fitted');
    expect(view.gateNote).toMatch(/fresh graphs of the training sizes.*at most 5%/);
    // The fit message is said once in the gate rows, not again as a caveat per verdict.
    expect(view.caveats.some((c) => /is not fitted/.test(c.text))).toBe(false);

    // Only arm max has finished: sum is "not run yet", max's median is "so far".
    const partial = evidenceOf(spec, runs.filter((r) => r.armIndex === 0 && r.seedIndex < 3));
    expect(partial.gates.map((g) => g.status)).toEqual(['fitted', 'not-run']);
    expect(partial.gates[0]!.text).toBe('max: fitted — in-distribution relative error 0.6% (median of 3 seeds so far, all within the 5% gate)');
    expect(partial.gates[1]!.text).toMatch(/^sum: not run yet — /);
    expect(partial.gates[1]!.median).toBeNaN();
  });

  it('gives the constant baselines per rung, each arm\'s relative error, a "!" sentence and the no-skill note', () => {
    const spec = tinySpec();
    // Best constant at n = 8: 0.5 (no arm beats it); at n = 12: 1.5 (max 1.2 beats it, sum 2.2 does not).
    const view = evidenceOf(spec, fakeRuns(spec, { bestMae: (size) => (size === 8 ? 0.5 : 1.5) }));
    expect(view.baselines.map((b) => [b.size, b.best, b.train, b.bestRelative, b.trainRelative, b.noArmBeatsConstant])).toEqual([
      [8, 0.5, 1.5, 0.5, 0.7, true],
      [12, 1.5, 2.5, 0.5, 0.7, false],
    ]);
    const [at8, at12] = view.verdicts;
    expect(at12!.constant).toBe(1.5);
    expect(at12!.constantTrain).toBe(2.5);
    expect(at12!.relativeA).toBeCloseTo(0.02, 12);
    expect(at12!.relativeB).toBeCloseTo(0.03, 12);
    expect(at12!.constantWarningA).toBe('');
    expect(at12!.constantWarningB).toMatch(/^sum does not beat the best constant predictor here: its mean mae 2\.2\d* is not below 1\.5/);
    expect(at8!.constantWarningA).toMatch(/^max does not beat/);
    expect(view.noSkill).toEqual(['No arm beats the best constant predictor at n = 8: nothing was learned there that a verdict could compare.']);

    const fine = evidenceOf(spec, fakeRuns(spec));
    expect(fine.noSkill).toEqual([]);
    expect(fine.verdicts.every((v) => v.constantWarningA === '' && v.constantWarningB === '')).toBe(true);
  });

  it('shows the raw and the Holm-adjusted p, with the verdict taken from the adjusted one', () => {
    const spec = manySeeds();
    const view = evidenceOf(spec, fakeRuns(spec));
    expect(view.adjustment.method).toBe('holm');
    expect(view.adjustment.header).toBe('p (Holm, 2 tests)');
    expect(view.adjustment.note).toMatch(/Holm–Bonferroni across every tested rung and arm pair \(2 tests\)/);
    for (const v of view.verdicts) {
      // All 8 pairs favour max: exact two-sided p = 2/2^8; two equal p-values, both doubled by Holm.
      expect(v.pRaw).toBeCloseTo(2 / 256, 12);
      expect(v.pAdjusted).toBeCloseTo(4 / 256, 12);
      expect(v.kind).toBe('a-better');
    }
    expect(view.headline!.winner).toBe('max');
    expect(view.headline!.lead).toBe('At n = 12: max extrapolates better');
    expect(view.headline!.reason).toBe('');
  });

  it('tests only a declared primary rung; the others are descriptive, with no adjusted p and no winner', () => {
    const spec = manySeeds({ test: { sizes: [8, 12], graphsPerRung: 4, validationGraphs: 8, primary: { size: 8, scale: 1 } } });
    const view = evidenceOf(spec, fakeRuns(spec));
    expect(view.adjustment.header).toBe('p (primary rung)');
    expect(view.adjustment.note).toMatch(/Only the declared primary rung, n = 8, is tested/);
    const [at8, at12] = view.verdicts;
    expect(at8!.tested).toBe(true);
    expect(at8!.pAdjusted).toBeCloseTo(2 / 256, 12);
    expect(at8!.kind).toBe('a-better');
    expect(at12!.tested).toBe(false);
    expect(at12!.pAdjusted).toBeNaN();
    expect(at12!.pRaw).toBeCloseTo(2 / 256, 12);
    expect(at12!.kind).toBe('not-tested');
    // The answer line reads the primary rung, not the farther descriptive one.
    expect(view.headline!.size).toBe(8);
    expect(view.headline!.where).toBe('the primary rung');
  });

  it('never names a winner on the answer line for an arm that is not fitted, and says why', () => {
    const spec = manySeeds();
    const view = evidenceOf(spec, fakeRuns(spec, { fitMre: (arm) => (arm === 0 ? 0.006 : 0.081) }));
    expect(view.verdicts.every((v) => v.kind === 'not-fitted')).toBe(true);
    const h = view.headline!;
    expect(h.kind).toBe('not-fitted');
    expect(h.winner).toBeNull();
    expect(h.lead).toBe('At n = 12 — not judged: an arm is not fitted');
    expect(h.lead).not.toMatch(/extrapolates better/);
    expect(h.reason).toBe(
      'sum missed the fit gate: in-distribution relative error 8.1% against the 5% gate, so no winner is called. Train longer or raise the budget.',
    );
  });

  it('still names a missed fit gate on the answer line when there are too few seeds to judge', () => {
    const spec = tinySpec();
    const view = evidenceOf(spec, fakeRuns(spec, { fitMre: (arm) => (arm === 0 ? 0.006 : 0.081) }));
    const h = view.headline!;
    expect(h.kind).toBe('too-few-seeds');
    expect(h.winner).toBeNull();
    expect(h.reason).toMatch(/^With 2 pairs the smallest possible two-sided signed-rank p is 0\.5.* Also, sum missed the fit gate: in-distribution relative error 8\.1% against the 5% gate\.$/);
  });

  it('says "neither beats a constant" on the answer line when the better arm is no better than a constant', () => {
    const spec = manySeeds();
    // Best constant 1.0 at both rungs: max (0.8+, 1.2+) does not beat it at n = 12.
    const view = evidenceOf(spec, fakeRuns(spec, { bestMae: () => 1 }));
    const h = view.headline!;
    expect(h.size).toBe(12);
    expect(h.kind).toBe('no-skill');
    expect(h.winner).toBeNull();
    expect(h.lead).toBe('At n = 12: neither beats a constant');
    expect(h.reason).toMatch(/^Predicting one number for every node gives mae 1 here, against max 1\.2\d* and sum 2\.2\d*/);
  });

  it('shows runs that blew up as "blew up (ranked worst)" in the per-seed view and the verdict rows', () => {
    const spec = tinySpec();
    const runs = fakeRuns(spec);
    const plan = planRuns(spec).find((p) => p.armIndex === 1 && p.seedIndex === 0)!;
    runs[plan.index] = { ...unmeasuredResult(plan, 'diverged', 'gradient norm was not finite'), divergedAt: 12 };
    // A finished run whose error at n = 12 is not a number blew up there only.
    const other = planRuns(spec).find((p) => p.armIndex === 0 && p.seedIndex === 1)!;
    runs[other.index] = { ...runs[other.index]!, ladder: runs[other.index]!.ladder.map((l) => (l.size === 12 ? { ...l, metrics: { ...l.metrics, mae: NaN } } : l)) };
    const view = evidenceOf(spec, runs);
    expect(view.blownUp.map((b) => [b.arm, b.size, b.seeds, b.label])).toEqual([
      ['sum', 8, [plan.seed], 'blew up (ranked worst)'],
      ['max', 12, [other.seed], 'blew up (ranked worst)'],
      ['sum', 12, [plan.seed], 'blew up (ranked worst)'],
    ]);
    const at12 = view.verdicts.find((v) => v.size === 12)!;
    expect([at12.blownUpA, at12.blownUpB]).toEqual([1, 1]);
    expect(at12.blownUpNoteA).toBe('blew up (ranked worst)');
    expect(at12.constantWarningB).toMatch(/sum had a run blow up here/);
    const at8 = view.verdicts.find((v) => v.size === 8)!;
    expect([at8.blownUpA, at8.blownUpB]).toEqual([0, 1]);
    // The paired difference is infinite (n = 8) or undefined (n = 12): the figure names who blew up instead of plotting a point.
    expect(view.diffs.map((d) => [d.size, d.blownUp])).toEqual([
      [8, 'sum blew up (ranked worst)'],
      [12, 'max and sum blew up (ranked worst)'],
    ]);
    // The curve keeps the finite seeds and says how many blew up.
    expect(view.curves.find((c) => c.arm === 'sum' && c.size === 8)!.blownUp).toBe(1);
    expect(view.failures).toHaveLength(1);
    expect(view.failures[0]!.treatment).toMatch(/worst outcome/);
  });
});

describe('progress', () => {
  it('summarises runs and draws a sparkline path', () => {
    const spec = tinySpec();
    const plans = planRuns(spec);
    const view = progressView(
      {
        state: 'running',
        specHash: 'x',
        tracks: plans.map((plan, i) => ({
          plan,
          phase: i === 0 ? 'ok' : i === 1 ? 'running' : 'waiting',
          kept: false,
          step: i === 1 ? 5 : 0,
          totalSteps: 20,
          losses: [1, 0.5],
          startedAt: i === 1 ? 0 : null,
          finishedAt: null,
        })),
        results: [],
        engine: null,
        workers: 2,
        startedAt: 0,
        finishedAt: null,
        keptCount: 0,
        reusedCount: 0,
        persistent: true,
        storageNote: null,
      },
      10_000,
    );
    expect(view.done).toBe(1);
    expect(view.running).toBe(1);
    expect(view.rows[1]!.status).toBe('5 / 20 steps');
    expect(view.rows[1]!.detail).toMatch(/left/);
    expect(view.eta).toMatch(/to go/);
    expect(sparklinePath([3, 2, 1], 100, 20)).toMatch(/^M2\.0,2\.0L50\.0,10\.0L98\.0,18\.0$/);
    expect(sparklinePath([1], 100, 20)).toBe('');
  });
});

describe('training switches and the fit gate on the sheet', () => {
  it('arm cards say which training switches each arm runs, and mark them when arms differ', () => {
    const spec = tinySpec();
    const draft = {
      ...spec,
      budget: { ...spec.budget, schedule: { kind: 'warmup-cosine' as const, warmup: 50, floor: 0.05 } },
      arms: [spec.arms[0]!, { ...spec.arms[1]!, sparsity: 1e-5, stepSupervision: true }],
    };
    const cards = armCards(draft, () => '#000');
    expect(cards[0]!.training).toEqual({ text: 'warm-up 50 steps, then cosine to 0.05× the rate', own: false });
    expect(cards[1]!.training).toEqual({ text: 'warm-up 50 steps, then cosine to 0.05× the rate; L1 0.00001; step supervision', own: true });
    expect(cards[0]!.differs.has('training')).toBe(true);
    expect(armCards(spec, () => '#000')[0]!.training.text).toBe('constant rate');
  });

  it('the fit gate and the schedule are ordinary, validated spec fields', () => {
    const spec = tinySpec();
    const gated = applyEdit(spec, { kind: 'field', path: ['budget', 'fitGate'], value: 0.1 });
    expect(validateDraft(gated)).toMatchObject({ ok: true });
    const bad = validateDraft(applyEdit(spec, { kind: 'field', path: ['budget', 'fitGate'], value: 0 }));
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.problems.join(' ')).toMatch(/budget\.fitGate/);
    const cosine = applyEdit(spec, { kind: 'field', path: ['budget', 'schedule'], value: { kind: 'warmup-cosine', warmup: 20, floor: 0.1 } });
    expect(validateDraft(cosine)).toMatchObject({ ok: true });
    const constant = applyEdit(cosine, { kind: 'field', path: ['budget', 'schedule'], value: undefined });
    expect('schedule' in constant.budget).toBe(false);
  });
});

describe('automatic log scale', () => {
  it('counts the decades the plotted errors span', async () => {
    const { decadesSpanned, AUTO_LOG_DECADES } = await import('../../src/ui/evidence.ts');
    expect(decadesSpanned([0.1, 1, 10])).toBeCloseTo(2, 12);
    expect(decadesSpanned([0, -1, Infinity, NaN, 5])).toBe(0);
    expect(decadesSpanned([2, 3])).toBeLessThan(AUTO_LOG_DECADES);
    const spec = tinySpec();
    const doc = buildResults(spec, fakeRuns(spec), engine);
    const view = buildEvidence(doc);
    expect(view.errorDecades).toBeCloseTo(decadesSpanned([...view.curves.flatMap((c) => [c.low, c.mean, c.high]), ...view.seeds.map((p) => p.value)]), 12);
  });
});
