/**
 * The browser host: runs plans on a pool of Web Workers, one run per worker at
 * a time. The pool's rules (retries, failed runs, replacement, giving up on
 * workers that die before they are ready, cancel) live in
 * src/experiment/worker-pool-core.ts, shared with the CLI's pool; this file is
 * the Web Worker adapter.
 *
 * Workers come from a factory, so the pool's bookkeeping can be tested without
 * a browser (test/browser/worker-pool.test.ts, test/experiment/worker-pool-core.test.ts).
 */
import type { ExperimentSpec } from '../experiment/spec.ts';
import type { RunPlan } from '../experiment/plan.ts';
import type { RunResult } from '../experiment/run.ts';
import type { FromWorker } from '../../workers/protocol.ts';
import { failedResult } from '../experiment/run-record.ts';
import { withGraphFiles } from './graph-file-store.ts';
import { runPoolCore, type CorePoolOptions, type FaultKind, type PoolEvents, type PoolWorker } from '../experiment/worker-pool-core.ts';

export type { FaultKind, PoolEvents, PoolWorker };

/** The core's options as the sheet uses them (the start-failure limit stays the core's default). */
export type PoolOptions = Omit<CorePoolOptions, 'maxStartFailures'>;

export interface PoolHandle {
  /** Resolves with every result recorded (sorted by run index), also after cancel. */
  done: Promise<RunResult[]>;
  /** Terminate every worker now; runs in flight are dropped, queued ones never start. */
  cancel: () => void;
}

export { failedResult };

/** Adapt a DOM Worker to the pool's interface. */
export function wrapWebWorker(worker: Worker): PoolWorker {
  return {
    send: (message) => worker.postMessage(message),
    terminate: () => worker.terminate(),
    listen(onMessage, onDeath) {
      worker.addEventListener('message', (event: MessageEvent<FromWorker>) => onMessage(event.data));
      worker.addEventListener('error', (event: ErrorEvent) => {
        event.preventDefault();
        onDeath(`worker crashed: ${event.message || 'the worker script failed to load or threw outside a run'}`);
      });
      worker.addEventListener('messageerror', () => onDeath('worker crashed: a message could not be read'));
    },
  };
}

export function runWorkerPool(spec: ExperimentSpec, plans: readonly RunPlan[], options: PoolOptions): PoolHandle {
  // Graph files travel with each plan to the page's own workers (never uploaded).
  const pool = runPoolCore(spec, plans.map((plan) => withGraphFiles(spec, plan)), options);
  return { done: pool.done, cancel: () => void pool.cancel() };
}
