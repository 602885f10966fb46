/**
 * `farfield bench --quick --json` as a user runs it: a smoke test of the
 * document's shape and of the leak checks. Speed targets are the benchmark's
 * own business (its `targets` section); no timing threshold is asserted here.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { evaluateTargets, type BenchDocument } from '../../bench/report.ts';
import { presetScaling } from '../../bench/workers.ts';
import type { PresetTiming } from '../../bench/presets.ts';

const root = fileURLToPath(new URL('../..', import.meta.url));
const bin = join(root, 'bin/farfield.mjs');

function run(args: string[]): Promise<{ code: number | null; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [bin, ...args], { cwd: root });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (b: Buffer) => (stdout += b.toString('utf8')));
    child.stderr.on('data', (b: Buffer) => (stderr += b.toString('utf8')));
    child.on('close', (code) => resolve({ code, stdout, stderr }));
  });
}

const positive = expect.any(Number);
const isPositive = (x: unknown) => typeof x === 'number' && Number.isFinite(x) && x > 0;

describe('farfield bench --quick --json', () => {
  let result: { code: number | null; stdout: string; stderr: string };
  let doc: BenchDocument;

  beforeAll(async () => {
    result = await run(['bench', '--quick', '--json']);
    doc = JSON.parse(result.stdout) as BenchDocument;
  }, 480_000);

  it('exits 0 and prints only the JSON document on stdout', () => {
    expect(result.code, result.stderr).toBe(0);
    expect(result.stdout.trim().startsWith('{')).toBe(true);
    expect(doc.quick).toBe(true);
  });

  it('times the fused process kernels against the previous path on the reference and the default preset step', () => {
    expect(doc.fusion?.workloads.map((w) => w.name)).toEqual(['reference', 'default-preset']);
    for (const w of doc.fusion!.workloads) {
      expect(isPositive(w.stepsPerSecond.fused) && isPositive(w.stepsPerSecond.previous) && isPositive(w.stepsPerSecond.stock)).toBe(true);
      expect(w.speedup).toBeCloseTo(w.stepsPerSecond.fused / w.stepsPerSecond.previous, 6);
      expect(w.speedupOverStock).toBeCloseTo(w.stepsPerSecond.fused / w.stepsPerSecond.stock, 6);
      expect(w.launches.fused).toBeLessThan(w.launches.stock);
      expect(w.launches.fused).toBeLessThan(w.launches.previous);
    }
    expect(doc.targets.map((t) => t.id)).toEqual(expect.arrayContaining(['fusedPresetStep', 'fusedReferenceStep', 'fusedLaunches']));
  });

  it('describes the machine and the backend', () => {
    expect(doc.machine).toMatchObject({
      cores: positive,
      cpuModel: expect.any(String),
      totalMemory: positive,
      node: process.version,
      tfjs: expect.stringMatching(/^\d+\.\d+\.\d+/),
      platform: expect.any(String),
      backend: 'wasm',
      threads: positive,
    });
    expect(doc.machine.loadAverage.start).toHaveLength(3);
  });

  it('reports reference steps per second on both backends and their ratio', () => {
    for (const backend of ['wasm', 'cpu'] as const) {
      for (const aggregator of ['sum', 'max'] as const) expect(isPositive(doc.reference[backend][aggregator]), `${backend} ${aggregator}`).toBe(true);
    }
    expect(isPositive(doc.reference.wasmOverCpu)).toBe(true);
    expect(doc.reference.workload).toMatchObject({ hidden: 32, task: 'shortest-path', family: 'er', meanDegree: 4 });
  });

  it('counts FLOPs analytically, agreeing with the profiled matmul shapes', () => {
    const f = doc.flops;
    for (const key of ['perStep', 'effectiveGflops', 'matmulCeiling', 'fractionOfCeiling', 'kernelLaunches'] as const) {
      expect(isPositive(f[key]), key).toBe(true);
    }
    // The analytic count must describe the network that actually ran (update bench/reference.ts if the model changes).
    expect(Math.abs(f.perStepProfiled / f.perStep - 1)).toBeLessThan(0.01);
    expect(f.formula).toMatch(/2·M·K·N/);
    expect(f.limit).toEqual(expect.any(String));
  });

  it('times one worker against all workers through the pool', () => {
    if (doc.machine.cores < 2) {
      expect(doc.workers).toBeNull();
      return;
    }
    expect(doc.workers).toMatchObject({ oneWorkerSeconds: positive, allWorkersSeconds: positive, workers: doc.machine.cores, speedup: positive });
    expect(doc.workers?.sameFingerprint).toBe(true);
    expect(doc.workers?.failedRuns).toBe(0);
  });

  it('skips presets in quick mode', () => {
    expect(doc.presets).toEqual([]);
    expect(doc.presetScaling).toBeNull();
  });

  it('takes the worker speedup from the target preset when it was timed on both layouts, else from the short runs', () => {
    const timing = (workersRequested: number | null, wall: number, runSeconds: number, fingerprint: string): PresetTiming => ({
      file: 'shortest-path-max-vs-sum.json',
      workersRequested,
      runs: 16,
      runSeconds,
      wall,
      fingerprint,
      peakWorkerRssMB: null,
      peakWorkerHeapMB: null,
      peakWorkerExternalMB: null,
      peakProcessRssMB: null,
      workersSeen: 0,
      seeds: 8,
      arms: 2,
      okRuns: 16,
      exitCode: 0,
      load: [0, 0],
    });
    const scaling = presetScaling(timing(null, 80, 150, 'abc'), timing(1, 150, 140, 'abc'), 2);
    expect(scaling).toMatchObject({ speedup: 150 / 80, sameFingerprint: true, runSeconds: { one: 140, all: 150 } });
    const withScaling = evaluateTargets({ ...doc, presetScaling: scaling }, 'shortest-path-max-vs-sum.json').find((t) => t.id === 'workerSpeedup')!;
    expect(withScaling).toMatchObject({ value: 150 / 80, threshold: 1.8, status: 'pass' });
    expect(withScaling.description).toMatch(/shortest-path-max-vs-sum\.json on 2 workers/);

    const differing = presetScaling(timing(null, 80, 150, 'abc'), timing(1, 150, 140, 'xyz'), 2);
    expect(evaluateTargets({ ...doc, presetScaling: differing }, 'shortest-path-max-vs-sum.json').find((t) => t.id === 'workerSpeedup')!.note).toMatch(/FINGERPRINTS DIFFER/);

    const fallback = evaluateTargets({ ...doc, presetScaling: null }, 'shortest-path-max-vs-sum.json').find((t) => t.id === 'workerSpeedup')!;
    expect(fallback.description).toMatch(/short runs/);
    expect(fallback.value).toBe(doc.workers && doc.workers.workers > 1 ? doc.workers.speedup : null);
  });

  it('leaves no tensor behind, in the benchmark and over the long run', () => {
    const t = doc.tensors;
    expect(t.tensorsBefore).toBe(t.tensorsAfter);
    expect(t.longRun.steps).toBeGreaterThan(0);
    expect(t.longRun.tensorsBefore).toBe(t.longRun.tensorsAfter);
    expect(t.longRun.tensorsAtEarlyStep).toBe(t.longRun.tensorsAtLastStep);
    expect(t.longRun.status).toBe('ok');
    for (const key of ['heapBeforeMB', 'heapAfterMB'] as const) expect(isPositive(t.longRun[key]), key).toBe(true);
  });

  it('lists every target with its value and verdict', () => {
    expect(doc.targets.map((t) => t.id)).toEqual([
      'wasmOverCpu',
      'workerSpeedup',
      'presetWall',
      'browserOverCli',
      'fusedPresetStep',
      'fusedReferenceStep',
      'fusedLaunches',
      'fractionOfCeiling',
    ]);
    for (const t of doc.targets) {
      expect(['pass', 'fail', 'not measured']).toContain(t.status);
      expect(t.pass === null ? t.status === 'not measured' : t.status === (t.pass ? 'pass' : 'fail')).toBe(true);
    }
    expect(doc.targets.find((t) => t.id === 'presetWall')?.status).toBe('not measured');
    // Quick mode runs no browser: the ratio is not measured, and says why.
    expect(doc.browser).toBeNull();
    expect(doc.targets.find((t) => t.id === 'browserOverCli')).toMatchObject({ status: 'not measured', note: expect.stringMatching(/browser not run/) });
  });
});

describe('farfield bench usage', () => {
  it('refuses an unknown preset before measuring anything', () => {
    const r = spawnSync(process.execPath, [bin, 'bench', '--presets', 'no-such-preset'], { cwd: root, encoding: 'utf8', timeout: 60_000 });
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/--presets: no preset "no-such-preset"/);
  });
});
