/**
 * Wall time of shipped presets run exactly as a user runs them: a child
 * process `node bin/farfield.mjs run <preset> --json --quiet` (all cores,
 * the preset's own seed count), with bench/memory-probe.cjs preloaded to
 * record memory (see that file for what is measured and why).
 */
import { spawn } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { loadAverage, MB } from './measure.ts';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const BIN = join(ROOT, 'bin/farfield.mjs');
const PROBE = join(ROOT, 'bench/memory-probe.cjs');
export const PRESET_DIR = join(ROOT, 'presets');
/** The A/B preset the 2-minute target is about. */
export const TARGET_PRESET = 'shortest-path-max-vs-sum.json';

export interface PresetTiming {
  file: string;
  /** Workers asked for with --workers, or null for the CLI's default (one per core). */
  workersRequested: number | null;
  runs: number;
  /** Sum of the runs' own seconds (training and scoring, start-up excluded). */
  runSeconds: number | null;
  /** Seconds from spawning the child to its exit. */
  wall: number;
  fingerprint: string | null;
  /** Largest per-worker peak of V8 heap + external memory (incl. the WASM heap), MB. */
  peakWorkerRssMB: number | null;
  /** That worker's peak split into its V8 heap (heapTotal) and external memory (WASM heap, ArrayBuffers), MB. */
  peakWorkerHeapMB: number | null;
  peakWorkerExternalMB: number | null;
  /** Peak RSS of the whole child process (all workers and the main thread), MB. */
  peakProcessRssMB: number | null;
  workersSeen: number;
  seeds: number | null;
  arms: number | null;
  okRuns: number;
  exitCode: number | null;
  error?: string;
  /** 1-minute load average when the preset started and when it ended. */
  load: [number, number];
}

/** Shipped presets, the target A/B first, then the rest by name. */
export function listPresets(): string[] {
  const files = readdirSync(PRESET_DIR)
    .filter((f) => f.endsWith('.json'))
    .sort();
  return [...files.filter((f) => f === TARGET_PRESET), ...files.filter((f) => f !== TARGET_PRESET)];
}

/** Resolve `--presets a,b` (names with or without .json) against the shipped files. */
export function choosePresets(wanted: string | undefined): string[] {
  const all = listPresets();
  if (wanted === undefined) return all;
  const out: string[] = [];
  for (const raw of wanted.split(',').map((s) => s.trim()).filter(Boolean)) {
    const name = basename(raw).endsWith('.json') ? basename(raw) : `${basename(raw)}.json`;
    if (!all.includes(name)) throw new Error(`bench/presets: no preset "${raw}" in presets/; shipped: ${all.map((f) => f.replace(/\.json$/, '')).join(', ')}`);
    if (!out.includes(name)) out.push(name);
  }
  return out;
}

interface ResultDoc {
  fingerprint?: string;
  runs?: Array<{ status?: string; seconds?: number }>;
  spec?: { seeds?: { count?: number }; arms?: unknown[] };
}

/** `workers` passes --workers; left out, the CLI uses one worker per core as a user's run does. */
export async function timePreset(file: string, timeoutSeconds: number, stop?: AbortSignal, workers?: number): Promise<PresetTiming> {
  const memoryDir = mkdtempSync(join(tmpdir(), 'farfield-bench-mem-'));
  const loadStart = loadAverage()[0];
  const t0 = performance.now();
  const args = ['-r', PROBE, BIN, 'run', join(PRESET_DIR, file), '--json', '--quiet', ...(workers != null ? ['--workers', String(workers)] : [])];
  const child = spawn(process.execPath, args, {
    cwd: ROOT,
    env: { ...process.env, FARFIELD_BENCH_MEMORY_DIR: memoryDir },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const out: Buffer[] = [];
  const err: Buffer[] = [];
  child.stdout.on('data', (b: Buffer) => out.push(b));
  child.stderr.on('data', (b: Buffer) => err.push(b));
  let stopped: string | null = null;
  const end = (why: string) => {
    stopped ??= why;
    child.kill('SIGTERM'); // `farfield run` cancels its pool and exits on SIGTERM
  };
  const timer = setTimeout(() => end(`stopped after the ${timeoutSeconds} s timeout`), timeoutSeconds * 1000);
  const onStop = () => end('interrupted');
  stop?.addEventListener('abort', onStop);
  const exitCode = await new Promise<number | null>((resolve) => child.on('close', (code) => resolve(code)));
  clearTimeout(timer);
  stop?.removeEventListener('abort', onStop);
  const wall = (performance.now() - t0) / 1000;

  let peakWorker: { bytes: number; heapTotal: number; external: number } | null = null;
  let peakProcess: number | null = null;
  let workersSeen = 0;
  for (const f of readdirSync(memoryDir)) {
    try {
      const record = JSON.parse(readFileSync(join(memoryDir, f), 'utf8')) as {
        thread: string;
        peakBytes?: number;
        heapTotalBytes?: number;
        externalBytes?: number;
        maxRssBytes?: number;
      };
      if (record.thread === 'worker' && record.peakBytes != null) {
        workersSeen++;
        if (peakWorker == null || record.peakBytes > peakWorker.bytes) {
          peakWorker = { bytes: record.peakBytes, heapTotal: record.heapTotalBytes ?? NaN, external: record.externalBytes ?? NaN };
        }
      } else if (record.thread === 'main' && record.maxRssBytes != null) {
        peakProcess = record.maxRssBytes / MB;
      }
    } catch {
      // A half-written record (a thread killed mid-write) is skipped.
    }
  }
  rmSync(memoryDir, { recursive: true, force: true });

  const timing: PresetTiming = {
    file,
    workersRequested: workers ?? null,
    runs: 0,
    runSeconds: null,
    wall,
    fingerprint: null,
    peakWorkerRssMB: peakWorker && peakWorker.bytes / MB,
    peakWorkerHeapMB: peakWorker && peakWorker.heapTotal / MB,
    peakWorkerExternalMB: peakWorker && peakWorker.external / MB,
    peakProcessRssMB: peakProcess,
    workersSeen,
    seeds: null,
    arms: null,
    okRuns: 0,
    exitCode,
    load: [loadStart, loadAverage()[0]],
  };
  try {
    const doc = JSON.parse(Buffer.concat(out).toString('utf8')) as ResultDoc;
    timing.fingerprint = doc.fingerprint ?? null;
    timing.runs = doc.runs?.length ?? 0;
    timing.runSeconds = doc.runs?.reduce((sum, r) => sum + (r.seconds ?? 0), 0) ?? null;
    timing.okRuns = doc.runs?.filter((r) => r.status === 'ok').length ?? 0;
    timing.seeds = doc.spec?.seeds?.count ?? null;
    timing.arms = doc.spec?.arms?.length ?? null;
  } catch {
    const stderr = Buffer.concat(err).toString('utf8').trim().split('\n').slice(-3).join(' | ');
    timing.error = stopped ?? `exit code ${exitCode}: ${stderr || 'no JSON on stdout'}`;
  }
  if (stopped && !timing.error) timing.error = stopped;
  return timing;
}
