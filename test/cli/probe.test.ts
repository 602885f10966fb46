/**
 * `farfield probe` as a user runs it: a real child process of bin/farfield.mjs
 * on a tiny preset (30 training steps, hidden 8).
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { ProbeDocument } from '../../src/inspect/probe-document.ts';

const root = fileURLToPath(new URL('../..', import.meta.url));
const bin = join(root, 'bin/farfield.mjs');
const preset = join(root, 'test/fixtures/tiny-probe.json');

function farfield(...args: string[]) {
  const r = spawnSync(process.execPath, [bin, ...args], { cwd: root, encoding: 'utf8', timeout: 120_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe('farfield probe', () => {
  it('--json: audit rows, three probes and a trace for both arms', () => {
    const out = farfield('probe', preset, '--json', '--quiet');
    expect(out.code, out.stderr).toBe(0);
    const doc = JSON.parse(out.stdout) as ProbeDocument;
    expect(doc.kind).toBe('farfield-probes');
    expect(doc.seeds).toEqual([3]);
    expect(doc.arms.map((a) => a.arm)).toEqual(['max', 'sum']);
    for (const arm of doc.arms) {
      expect(arm.runs).toHaveLength(1);
      const run = arm.runs[0]!;
      expect(run.status).toBe('ok');
      const checks = run.audit.map((r) => r.check);
      for (const check of ['permutation invariance', 'chunked aggregation', 'idempotence', 'neutral message', 'monoid action', 'positive homogeneity', 'asynchronous replay']) {
        expect(checks.some((c) => c.startsWith(check)), `${arm.arm}: ${check}`).toBe(true);
      }
      for (const row of run.audit) {
        expect(typeof row.expected).toBe('string');
        expect([true, false, null]).toContain(row.pass);
      }
      expect(run.probes.map((p) => p.kind)).toEqual(['scale', 'length', 'message']);
      for (const probe of run.probes) {
        expect(probe.points.length).toBeGreaterThan(5);
        expect(probe.trainingRange).toHaveLength(2);
      }
      expect(run.trace!.steps.length).toBe(run.trace!.stepsRun + 1);
      expect(arm.mean!.audit).toHaveLength(run.audit.length);
    }
    // aggregator algebra is decided by the arm, not by training
    const idem = (arm: number) => doc.arms[arm]!.runs[0]!.audit.find((r) => r.check.startsWith('idempotence'))!;
    expect(idem(0)).toMatchObject({ worst: 0, pass: true });
    expect(idem(1)).toMatchObject({ mean: 1, pass: true });
  });

  it('text: the audit table, probe tables and trace for the chosen arm; bad arms are refused', () => {
    const out = farfield('probe', preset, '--arms', 'sum', '--quiet');
    expect(out.code, out.stderr).toBe(0);
    expect(out.stdout).toMatch(/Arm "sum"/);
    expect(out.stdout).not.toMatch(/Arm "max"/);
    expect(out.stdout).toMatch(/Algebraic audit/);
    expect(out.stdout).toMatch(/idempotence a ⊕ a = a .* not 0/);
    expect(out.stdout).toMatch(/Scale sweep/);
    expect(out.stdout).toMatch(/Length sweep/);
    expect(out.stdout).toMatch(/Message function/);
    expect(out.stdout).toMatch(/worst relative deviation: outside the training range/);
    expect(out.stdout).toMatch(/Alignment trace/);
    const bad = farfield('probe', preset, '--arms', 'nope');
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/--arms: got "nope"/);
  });
});
