/**
 * The recurrence task at the spec's edge: defaults, refusals that name the
 * field and the allowed values, and the object carried by hashes and links
 * while string tasks keep their canonical form.
 */
import { describe, expect, it } from 'vitest';
import { validateSpec } from '../../src/experiment/check.ts';
import { specHash } from '../../src/experiment/results.ts';
import type { SpecInput } from '../../src/experiment/spec.ts';
import { canonicalJson } from '../../src/util/hash.ts';
import { decodeSpecLink, encodeSpecLink } from '../../src/share/link.ts';
import { specRefusal, tinySpec } from '../helpers.ts';
import { spawnSync } from 'node:child_process';
import { taskInfo } from '../../src/ui/catalogue.ts';
import { applyEdit } from '../../src/ui/spec-draft.ts';
import { fileURLToPath } from 'node:url';

const base = (task: unknown, over: Record<string, unknown> = {}): Record<string, unknown> => ({
  farfield: 1,
  question: 'test: recurrence',
  task,
  train: { family: 'dag', sizes: [5, 8], graphs: 32 },
  test: { sizes: [8, 12] },
  arms: [
    { name: 'max', model: { aggregator: 'max' } },
    { name: 'sum', model: { aggregator: 'sum' } },
  ],
  ...over,
});

describe('task as a recurrence object', () => {
  it('fills the defaults: { semiring } alone is the shortest-path problem', () => {
    const spec = validateSpec(base({ recurrence: { semiring: 'min-plus' } }));
    expect(spec.task).toEqual({ recurrence: { semiring: 'min-plus', source: 'drawn', others: 'edge-weights', direction: 'forward' } });
  });

  it('names the field and the allowed values', () => {
    expect(specRefusal(base({ recurrence: { semiring: 'min-times' } }))).toBe(
      'task.recurrence.semiring: got "min-times", allowed "min-plus" | "max-min" | "max-plus" | "or-and" | "plus-times" | "max-times"',
    );
    expect(specRefusal(base({ recurrence: { semiring: 'min-plus', direction: 'up' } }))).toBe('task.recurrence.direction: got "up", allowed "forward" | "backward"');
    expect(specRefusal(base({ recurrence: { semiring: 'min-plus', weights: 'unit' } }))).toBe('task.recurrence: unknown field "weights"');
    expect(specRefusal(base({ recurrence: {} }))).toMatch(/^task\.recurrence\.semiring: got nothing, allowed "min-plus" \|/);
    expect(specRefusal(base({ recurrence: { semiring: 'min-plus' }, extra: 1 }))).toMatch(/unknown field "extra"/);
    expect(specRefusal(base(5))).toBe('task: got 5, expected a task id (string) or { "recurrence": { "semiring": ... } }');
    expect(specRefusal(base('x'.repeat(41)))).toBe(`task: got "${'x'.repeat(41)}", allowed at most 40`);
    expect(specRefusal(base('no-such-task'))).toMatch(/^task: got "no-such-task", allowed "shortest-path" \| .* or \{ "recurrence": \.\.\. \}/);
  });

  it('refuses combinations without meaning, naming the field', () => {
    expect(specRefusal(base({ recurrence: { semiring: 'min-plus', source: 'drawn-widest-edge' } }))).toMatch(/^task\.recurrence\.source: got "drawn-widest-edge" with semiring "min-plus", allowed only with semiring "max-min"/);
    expect(specRefusal(base({ recurrence: { semiring: 'max-plus', source: 'none' } }))).toMatch(/^task\.recurrence\.source: got "none" with others "edge-weights"/);
    expect(specRefusal(base({ recurrence: { semiring: 'or-and' } }))).toMatch(/^task\.recurrence\.others: got "edge-weights" with semiring "or-and", allowed "unit"/);
    expect(specRefusal(base({ recurrence: { semiring: 'max-plus' } }, { train: { family: 'er', sizes: [5, 8] } }))).toMatch(
      /^train\.family: task "recurrence:max-plus\/drawn\/edge-weights\/forward" does not make sense on family "er"; allowed "dag"/,
    );
  });

  it('refuses max-times weights and weight-scale rungs beyond 1', () => {
    const task = { recurrence: { semiring: 'max-times' } };
    expect(specRefusal(base(task, { train: { family: 'er', sizes: [5, 8] } }))).toMatch(/^train\.weightRange: got \[1, 10\], allowed within \(0, 1\] for semiring "max-times"/);
    expect(specRefusal(base(task, { train: { family: 'er', sizes: [5, 8], weightRange: [0.5, 0.8] }, test: { sizes: [8], weightScales: [1, 2] } }))).toMatch(
      /^test\.weightScales\[1\]: got 2, which takes factors up to 1\.6; max-times allows at most 1/,
    );
    expect(() => validateSpec(base(task, { train: { family: 'er', sizes: [5, 8], weightRange: [0.5, 0.8] }, test: { sizes: [8], weightScales: [0.5, 1.25] } }))).not.toThrow();
  });

  it('travels in the hash and the share link; a string task keeps its canonical form', async () => {
    const a = tinySpec({ task: { recurrence: { semiring: 'min-plus' } } } as Partial<SpecInput>);
    const b = tinySpec({ task: { recurrence: { semiring: 'min-plus', others: 'unit' } } } as Partial<SpecInput>);
    expect(specHash(a)).not.toBe(specHash(b));
    const decoded = await decodeSpecLink(await encodeSpecLink(b));
    expect(decoded.spec).toEqual(b);
    expect(specHash(decoded.spec)).toBe(specHash(b));
    expect(canonicalJson(tinySpec())).toContain('"task":"shortest-path"');
  });
});

