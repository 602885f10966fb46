/**
 * The command line as a user runs it: real child processes of bin/farfield.mjs
 * with real worker_threads.
 */
import { describe, expect, it } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../..', import.meta.url));
const bin = join(root, 'bin/farfield.mjs');
const tiny = join(root, 'test/fixtures/tiny.json');

function farfield(...args: string[]) {
  const r = spawnSync(process.execPath, [bin, ...args], { cwd: root, encoding: 'utf8', timeout: 180_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

interface Doc {
  specHash: string;
  fingerprint: string;
  engine: { backend: string; threads: number; version: string };
  spec: { question: string };
  runs: Array<{ arm: string; seed: number; status: string; reason?: string; divergedAt?: number; ladder: Array<{ size: number; metrics: { mae: number } }> }>;
  comparison: {
    rungs: Array<{
      size: number;
      baseline: { best: number; train: number; bestRelative: number; trainRelative: number };
      arms: Array<{ arm: string; relative: number; beatsConstant: boolean; nonFinite: number }>;
      pairs: Array<{ verdict: { kind: string; pRaw: number; pAdjusted: number } }>;
    }>;
    fit: Array<{ arm: string; gate: number; median: number; fitted: boolean | null; passing: number }>;
    adjustment: { method: string; tests: number };
  };
}

describe('farfield run', () => {
  const first = farfield('run', tiny, '--json', '--quiet', '--workers', '2');
  const doc = JSON.parse(first.stdout) as Doc;

  it('prints a results document with the promised fields', () => {
    expect(first.code).toBe(0);
    expect(doc.specHash).toMatch(/^[0-9a-f]{16}$/);
    expect(doc.fingerprint).toMatch(/^[0-9a-f]{12}$/);
    expect(doc.engine).toMatchObject({ backend: 'wasm', threads: 1 });
    expect(doc.spec.question).toMatch(/Fixture/);
    expect(doc.runs).toHaveLength(4);
    for (const run of doc.runs) {
      expect(run.status).toBe('ok');
      expect(run.ladder.map((l) => l.size)).toEqual([8, 12]);
      expect(run.ladder[0]!.metrics.mae).toBeGreaterThan(0);
    }
    expect(doc.comparison.rungs[0]!.pairs[0]!.verdict.kind).toBe('too-few-seeds');
  });

  it('carries the fit gate, both baselines, relative errors and raw and adjusted p', () => {
    const c = doc.comparison;
    expect(c.adjustment).toEqual({ method: 'holm', tests: 2 });
    expect(c.fit.map((f) => [f.arm, f.gate, f.fitted])).toEqual([
      ['max', 0.05, false],
      ['sum', 0.05, false],
    ]);
    for (const rung of c.rungs) {
      expect(rung.baseline.best).toBeGreaterThan(0);
      expect(rung.baseline.train).toBeGreaterThanOrEqual(rung.baseline.best);
      for (const arm of rung.arms) expect(arm.relative).toBeGreaterThan(0);
      const v = rung.pairs[0]!.verdict;
      expect(v.pAdjusted).toBeGreaterThanOrEqual(v.pRaw);
    }
  });

  it('pins the fixture’s fingerprint: a change to the numbers must be deliberate (and bump the engine version)', () => {
    // Pinned from engine 0.3.0 (0.2.0 gave 261a01180d42; specHash pinned separately in test/util/spec-hash.test.ts).
    expect(doc.fingerprint).toBe('e7d1497b748d');
  });

  it('is deterministic: the same spec gives the same fingerprint, on one worker or two', () => {
    const again = JSON.parse(farfield('run', tiny, '--json', '--quiet', '--workers', '1').stdout) as Doc;
    expect(again.fingerprint).toBe(doc.fingerprint);
    expect(again.runs.map((r) => r.ladder)).toEqual(doc.runs.map((r) => r.ladder));
  });

  it('shards merge back to the unsharded fingerprint', () => {
    const dir = mkdtempSync(join(tmpdir(), 'ff-shard-'));
    for (const i of [1, 2]) expect(farfield('run', tiny, '--shard', `${i}/2`, '--out', join(dir, `part-${i}.json`), '--quiet', '--workers', '1').code).toBe(0);
    const merged = farfield('merge', join(dir, 'part-1.json'), join(dir, 'part-2.json'), '--json');
    expect(merged.code).toBe(0);
    expect((JSON.parse(merged.stdout) as Doc).fingerprint).toBe(doc.fingerprint);
  });

  it('prints a table with verdicts and the too-few-seeds caveat', () => {
    const text = farfield('run', tiny, '--quiet', '--workers', '2');
    expect(text.stdout).toMatch(/size\s+depth\s+degree\s+max\s+sum/);
    expect(text.stdout).toMatch(/too few seeds to tell/);
    // 2 pairs: smallest exact two-sided p = 2/2^2 = 0.5; with 2 rungs Holm doubles it, and 7 seeds are the fewest with 2/2^n < 0.05/2.
    expect(text.stdout).toMatch(/smallest possible two-sided signed-rank p is 0\.5, 1 after adjusting for 2 tests; run at least 7 seeds/);
    // 30 training steps do not fit the task: the gate says so with the numbers, and no winner is called.
    expect(text.stdout).toMatch(/Fit gate: .* at most 5%: max [\d.]+% NOT FITTED/);
    expect(text.stdout).toMatch(/max is not fitted: .* Train longer or raise the budget\./);
    expect(text.stdout).toMatch(/signed-rank p\s+p adj\. \(Holm, 2 tests\)\s+verdict/);
    expect(text.stdout).toMatch(/constant best\/train/);
    expect(text.stdout).toContain(`fingerprint ${doc.fingerprint}`);
  });

  it('a crashed or throwing worker marks its run failed while the others finish', () => {
    const r = farfield('run', tiny, '--json', '--quiet', '--workers', '2', '--inject-fault', '1:throw,2:exit');
    expect(r.code).toBe(0);
    const d = JSON.parse(r.stdout) as Doc;
    const byStatus = d.runs.map((x) => x.status);
    expect(byStatus).toEqual(['ok', 'failed', 'failed', 'ok']);
    expect(d.runs[1]!.reason).toMatch(/deliberate fault/);
    expect(d.runs[2]!.reason).toMatch(/exited with code 3/);
  });

  it('workers that throw while loading are given up after a few tries: the run settles with failed runs and the reason', () => {
    // Test hook in workers/node-worker.ts: the worker throws before it can say 'ready'.
    const r = spawnSync(process.execPath, [bin, 'run', tiny, '--json', '--quiet', '--workers', '2'], {
      cwd: root,
      encoding: 'utf8',
      timeout: 60_000,
      env: { ...process.env, FARFIELD_TEST_WORKER_LOAD_FAULT: 'load-fault-test' },
    });
    expect(r.status).toBe(0);
    const d = JSON.parse(r.stdout) as Doc;
    expect(d.runs).toHaveLength(4);
    for (const run of d.runs) {
      expect(run.status).toBe('failed');
      expect(run.reason).toMatch(/^workers die before they are ready \(3 tries\): worker crashed: deliberate load failure \(load-fault-test\)$/);
    }
  });

  it('a diverging arm is reported as diverged, with its step, while the other arm completes', () => {
    const r = farfield('run', join(root, 'test/fixtures/diverging.json'), '--json', '--quiet');
    const d = JSON.parse(r.stdout) as Doc;
    expect(d.runs.filter((x) => x.arm === 'steady').every((x) => x.status === 'ok')).toBe(true);
    const reckless = d.runs.filter((x) => x.arm === 'reckless');
    expect(reckless.every((x) => x.status === 'diverged')).toBe(true);
    expect(reckless.every((x) => (x.divergedAt ?? 0) > 0)).toBe(true);
  });
});

describe('interruption and resume', () => {
  it('a killed run resumes from its journal and ends with the uninterrupted fingerprint', async () => {
    const reference = JSON.parse(farfield('run', tiny, '--json', '--quiet', '--workers', '1').stdout) as Doc;
    const dir = mkdtempSync(join(tmpdir(), 'ff-resume-'));
    const out = join(dir, 'results.json');
    const journal = `${out}.journal`;
    const child = spawn(process.execPath, [bin, 'run', tiny, '--out', out, '--quiet', '--workers', '1'], { cwd: root, stdio: 'ignore' });
    // Kill it hard once at least one run is durably recorded (header line + one run).
    const deadline = Date.now() + 120_000;
    while (Date.now() < deadline) {
      if (existsSync(journal) && readFileSync(journal, 'utf8').trim().split('\n').length >= 2) break;
      await new Promise((r) => setTimeout(r, 100));
    }
    child.kill('SIGKILL');
    await new Promise((r) => child.once('exit', r));
    const kept = readFileSync(journal, 'utf8').trim().split('\n').length - 1;
    expect(kept).toBeGreaterThanOrEqual(1);
    expect(kept).toBeLessThan(4);
    expect(existsSync(out)).toBe(false);
    const resumed = farfield('run', tiny, '--out', out, '--resume', '--json', '--workers', '1');
    expect(resumed.stderr).toMatch(/resuming: \d finished run\(s\)/);
    expect((JSON.parse(resumed.stdout) as Doc).fingerprint).toBe(reference.fingerprint);
    expect(statSync(out).size).toBeGreaterThan(0);
  });
});

describe('farfield check and sample', () => {
  it('check prints the normalised spec and hash; a bad preset exits 1 naming the field', () => {
    const ok = farfield('check', tiny);
    expect(ok.code).toBe(0);
    expect(ok.stdout).toMatch(/spec hash [0-9a-f]{16}/);
    const bad = farfield('check', join(root, 'test/fixtures/bad-size.json'));
    expect(bad.code).toBe(1);
    expect(bad.stderr).toMatch(/test\.sizes\[0\]: got 9999, allowed at most 512/);
    expect(bad.stderr).not.toMatch(/\n\s+at /);
    const missing = farfield('check', join(root, 'test/fixtures/no-such-file.json'));
    expect(missing.code).toBe(1);
    expect(missing.stderr).toMatch(/no such file/);
  });

  it('sample prints graphs with exact targets in the documented shape', () => {
    const r = farfield('sample', '--task', 'shortest-path', '--family', 'er', '--nodes', '40', '--count', '5', '--seed', '7');
    expect(r.code).toBe(0);
    const s = JSON.parse(r.stdout) as { task: string; graphs: Array<{ nodes: number; directed: boolean; edges: number[][]; source: number; target: number[] }> };
    expect(s.task).toBe('shortest-path');
    expect(s.graphs).toHaveLength(5);
    expect(s.graphs[0]!.nodes).toBe(40);
    expect(s.graphs[0]!.target).toHaveLength(40);
    expect(s.graphs[0]!.edges[0]).toHaveLength(3);
    const nonsense = farfield('sample', '--task', 'charge-potential', '--family', 'er', '--nodes', '10');
    expect(nonsense.code).toBe(1);
    expect(nonsense.stderr).toMatch(/does not make sense on graph family 'er'/);
  });
});

describe('farfield share', () => {
  it('prints a link that check reads back to the same spec hash', () => {
    const link = farfield('share', tiny).stdout.trim();
    expect(link).toMatch(/^http:\/\/127\.0\.0\.1:4173\/#ff1\./);
    const fromFile = farfield('check', tiny).stdout.match(/spec hash ([0-9a-f]{16})/)![1];
    const fromLink = farfield('check', link).stdout.match(/spec hash ([0-9a-f]{16})/)![1];
    expect(fromLink).toBe(fromFile);
    const broken = farfield('check', link.slice(0, -10) + 'AAAAAAAAAA');
    expect(broken.code).toBe(1);
    expect(broken.stderr).not.toMatch(/\n\s+at /);
  });
});
