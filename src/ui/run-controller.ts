/**
 * Owns the runs of the spec on the sheet: which are kept from earlier visits,
 * which are in flight on the worker pool, their live progress, and the
 * finished results. Components only read `snapshot`; every change calls
 * `onChange`, and the sheet re-renders.
 */
import type { ExperimentSpec } from '../experiment/spec.ts';
import { planRuns, type RunPlan } from '../experiment/plan.ts';
import type { RunResult } from '../experiment/run.ts';
import { specHash } from '../experiment/results.ts';
import { renumbered, runKey } from '../experiment/run-key.ts';
import type { ToWorker } from '../../workers/protocol.ts';
import { runWorkerPool, type FaultKind, type PoolHandle, type PoolWorker } from './worker-pool.ts';
import { keepable, type RunStore } from './run-store.ts';
import type { TrainedWeights } from '../experiment/network-weights.ts';

export type SheetState = 'idle' | 'running' | 'done' | 'cancelled';
export type RunPhase = 'waiting' | 'running' | 'ok' | 'diverged' | 'failed' | 'cancelled';

export interface RunTrack {
  plan: RunPlan;
  phase: RunPhase;
  /** Read back from storage rather than run in this visit. */
  kept: boolean;
  /** Carried over from an earlier spec of this visit whose run had the same key (see run-key.ts). */
  reused?: boolean;
  step: number;
  totalSteps: number;
  /** Loss samples while training; the recorded loss curve once finished. */
  losses: number[];
  startedAt: number | null;
  finishedAt: number | null;
  /** Wall time of a finished run, as the worker measured it. */
  seconds?: number;
  reason?: string;
}

export interface EngineSummary {
  backend: string;
  threads: number;
  /** Farfield's SIMD kernels in use (same numbers, faster); absent when not reported. */
  simd?: boolean;
}

export interface RunSnapshot {
  state: SheetState;
  specHash: string | null;
  tracks: RunTrack[];
  /** Finished results for this spec, kept and fresh, sorted by run index. */
  results: RunResult[];
  engine: EngineSummary | null;
  /** Workers in use in the current (or last) session. */
  workers: number;
  startedAt: number | null;
  finishedAt: number | null;
  keptCount: number;
  /** Of the finished runs, how many were carried over from an earlier spec of this visit. */
  reusedCount: number;
  /** False when runs can only be kept in memory (no IndexedDB). */
  persistent: boolean;
  /** A storage problem worth telling the user about. */
  storageNote: string | null;
}

export interface RunControllerOptions {
  createWorker: () => PoolWorker;
  init: Extract<ToWorker, { type: 'init' }>;
  store: RunStore;
  faults?: ReadonlyMap<number, FaultKind>;
  onChange: () => void;
  now?: () => number;
}

const MAX_LOSS_SAMPLES = 240;
/** Trained weights kept in memory for download, at most this many bytes in all (the oldest go first). */
const MAX_WEIGHT_BYTES = 64 * 1024 * 1024;

function trackFor(plan: RunPlan): RunTrack {
  return { plan, phase: 'waiting', kept: false, step: 0, totalSteps: 0, losses: [], startedAt: null, finishedAt: null };
}

function finishedTrack(plan: RunPlan, result: RunResult, kept: boolean, now: number | null, reused = false): RunTrack {
  return {
    plan,
    phase: result.status,
    kept,
    ...(reused ? { reused } : {}),
    step: result.stepsDone,
    totalSteps: Math.max(result.stepsDone, 1),
    losses: result.lossCurve.filter((x) => Number.isFinite(x)),
    startedAt: null,
    finishedAt: now,
    seconds: result.seconds,
    ...(result.reason ? { reason: result.reason } : {}),
  };
}

export class RunController {
  snapshot: RunSnapshot;
  private spec: ExperimentSpec | null = null;
  private pool: PoolHandle | null = null;
  private loadToken = 0;
  /** Every deterministic run finished or read back in this visit, by run key, for reuse after an edit. */
  private readonly reusable = new Map<string, RunResult>();
  /** Trained networks of this visit's runs, by run key, for "download a trained network" (never stored). */
  private readonly weights = new Map<string, TrainedWeights>();
  private readonly now: () => number;

