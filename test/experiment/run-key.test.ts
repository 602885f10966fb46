/** What a run's numbers depend on: the run key changes exactly when the run would compute something else. */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { validateSpec } from '../../src/experiment/check.ts';
import { planRuns } from '../../src/experiment/plan.ts';
import { runKey } from '../../src/experiment/run-key.ts';

interface Raw {
  question: string;
  expectation: string;
  metric: string;
  budget: Record<string, unknown>;
  seeds: Record<string, unknown>;
  model: Record<string, unknown>;
  test: Record<string, unknown>;
  arms: Array<{ name: string; model: Record<string, unknown> }>;
}
const raw = () => JSON.parse(readFileSync(new URL('../../presets/quick-demo.json', import.meta.url), 'utf8')) as Raw;
const keys = (spec: ReturnType<typeof validateSpec>) => planRuns(spec).map((p) => `${p.arm}|${p.seed}|${runKey(spec, p)}`);

describe('runKey', () => {
  it('ignores the question, the expectation, arm names, the fit gate and extra seeds', () => {
    const base = validateSpec(raw());
    const edited = raw();
    edited.question = 'Another question?';
    edited.expectation = 'Another expectation.';
    edited.budget.fitGate = 0.2;
    edited.seeds.count = 12;
    const spec = validateSpec(edited);
    const before = planRuns(base).map((p) => runKey(base, p));
    const after = planRuns(spec).map((p) => runKey(spec, p));
    expect(after.slice(0, before.length)).toEqual(before);
    // Renaming an arm or adding a third leaves the first arms' runs alone.
    const third = raw();
    third.arms = [{ ...third.arms[0]!, name: 'max renamed' }, third.arms[1]!, { name: 'mean', model: { aggregator: 'mean' } }];
    const t = validateSpec(third);
    const firstTwo = planRuns(t).filter((p) => p.armIndex < 2).map((p) => runKey(t, p));
    expect(firstTwo).toEqual(before);
  });

  it('changes with anything that reaches training or scoring', () => {
    const base = keys(validateSpec(raw()));
    const changes: Array<(r: Raw) => void> = [
      (r) => (r.budget.steps = 301),
      (r) => (r.model.hidden = 17),
      (r) => (r.test.sizes = [8, 16]),
      (r) => (r.seeds.base = 2),
      (r) => (r.metric = 'mre'),
      (r) => (r.arms[0]!.model.aggregator = 'mean'),
    ];
    for (const change of changes) {
      const r = raw();
      change(r);
      const k = keys(validateSpec(r));
      expect(k.filter((x) => base.includes(x)).length, String(change)).toBeLessThan(base.length);
    }
  });
});
