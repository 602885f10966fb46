/**
 * The browser host: runs plans on a pool of Web Workers, one run per worker at
 * a time (the mirror of src/cli/pool.ts). A worker that reports an error marks
 * its run failed and takes the next one; a worker that dies (an uncaught
 * error, a load failure) marks its run failed and is replaced, so the others
 * finish. Cancel terminates every worker at once.
 *
 * Workers come from a factory, so the pool's bookkeeping can be tested without
 * a browser (test/browser/worker-pool.test.ts).
 */
import type { ExperimentSpec } from '../experiment/spec.ts';
import type { RunPlan } from '../experiment/plan.ts';
import type { RunResult } from '../experiment/run.ts';
import type { BackendName, EngineInfo } from '../engine/backend.ts';
import type { FromWorker, ToWorker } from '../../workers/protocol.ts';
import { failedResult } from '../experiment/run-record.ts';

/** The little a pool needs from a worker; `wrapWebWorker` adapts a real one. */
export interface PoolWorker {
  send(message: ToWorker): void;
  terminate(): void;
  /** Register the two callbacks; called once, right after creation. */
  listen(onMessage: (message: FromWorker) => void, onDeath: (reason: string) => void): void;
}

export type FaultKind = 'throw' | 'exit';

export interface PoolEvents {
  onReady?: (info: EngineInfo) => void;
  onStart?: (plan: RunPlan) => void;
  onProgress?: (plan: RunPlan, step: number, totalSteps: number, loss: number) => void;
  onResult?: (result: RunResult) => void;
}

export interface PoolOptions {
  workers: number;
  createWorker: () => PoolWorker;
  /** The 'init' message every new worker gets first. */
  init: Extract<ToWorker, { type: 'init' }>;
  events?: PoolEvents;
  /** Test hook: inject a fault into these run indices. */
  faults?: ReadonlyMap<number, FaultKind>;
}

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
  const queue = [...plans];
  const results: RunResult[] = [];
  const live = new Set<PoolWorker>();
  let cancelled = false;
  let finished = false;
  let active = 0;
  /** Workers that died before saying 'ready'; past a couple, the page cannot run workers and the queue fails. */
  let startFailures = 0;
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
  const record = (result: RunResult) => {
    if (cancelled) return;
    results.push(result);
    options.events?.onResult?.(result);
  };

  const spawn = () => {
    if (cancelled || queue.length === 0) return;
    active++;
    let worker: PoolWorker;
    try {
      worker = options.createWorker();
    } catch (error) {
      // The page cannot start workers at all: every queued run fails with the reason.
      active--;
      const reason = `could not start a worker: ${error instanceof Error ? error.message : String(error)}`;
      while (queue.length) record(failedResult(queue.shift()!, reason));
      finishIfIdle();
      return;
    }
    live.add(worker);
    let current: RunPlan | null = null;
    let settled = false;
    let ready = false;
    const retire = () => {
      settled = true;
      live.delete(worker);
      worker.terminate();
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
      else worker.send({ type: 'run', id: current.index, spec, plan: current });
    };
    worker.listen(
      (message) => {
        if (settled || cancelled) return;
        switch (message.type) {
          case 'ready':
            ready = true;
            options.events?.onReady?.({ backend: message.backend, threads: message.threads, simd: message.simd });
            next();
            return;
          case 'progress':
            if (current && message.id === current.index) options.events?.onProgress?.(current, message.step, message.totalSteps, message.loss);
            return;
          case 'done':
            record(message.result);
            next();
            return;
          case 'error':
            if (current) {
              record(failedResult(current, `worker error: ${message.message}`));
              next();
            } else {
              // The backend did not start: this worker can run nothing; the queue fails with the reason.
              const reason = `the worker could not start the engine: ${message.message}`;
              while (queue.length) record(failedResult(queue.shift()!, reason));
              retire();
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
        if (!ready && ++startFailures >= 2) {
          while (queue.length) record(failedResult(queue.shift()!, `workers die before starting: ${reason}`));
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

  const cancel = () => {
    if (cancelled) return;
    cancelled = true;
    for (const worker of live) worker.terminate();
    live.clear();
    active = 0;
    finish();
  };
  return { done, cancel };
}
