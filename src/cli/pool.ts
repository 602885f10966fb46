/**
 * The Node host: runs plans on a pool of worker_threads, one run per worker at
 * a time. A worker that throws marks its run failed and carries on; a worker
 * that dies marks its run failed and is replaced, so the others finish.
 */
import { Worker } from 'node:worker_threads';
import type { ExperimentSpec } from '../experiment/spec.ts';
import type { RunPlan } from '../experiment/plan.ts';
import type { RunResult } from '../experiment/run.ts';
import type { BackendName, EngineInfo } from '../engine/backend.ts';
import type { FromWorker, ToWorker } from '../../workers/protocol.ts';
import { failedResult } from '../experiment/run-record.ts';
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

export interface PoolEvents {
  onStart?: (plan: RunPlan) => void;
  onProgress?: (plan: RunPlan, step: number, totalSteps: number, loss: number) => void;
  onResult?: (result: RunResult) => void;
  onReady?: (info: EngineInfo) => void;
}

export interface PoolOptions {
  workers: number;
  backend?: BackendName;
  events?: PoolEvents;
  /** Test hook: inject a fault into these run indices. */
  faults?: ReadonlyMap<number, 'throw' | 'exit'>;
}

export { failedResult };

export function runPool(spec: ExperimentSpec, plans: readonly RunPlan[], options: PoolOptions): { done: Promise<RunResult[]>; cancel: () => Promise<void> } {
  const queue = [...plans];
  const results: RunResult[] = [];
  const live = new Set<Worker>();
  let cancelled = false;
  let resolveAll: (r: RunResult[]) => void = () => {};
  let rejectAll: (e: Error) => void = () => {};
  const done = new Promise<RunResult[]>((res, rej) => {
    resolveAll = res;
    rejectAll = rej;
  });
  const wanted = Math.max(1, Math.min(options.workers, plans.length));
  let active = 0;

  const finishIfIdle = () => {
    if (active === 0 && (queue.length === 0 || cancelled)) resolveAll(results.sort((a, b) => a.index - b.index));
  };

  const record = (result: RunResult) => {
    results.push(result);
    options.events?.onResult?.(result);
  };

  let entry: URL | null = null;
  const spawn = () => {
    if (cancelled || queue.length === 0 || entry == null) return;
    active++;
    const worker = new Worker(entry, { resourceLimits: { maxYoungGenerationSizeMb: YOUNG_GENERATION_MB } });
    live.add(worker);
    let current: RunPlan | null = null;
    let settled = false;
    const send = (message: ToWorker) => worker.postMessage(message);
    const next = () => {
      current = cancelled ? null : queue.shift() ?? null;
      if (!current) {
        settled = true;
        live.delete(worker);
        void worker.terminate();
        active--;
        finishIfIdle();
        return;
      }
      options.events?.onStart?.(current);
      const fault = options.faults?.get(current.index);
      if (fault) send({ type: 'crash', id: current.index, how: fault });
      else send({ type: 'run', id: current.index, spec, plan: current });
    };
    worker.on('message', (message: FromWorker) => {
      switch (message.type) {
        case 'ready':
          options.events?.onReady?.({ backend: message.backend, threads: message.threads, simd: message.simd });
          next();
          return;
        case 'progress':
          if (current) options.events?.onProgress?.(current, message.step, message.totalSteps, message.loss);
          return;
        case 'done':
          record(message.result);
          next();
          return;
        case 'error':
          if (current) record(failedResult(current, `worker error: ${message.message}`));
          else if (message.id === null) {
            rejectAll(new Error(`worker could not start: ${message.message}`));
            return;
          }
          next();
          return;
      }
    });
    const died = (why: string) => {
      if (settled) return;
      settled = true;
      live.delete(worker);
      if (current && !cancelled) record(failedResult(current, why));
      active--;
      // Replace the dead worker so the remaining runs still finish.
      spawn();
      finishIfIdle();
    };
    worker.on("error", (error: Error) => died(`worker crashed: ${error.message}`));
    worker.on('exit', (code) => died(`worker exited with code ${code}`));
    send({ type: 'init', backend: options.backend ?? 'wasm' });
  };

  if (plans.length === 0) resolveAll([]);
  else {
    void nodeWorkerEntry().then((url) => {
      entry = url;
      for (let i = 0; i < wanted; i++) spawn();
      finishIfIdle();
    }, rejectAll);
  }

  const cancel = async () => {
    cancelled = true;
    await Promise.all([...live].map((w) => w.terminate()));
  };
  return { done, cancel };
}
