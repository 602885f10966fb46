/**
 * One worker versus one worker per core on the same total work, through the
 * CLI's own pool (src/cli/pool.ts: worker_threads, WASM backend, one run per
 * worker at a time). Wall time runs from the pool's start to its last result
 * and so includes starting the workers (loading tsx, tfjs and the WASM
 * binary), as a user of `farfield run` pays it; the time until every worker
 * reported ready is kept separately.
 */
import { runPool } from '../src/cli/pool.ts';
import { checkSpec } from '../src/experiment/check.ts';
import { planRuns } from '../src/experiment/plan.ts';
import { fingerprint } from '../src/experiment/results.ts';
import { parseSpec, type ExperimentSpec } from '../src/experiment/spec.ts';
import type { PresetTiming } from './presets.ts';

/** A fixed small A/B: 2 arms x 2 seeds = 4 runs of the shortest-path max-vs-sum set-up with a short budget. */
export function workersSpec(trainingSteps: number): ExperimentSpec {
  return checkSpec(
    parseSpec({
      farfield: 1,
      question: 'Benchmark: worker scaling on a small max-versus-sum run',
      task: 'shortest-path',
      train: { family: 'er', sizes: [8, 16], graphs: 64 },
      test: { sizes: [16, 32], graphsPerRung: 8, validationGraphs: 8 },
      budget: { steps: trainingSteps, batchGraphs: 16, learningRate: 0.003, clipNorm: 1, loss: 'huber', validateEvery: 0 },
      seeds: { count: 2, base: 1 },
      model: { hidden: 32, steps: { rule: 'nodes', trainJitter: 16 } },
      arms: [
        { name: 'max', model: { aggregator: 'max' } },
        { name: 'sum', model: { aggregator: 'sum' } },
      ],
    }),
  );
}

export interface PoolTiming {
  workers: number;
  seconds: number;
  /** Seconds until the last worker reported ready (backend initialised). */
  startupSeconds: number;
  /** Mean of the runs' own training-and-scoring seconds. */
  meanRunSeconds: number;
  fingerprint: string;
  failed: number;
}

export async function timePool(spec: ExperimentSpec, workers: number): Promise<PoolTiming> {
  const plans = planRuns(spec);
  const t0 = performance.now();
  let readyAt = t0;
  const pool = runPool(spec, plans, { workers, backend: 'wasm', events: { onReady: () => (readyAt = performance.now()) } });
  const results = await pool.done;
  const seconds = (performance.now() - t0) / 1000;
  return {
    workers,
    seconds,
    startupSeconds: (readyAt - t0) / 1000,
    meanRunSeconds: results.reduce((s, r) => s + r.seconds, 0) / Math.max(1, results.length),
    fingerprint: fingerprint(results),
    failed: results.filter((r) => r.status !== 'ok').length,
  };
}

export interface WorkersReport {
  oneWorkerSeconds: number;
  allWorkersSeconds: number;
  workers: number;
  speedup: number;
  runs: number;
  trainingStepsPerRun: number;
  /** Wall minus time-to-ready, summed over repeats, for each side. */
  speedupExcludingStartup: number;
  startupSeconds: { one: number; all: number };
  meanRunSeconds: { one: number; all: number };
  /** One worker and all workers gave the same results fingerprint (determinism across layouts). */
  sameFingerprint: boolean;
  /** Order the pools ran in (1 = one worker, N = all workers); repeated in mirrored order to cancel drift. */
  order: number[];
  failedRuns: number;
}

/**
 * Time the pool with 1 worker and with `workers` workers, in the order
 * 1, N (and N, 1 again when `repeats` is 2, so a load change on a shared
 * machine hits both sides alike). Seconds are summed over repeats.
 */
export async function measureWorkers(workers: number, trainingSteps: number, repeats: 1 | 2, log: (line: string) => void): Promise<WorkersReport> {
  const spec = workersSpec(trainingSteps);
  const order = repeats === 2 ? [1, workers, workers, 1] : [1, workers];
  const one: PoolTiming[] = [];
  const all: PoolTiming[] = [];
  for (const n of order) {
    const timing = await timePool(spec, n);
    log(`workers: ${n} worker(s) ${timing.seconds.toFixed(1)} s (ready after ${timing.startupSeconds.toFixed(1)} s)`);
    (n === 1 ? one : all).push(timing);
  }
  const sum = (xs: PoolTiming[], f: (t: PoolTiming) => number) => xs.reduce((s, t) => s + f(t), 0);
  const oneSeconds = sum(one, (t) => t.seconds);
  const allSeconds = sum(all, (t) => t.seconds);
  const mean = (xs: PoolTiming[], f: (t: PoolTiming) => number) => sum(xs, f) / Math.max(1, xs.length);
  return {
    oneWorkerSeconds: oneSeconds / one.length,
    allWorkersSeconds: allSeconds / all.length,
    workers,
    speedup: oneSeconds / allSeconds,
    runs: planRuns(spec).length,
    trainingStepsPerRun: trainingSteps,
    speedupExcludingStartup: (oneSeconds - sum(one, (t) => t.startupSeconds)) / (allSeconds - sum(all, (t) => t.startupSeconds)),
    startupSeconds: { one: mean(one, (t) => t.startupSeconds), all: mean(all, (t) => t.startupSeconds) },
    meanRunSeconds: { one: mean(one, (t) => t.meanRunSeconds), all: mean(all, (t) => t.meanRunSeconds) },
    sameFingerprint: [...one, ...all].every((t) => t.fingerprint === one[0]!.fingerprint),
    order,
    failedRuns: sum([...one, ...all], (t) => t.failed),
  };
}

/**
 * Worker scaling on the target preset itself, as a user runs it: its full
 * runs through the CLI on one worker against one worker per core (the latter
 * is the presets phase's own timing, taken just before). The short runs above
 * weigh start-up and warm-up far more than a real experiment does.
 */
export interface PresetScaling {
  file: string;
  workers: number;
  runs: number;
  oneWorkerSeconds: number;
  allWorkersSeconds: number;
  speedup: number;
  /** Sum of the runs' own seconds on one worker and side by side: the ratio is how much slower a run gets when the cores are shared. */
  runSeconds: { one: number | null; all: number | null };
  sameFingerprint: boolean;
  error?: string;
}

export function presetScaling(all: PresetTiming, one: PresetTiming, workers: number): PresetScaling {
  const error = one.error ?? all.error;
  return {
    file: all.file,
    workers,
    runs: all.runs,
    oneWorkerSeconds: one.wall,
    allWorkersSeconds: all.wall,
    speedup: one.wall / all.wall,
    runSeconds: { one: one.runSeconds, all: all.runSeconds },
    sameFingerprint: one.fingerprint != null && one.fingerprint === all.fingerprint,
    ...(error ? { error } : {}),
  };
}