  constructor(private readonly options: RunControllerOptions) {
    this.now = options.now ?? (() => Date.now());
    this.snapshot = {
      state: 'idle',
      specHash: null,
      tracks: [],
      results: [],
      engine: null,
      workers: 0,
      startedAt: null,
      finishedAt: null,
      keptCount: 0,
      reusedCount: 0,
      persistent: options.store.persistent,
      storageNote: options.store.persistent ? null : 'This browser does not let the page keep runs between visits (no IndexedDB): finished runs last until the tab closes.',
    };
  }

  get running(): boolean {
    return this.snapshot.state === 'running';
  }

  private update(patch: Partial<RunSnapshot>): void {
    this.snapshot = { ...this.snapshot, ...patch };
    this.options.onChange();
  }

  private setTrack(index: number, change: (track: RunTrack) => RunTrack): void {
    this.update({ tracks: this.snapshot.tracks.map((t) => (t.plan.index === index ? change(t) : t)) });
  }

  /** Show a spec (or none): its plan, and whatever runs of it were kept. Cancels a session in flight. */
  async show(spec: ExperimentSpec | null): Promise<void> {
    if (this.pool) this.cancel();
    const token = ++this.loadToken;
    this.spec = spec;
    if (!spec) {
      this.update({ state: 'idle', specHash: null, tracks: [], results: [], keptCount: 0, reusedCount: 0, startedAt: null, finishedAt: null });
      return;
    }
    const hash = specHash(spec);
    const plans = planRuns(spec);
    this.update({ state: 'idle', specHash: hash, tracks: plans.map(trackFor), results: [], keptCount: 0, reusedCount: 0, startedAt: null, finishedAt: null });
    let kept: RunResult[] = [];
    try {
      kept = await this.options.store.load(hash);
    } catch (error) {
      if (token === this.loadToken) this.update({ storageNote: `Could not read kept runs: ${error instanceof Error ? error.message : String(error)}` });
    }
    if (token !== this.loadToken) return;
    const byIndex = new Map(kept.filter((r) => r.index < plans.length && plans[r.index]!.arm === r.arm && plans[r.index]!.seed === r.seed).map((r) => [r.index, r]));
    for (const r of byIndex.values()) this.reusable.set(runKey(spec, plans[r.index]!), r);
    // Runs this visit already has under another spec, with the same key: carried over, and kept under this spec too.
    const reused = new Map<number, RunResult>();
    for (const plan of plans) {
      const earlier = byIndex.has(plan.index) ? undefined : this.reusable.get(runKey(spec, plan));
      if (earlier) reused.set(plan.index, renumbered(earlier, plan));
    }
    for (const r of reused.values()) this.options.store.save(hash, r).catch(() => undefined);
    const tracks = plans.map((plan) => {
      const result = byIndex.get(plan.index);
      if (result) return finishedTrack(plan, result, true, null);
      const carried = reused.get(plan.index);
      return carried ? finishedTrack(plan, carried, false, null, true) : trackFor(plan);
    });
    const results = [...byIndex.values(), ...reused.values()].sort((a, b) => a.index - b.index);
    this.update({
      tracks,
      results,
      keptCount: byIndex.size,
      reusedCount: reused.size,
      state: results.length === plans.length ? 'done' : 'idle',
    });
  }

  /** Runs still to do for the spec on the sheet (a failed run counts as not done). */
  missing(): RunPlan[] {
    const have = new Set(this.snapshot.results.filter((r) => r.status === 'ok' || r.status === 'diverged').map((r) => r.index));
    return this.snapshot.tracks.map((t) => t.plan).filter((p) => !have.has(p.index));
  }