describe('a recurrence on the command line', () => {
  it('farfield sample --task takes the recurrence as JSON and refuses it as the spec would', () => {
    const bin = fileURLToPath(new URL('../../bin/farfield.mjs', import.meta.url));
    const run = (...args: string[]) => spawnSync(process.execPath, [bin, 'sample', ...args], { encoding: 'utf8', timeout: 60_000 });
    const ok = run('--task', '{"recurrence":{"semiring":"plus-times","others":"unit"}}', '--family', 'dag', '--nodes', '6', '--seed', '2');
    expect(ok.status, ok.stderr).toBe(0);
    const sample = JSON.parse(ok.stdout) as { task: unknown; graphs: Array<{ edges: Array<[number, number, number]>; target: number[]; source: number }> };
    expect(sample.task).toEqual({ recurrence: { semiring: 'plus-times', source: 'drawn', others: 'unit', direction: 'forward' } });
    // Path counts from the source, recomputed by hand in topological (node) order.
    const g = sample.graphs[0]!;
    const count = g.target.map((_, v) => (v === g.source ? 1 : 0));
    for (let v = 0; v < count.length; v++) for (const [a, b] of g.edges) if (b === v) count[v]! += count[a]!;
    expect(g.target).toEqual(count);
    const bad = run('--task', '{"recurrence":{"semiring":"or-and"}}', '--family', 'dag', '--nodes', '6');
    expect(bad.status).not.toBe(0);
    expect(bad.stderr).toMatch(/--task: task\.recurrence\.others: got "edge-weights" with semiring "or-and", allowed "unit"/);
  });
});

describe('in the sheet', () => {
  it('the task gloss carries the suggestion, and picking a built-in task replaces the recurrence', () => {
    const ref = { recurrence: { semiring: 'max-min', source: 'drawn-widest-edge', others: 'edge-weights', direction: 'forward' } } as const;
    const info = taskInfo(ref);
    expect(info?.id).toBe('recurrence:max-min/drawn-widest-edge/edge-weights/forward');
    expect(info?.suggestion).toMatch(/^max-min \(⊕ = max, ⊗ = min\): aggregator "max" for ⊕, no message layer in the catalogue computes ⊗ here/);
    expect(taskInfo({ recurrence: { ...ref.recurrence, semiring: 'min-plus' } })).toBeUndefined(); // refused combination: the draft's validation names it
    const draft = tinySpec({ task: ref } as Partial<SpecInput>);
    expect(applyEdit(draft, { kind: 'task', task: 'hop-count' }).task).toBe('hop-count');
  });
});
