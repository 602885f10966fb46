/**
 * The sheet's logic without a browser: editing a draft, naming bad fields,
 * the evidence rows and the CSV export built from a results document.
 */
import { describe, expect, it } from 'vitest';
import { applyEdit, armCards, parseNumberList, problemFields, uniqueArmName, validateDraft } from '../../src/ui/spec-draft.ts';
import { buildEvidence } from '../../src/ui/evidence.ts';
import { CSV_COLUMNS, resultsCsv } from '../../src/ui/export.ts';
import { progressView, sparklinePath } from '../../src/ui/progress-view.ts';
import { buildResults } from '../../src/experiment/results.ts';
import { planRuns } from '../../src/experiment/plan.ts';
import type { RunResult } from '../../src/experiment/run.ts';
import { tinySpec } from '../helpers.ts';
import { unmeasuredResult } from '../../src/experiment/run-record.ts';

const engine = { name: 'farfield', version: '0.1.0', backend: 'wasm', threads: 1, host: 'browser' } as const;

/** Made-up results: arm 0 has lower error than arm 1 on every rung. */
function fakeRuns(spec = tinySpec()): RunResult[] {
  return planRuns(spec).map((plan) => ({
    ...unmeasuredResult(plan),
    stepsDone: spec.budget.steps,
    keptStep: spec.budget.steps,
    lossCurve: [3, 2, 1],
    lossEvery: 1,
    parameters: 10,
    inDistribution: { mae: 0.5 + plan.armIndex, mre: 0.1, miss: 0.2, nodes: 10 },
    ladder: spec.test.sizes.map((size) => ({
      family: spec.train.family,
      size,
      scale: 1,
      metrics: { mae: size / 10 + plan.armIndex + plan.seedIndex * 0.01, mre: 0.1, miss: 0.2, nodes: 10 },
      depthMean: size / 4,
      depthMax: size / 2,
      meanDegree: 3,
    })),
    seconds: 1,
  }));
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

  it('writes one CSV row per run and rung plus one validation row per run', () => {
    const spec = tinySpec();
    const doc = buildResults(spec, fakeRuns(spec), engine);
    const lines = resultsCsv(doc).trim().split('\n');
    expect(lines[0]).toBe(CSV_COLUMNS.join(','));
    expect(lines).toHaveLength(1 + doc.runs.length * (1 + spec.test.sizes.length));
    expect(lines[1]).toContain(',validation,');
  });

  it('quotes CSV cells that could split a row or start a formula', () => {
    const spec = tinySpec();
    const runs = fakeRuns(spec);
    runs[0] = { ...runs[0]!, status: 'failed', reason: '=HYPERLINK("x"), "quoted"', ladder: [], inDistribution: null };
    const csv = resultsCsv(buildResults(spec, runs, engine));
    expect(csv).toContain('"=HYPERLINK(""x""), ""quoted"""');
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