  /** Run the missing runs on `workers` workers. */
  start(workers: number): void {
    const spec = this.spec;
    const hash = this.snapshot.specHash;
    if (!spec || !hash || this.pool) return;
    const todo = this.missing();
    if (todo.length === 0) return;
    const todoIndex = new Set(todo.map((p) => p.index));
    // Failed runs from an earlier session are run again: drop their results.
    const results = this.snapshot.results.filter((r) => !todoIndex.has(r.index));
    const wanted = Math.max(1, Math.min(workers, todo.length));
    this.update({
      state: 'running',
      results,
      workers: wanted,
      startedAt: this.now(),
      finishedAt: null,
      tracks: this.snapshot.tracks.map((t) => (todoIndex.has(t.plan.index) ? trackFor(t.plan) : t)),
    });
    const pool = runWorkerPool(spec, todo, {
      workers: wanted,
      createWorker: this.options.createWorker,
      init: this.options.init,
      ...(this.options.faults ? { faults: this.options.faults } : {}),
      keepWeights: true,
      events: {
        onReady: (info) => {
          if (this.pool === pool) this.update({ engine: { backend: info.backend, threads: info.threads, simd: info.simd } });
        },
        onStart: (plan) => {
          if (this.pool !== pool) return;
          this.setTrack(plan.index, (t) => ({ ...t, phase: 'running', startedAt: this.now(), step: 0, losses: [] }));
        },
        onProgress: (plan, step, totalSteps, loss) => {
          if (this.pool !== pool) return;
          this.setTrack(plan.index, (t) => {
            let losses = Number.isFinite(loss) ? [...t.losses, loss] : t.losses;
            if (losses.length > MAX_LOSS_SAMPLES) losses = losses.filter((_, i) => i % 2 === 0);
            return { ...t, step, totalSteps, losses };
          });
        },
        onResult: (result, weights) => {
          if (this.pool !== pool) return;
          const plan = todo.find((p) => p.index === result.index);
          if (!plan) return;
          if (weights && result.status === 'ok') this.keepWeights(runKey(spec, plan), weights);
          this.update({
            results: [...this.snapshot.results.filter((r) => r.index !== result.index), result].sort((a, b) => a.index - b.index),
            tracks: this.snapshot.tracks.map((t) => (t.plan.index === result.index ? finishedTrack(plan, result, false, this.now()) : t)),
          });
          if (keepable(result)) this.reusable.set(runKey(spec, plan), result);
          this.options.store.save(hash, result).catch((error: unknown) => {
            this.update({ storageNote: `Could not keep run ${result.index}: ${error instanceof Error ? error.message : String(error)}` });
          });
        },
      },
    });
    this.pool = pool;
    void pool.done.then(() => {
      if (this.pool !== pool) return;
      this.pool = null;
      const complete = this.snapshot.results.length === this.snapshot.tracks.length;
      this.update({ state: complete ? 'done' : 'idle', finishedAt: this.now() });
    });
  }

  private keepWeights(key: string, weights: TrainedWeights): void {
    this.weights.delete(key);
    this.weights.set(key, weights);
    let total = 0;
    for (const w of this.weights.values()) total += w.data.byteLength;
    for (const [oldest, w] of this.weights) {
      if (total <= MAX_WEIGHT_BYTES) break;
      this.weights.delete(oldest);
      total -= w.data.byteLength;
    }
  }

  /** The trained network of a run of `spec`, if it was trained in this visit (runs read back from storage have none). */
  trainedWeights(spec: ExperimentSpec, plan: Pick<RunPlan, 'armIndex' | 'seed'>): TrainedWeights | undefined {
    return this.weights.get(runKey(spec, plan));
  }

  /**
   * Run every run of the spec again from scratch, in this visit (the kept
   * and reused results are dropped first): the same spec gives the same
   * numbers, so this reproduces the fingerprint.
   */
  async again(workers: number): Promise<void> {
    const hash = this.snapshot.specHash;
    if (!hash || this.pool) return;
    await this.options.store.forget(hash);
    if (this.pool || this.snapshot.specHash !== hash) return;
    this.update({ results: [], keptCount: 0, reusedCount: 0, tracks: this.snapshot.tracks.map((t) => trackFor(t.plan)) });
    this.start(workers);
  }

  /** Stop now: every worker is terminated; finished runs stay, runs in flight are dropped. */
  cancel(): void {
    const pool = this.pool;
    if (!pool) return;
    this.pool = null;
    pool.cancel();
    this.update({
      state: 'cancelled',
      finishedAt: this.now(),
      tracks: this.snapshot.tracks.map((t) => (t.phase === 'running' ? { ...t, phase: 'cancelled', reason: 'cancelled' } : t)),
    });
  }

  /** Drop the kept runs of this spec, so the next run starts from nothing. */
  async forget(): Promise<void> {
    const hash = this.snapshot.specHash;
    if (!hash || this.pool) return;
    await this.options.store.forget(hash);
    await this.show(this.spec);
  }

  dispose(): void {
    this.pool?.cancel();
    this.pool = null;
  }
}
