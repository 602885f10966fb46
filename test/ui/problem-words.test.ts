/** Problems name the on-screen label and the arm, once each. */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { ARM_LABELS, SETUP_LABELS, armNamesOf, problemInWords, problemsInWords } from '../../src/ui/problem-words.ts';
import { validateDraft } from '../../src/ui/spec-draft.ts';

const source = (file: string) => readFileSync(new URL(`../../src/ui/${file}`, import.meta.url), 'utf8');

describe('problems in the reader\'s words', () => {
  it('uses labels that are still on screen', () => {
    const setup = source('ff-setup.ts') + source('ff-question.ts');
    for (const label of Object.values(SETUP_LABELS)) expect(setup, label).toContain(label);
    const card = source('ff-arm-card.ts');
    for (const label of Object.values(ARM_LABELS)) expect(card, label).toContain(label);
  });

  it('names the arm by letter and name, and the field by its label', () => {
    expect(problemInWords('arms[0].model.hidden: got 0, allowed at least 1', ['max', 'sum'])).toBe('Arm A (max) › Hidden width: got 0, allowed at least 1');
    expect(problemInWords('arms[1].learningRate: got -1, allowed at least 0.000001', ['max', 'sum'])).toBe("Arm B (sum) › Learning rate (empty: the budget's): got -1, allowed at least 0.000001");
    expect(problemInWords('model.steps.trainJitter: got -1, allowed at least 0', ['max'])).toBe('Every arm › Training step jitter: got -1, allowed at least 0');
    expect(problemInWords('test.sizes[1]: got -1, allowed at least 3', [])).toBe('Setup › Test sizes (nodes, comma-separated), entry 2: got -1, allowed at least 3');
    expect(problemInWords('something else entirely', [])).toBe('something else entirely');
  });

  it('translates every problem of a badly edited sheet, each once', () => {
    const raw = JSON.parse(readFileSync(new URL('../../presets/quick-demo.json', import.meta.url), 'utf8'));
    raw.arms[0].model.hidden = 0;
    raw.train.sizes = [0, 8];
    raw.budget.steps = 0;
    raw.seeds.count = 100;
    raw.model.steps.trainJitter = -1;
    raw.arms[1].learningRate = -1;
    const v = validateDraft(raw);
    expect(v.ok).toBe(false);
    if (v.ok) return;
    const words = problemsInWords([...v.problems, ...v.problems], armNamesOf(JSON.stringify(raw)));
    expect(words).toHaveLength(v.problems.length);
    for (const w of words) expect(w).toMatch(/^(Setup|Every arm|Arm [A-Z] \([^)]+\)) › [^:]+: /);
    expect(words).toContain('Arm A (max) › Hidden width: got 0, allowed at least 1');
  });
});
