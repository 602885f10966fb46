/**
 * A recurrence task end to end through the real command line: `farfield check`
 * prints the suggested aggregator and message layer, and `farfield run` trains
 * and scores both arms of a tiny preset on every rung (sizes × weight scales).
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../..', import.meta.url));
const fixture = join(root, 'test/fixtures/tiny-recurrence.json');

function farfield(...args: string[]) {
  const r = spawnSync(process.execPath, [join(root, 'bin/farfield.mjs'), ...args], { cwd: root, encoding: 'utf8', timeout: 120_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

interface Doc {
  spec: { task: unknown };
  runs: Array<{ status: string; ladder: Array<{ size: number; scale: number; metrics: { mae: number } }> }>;
}

describe('recurrence task through the engine', () => {
  it('check suggests the aligned aggregator from the catalogue', () => {
    const { code, stdout } = farfield('check', fixture);
    expect(code).toBe(0);
    expect(stdout).toMatch(/suggested for max-plus \(⊕ = max, ⊗ = \+\): aggregator "max" or "smooth-max" for ⊕, message layer "max-plus" or "smooth-max-plus"/);
  });

  it('run trains both arms and scores every rung', () => {
    const { code, stdout, stderr } = farfield('run', fixture, '--json', '--quiet', '--workers', '2');
    expect(code, stderr).toBe(0);
    const doc = JSON.parse(stdout) as Doc;
    expect(doc.spec.task).toEqual({ recurrence: { semiring: 'max-plus', source: 'none', others: 'node-weights', direction: 'backward' } });
    expect(doc.runs).toHaveLength(2);
    for (const run of doc.runs) {
      expect(run.status).toBe('ok');
      expect(run.ladder.map((l) => [l.size, l.scale])).toEqual([[8, 1], [8, 2], [12, 1], [12, 2]]);
      for (const rung of run.ladder) expect(Number.isFinite(rung.metrics.mae)).toBe(true);
    }
  });
});
