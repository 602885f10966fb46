/**
 * The worker pool's rules, written once for both hosts: the CLI wraps a
 * worker_thread (src/cli/pool.ts) and the sheet a Web Worker
 * (src/ui/worker-pool.ts) into a `PoolWorker`, and this module does the rest.
 * Host-agnostic: no `node:` imports, no DOM types.
 *
 * The rules:
 * - Each worker gets the `init` message first and takes one run at a time once
 *   it says `ready` (every `ready` is reported through `onReady`).
 * - A worker that reports an error during a run marks that run failed (the
 *   message is the reason) and takes the next run.
 * - A worker that dies during a run marks that run failed and is replaced, so
 *   the others finish.
 * - A worker that dies before `ready` is replaced too, but only until
 *   `maxStartFailures` workers of this pool have died that way; then the pool
 *   gives up: every queued run is marked failed with the reason, runs already
 *   in flight on live workers still finish, and `done` resolves. A worker that
 *   reports that its engine could not start gives up at once (it said why, and
 *   another worker would say the same).
 * - Cancel terminates every worker at once; `done` resolves with the results
 *   recorded so far and nothing more is recorded.
 */
import type { ExperimentSpec } from './spec.ts';
import type { RunPlan } from './plan.ts';
import type { RunResult } from './run.ts';
import type { EngineInfo } from '../engine/backend.ts';
import type { FromWorker, ToWorker } from '../../workers/protocol.ts';
import { failedResult } from './run-record.ts';
import type { TrainedWeights } from './network-weights.ts';

/** The little a pool needs from a worker; each host adapts its own kind. */
export interface PoolWorker {
  send(message: ToWorker): void;
  /** Stop the worker; a host may return a promise that settles once it has stopped. */
  terminate(): void | Promise<unknown>;
  /** Register the two callbacks; called once, right after creation. */
  listen(onMessage: (message: FromWorker) => void, onDeath: (reason: string) => void): void;
}

export type FaultKind = 'throw' | 'exit';

export interface PoolEvents {
  onReady?: (info: EngineInfo) => void;
  onStart?: (plan: RunPlan) => void;
  onProgress?: (plan: RunPlan, step: number, totalSteps: number, loss: number) => void;
  /** `weights`: the trained network's, when the pool was asked to keep them and the run finished. */
  onResult?: (result: RunResult, weights?: TrainedWeights) => void;
}

/** How many workers of one pool may die before `ready` before it gives up. */
export const MAX_START_FAILURES = 3;

export interface CorePoolOptions {
  workers: number;
  createWorker: () => PoolWorker;
  /** The 'init' message every new worker gets first. */
  init: Extract<ToWorker, { type: 'init' }>;
  events?: PoolEvents;
  /** Test hook: inject a fault into these run indices. */
  faults?: ReadonlyMap<number, FaultKind>;
  /** Ask every worker to send back each finished run's trained weights (saved networks). */
  keepWeights?: boolean;
  /** Deaths before `ready` tolerated per pool (default MAX_START_FAILURES). */
  maxStartFailures?: number;
}

export interface CorePoolHandle {
  /** Resolves with every result recorded (sorted by run index), also after cancel. */
  done: Promise<RunResult[]>;
  /** Terminate every worker now; runs in flight are dropped, queued ones never start. Settles once every worker has stopped. */
  cancel: () => Promise<void>;
}

export function runPoolCore(spec: ExperimentSpec, plans: readonly RunPlan[], options: CorePoolOptions): CorePoolHandle {
  const queue = [...plans];
  const results: RunResult[] = [];
  const live = new Set<PoolWorker>();
  const maxStartFailures = Math.max(1, options.maxStartFailures ?? MAX_START_FAILURES);
  let cancelled = false;
  let finished = false;
  /** Workers created and not yet retired. */
  let active = 0;
  let startFailures = 0;
  /** Once set, no worker is started again and the queue has been failed with this reason. */
  let gaveUp: string | null = null;
  let resolveAll: (results: RunResult[]) => void = () => {};
  const done = new Promise<RunResult[]>((resolve) => {
    resolveAll = resolve;
  });
  const finish = () => {
    if (finished) return;
    finished = true;
    resolveAll([...results].sort((a, b) => a.index - b.index));
  };
  const finishIfIdle = () => {
    if (active === 0 && (queue.length === 0 || cancelled)) finish();
  };
  const record = (result: RunResult, weights?: TrainedWeights) => {
    if (cancelled) return;
    results.push(result);
    options.events?.onResult?.(result, weights);
  };
  const giveUp = (reason: string) => {
    gaveUp ??= reason;
    while (queue.length) record(failedResult(queue.shift()!, gaveUp));
  };

  const spawn = () => {
    if (cancelled || gaveUp !== null || queue.length === 0) return;
    let worker: PoolWorker;
    try {
      worker = options.createWorker();
    } catch (error) {
      // The host cannot start workers at all: every queued run fails with the reason.
      giveUp(`could not start a worker: ${error instanceof Error ? error.message : String(error)}`);
      finishIfIdle();
      return;
    }
    active++;
    live.add(worker);
    let current: RunPlan | null = null;
    let settled = false;
    let ready = false;
    const retire = () => {
      settled = true;
      live.delete(worker);
      void Promise.resolve(worker.terminate()).catch(() => {});
      active--;
    };
    const next = () => {
      current = cancelled ? null : (queue.shift() ?? null);
      if (!current) {
        retire();
        finishIfIdle();
        return;
      }
      options.events?.onStart?.(current);
      const fault = options.faults?.get(current.index);
      if (fault) worker.send({ type: 'crash', id: current.index, how: fault });
      else worker.send({ type: 'run', id: current.index, spec, plan: current, ...(options.keepWeights ? { keepWeights: true } : {}) });
    };
    worker.listen(
      (message) => {
        if (settled || cancelled) return;
        switch (message.type) {
          case 'ready':
            if (ready) return;
            ready = true;
            options.events?.onReady?.({ backend: message.backend, threads: message.threads, simd: message.simd });
            next();
            return;
          case 'progress':
            if (current && message.id === current.index) options.events?.onProgress?.(current, message.step, message.totalSteps, message.loss);
            return;
          case 'done':
            if (!current) return;
            record(message.result, message.weights);
            next();
            return;
          case 'error':
            if (current) {
              record(failedResult(current, `worker error: ${message.message}`));
              next();
            } else {
              // The engine did not start: this worker can run nothing, and another would fare no better.
              retire();
              giveUp(`the worker could not start the engine: ${message.message}`);
              finishIfIdle();
            }
            return;
        }
      },
      (reason) => {
        if (settled || cancelled) return;
        const lost = current;
        retire();
        if (lost) record(failedResult(lost, reason));
        if (!ready && ++startFailures >= maxStartFailures) {
          giveUp(`workers die before they are ready (${startFailures} tries): ${reason}`);
        }
        // Replace the dead worker so the remaining runs still finish.
        spawn();
        finishIfIdle();
      },
    );
    worker.send(options.init);
  };

  const wanted = Math.max(1, Math.min(options.workers, plans.length));
  for (let i = 0; i < wanted; i++) spawn();
  if (plans.length === 0) finish();

  const cancel = async () => {
    if (cancelled) return;
    cancelled = true;
    const stopping = [...live].map((worker) => Promise.resolve(worker.terminate()).catch(() => {}));
    live.clear();
    active = 0;
    finish();
    await Promise.all(stopping);
  };
  return { done, cancel };
}
