/**
 * The Node host: runs plans on a pool of worker_threads, one run per worker at
 * a time. The pool's rules (a worker that throws marks its run failed and
 * carries on; one that dies marks its run failed and is replaced; workers that
 * die before they are ready are retried a bounded number of times, then every
 * remaining run fails with the reason) live in
 * src/experiment/worker-pool-core.ts, shared with the sheet; this file is the
 * worker_threads adapter.
 */
import { Worker } from 'node:worker_threads';
import type { ExperimentSpec } from '../experiment/spec.ts';
import type { RunPlan } from '../experiment/plan.ts';
import type { RunResult } from '../experiment/run.ts';
import type { BackendName } from '../engine/backend.ts';
import type { FromWorker } from '../../workers/protocol.ts';
import { failedResult } from '../experiment/run-record.ts';
import { runPoolCore, type CorePoolHandle, type FaultKind, type PoolEvents, type PoolWorker } from '../experiment/worker-pool-core.ts';
import { nodeWorkerEntry } from './worker-bundle.ts';

/**
 * Young-generation size per worker. A training step allocates thousands of
 * short-lived JS objects (one set per kernel launch); V8's default young
 * generation fills every few steps, and the resulting scavenges cost ~12% of
 * the wall time of two workers side by side on the default preset (27.6 s
 * against 31.7 s for its first 2 seeds; 32, 64 and 128 MB semi-spaces measured
 * alike, smaller ones slower). GC never changes results.
 */
const YOUNG_GENERATION_MB = 96;

export type { PoolEvents };

export interface PoolOptions {
  workers: number;
  backend?: BackendName;
  events?: PoolEvents;
  /** Test hook: inject a fault into these run indices. */
  faults?: ReadonlyMap<number, FaultKind>;
  /** Send back each finished run's trained weights (run --keep-networks). */
  keepWeights?: boolean;
}

export { failedResult };

/** Adapt a worker_thread to the pool's interface. */
export function wrapNodeWorker(worker: Worker): PoolWorker {
  return {
    send: (message) => worker.postMessage(message),
    terminate: () => worker.terminate(),
    listen(onMessage, onDeath) {
      worker.on('message', (message: FromWorker) => onMessage(message));
      worker.on('error', (error: Error) => onDeath(`worker crashed: ${error.message}`));
      worker.on('messageerror', (error: Error) => onDeath(`worker crashed: a message could not be read (${error.message})`));
      worker.on('exit', (code: number) => onDeath(`worker exited with code ${code}`));
    },
  };
}

export function runPool(spec: ExperimentSpec, plans: readonly RunPlan[], options: PoolOptions): { done: Promise<RunResult[]>; cancel: () => Promise<void> } {
  let pool: CorePoolHandle | null = null;
  let cancelled = false;
  // The worker entry (a bundle, built on first use) is found before any worker starts.
  const done = plans.length === 0 ? Promise.resolve([]) : nodeWorkerEntry().then((entry) => {
    if (cancelled) return [];
    pool = runPoolCore(spec, plans, {
      workers: options.workers,
      init: { type: 'init', backend: options.backend ?? 'wasm' },
      createWorker: () => wrapNodeWorker(new Worker(entry, { resourceLimits: { maxYoungGenerationSizeMb: YOUNG_GENERATION_MB } })),
      events: options.events,
      faults: options.faults,
      keepWeights: options.keepWeights,
    });
    return pool.done;
  });
  const cancel = async () => {
    cancelled = true;
    await pool?.cancel();
  };
  return { done, cancel };
}
