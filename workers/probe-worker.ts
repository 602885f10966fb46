/**
 * Web Worker entry for the sheet's "Look inside": trains the arms on the first
 * seed with the same engine as every run, then probes, audits and traces each
 * trained network (`probeDocument`, synchronous inside this worker so the page
 * stays responsive). Stopping is terminating the worker.
 *
 * The backend is initialised exactly as workers/browser-worker.ts does: the
 * single-threaded SIMD WASM binary (the multithread flag is off before the
 * backend first initialises), the binaries' URLs arriving in 'init'.
 */
import { env } from '@tensorflow/tfjs-core';
// Loading the backend module registers its flags, so the one below can be set.
import '@tensorflow/tfjs-backend-wasm';
import { initBackend } from '../src/engine/backend.ts';
import { probeDocument } from '../src/inspect/probe-document.ts';
import type { FromProbeWorker, ToProbeWorker } from './probe-protocol.ts';

interface WorkerScope {
  postMessage(message: FromProbeWorker): void;
  addEventListener(type: 'message', listener: (event: MessageEvent<ToProbeWorker>) => void): void;
}

env().set('WASM_HAS_MULTITHREAD_SUPPORT', false);

/** Progress messages at most this often, so posting never slows training. */
const PROGRESS_INTERVAL_MS = 200;

const scope = self as unknown as WorkerScope;
let ready: Promise<{ backend: 'wasm' | 'cpu'; threads: number }> | null = null;

function init(wasmPaths?: string | Record<string, string>) {
  ready = initBackend('wasm', { threads: 1, wasmPaths }) as Promise<{ backend: 'wasm' | 'cpu'; threads: number }>;
  return ready;
}

scope.addEventListener('message', (event) => {
  const message = event.data;
  void (async () => {
    try {
      if (message.type === 'init') {
        const info = await init(message.wasmPaths);
        scope.postMessage({ type: 'ready', backend: info.backend, threads: info.threads });
        return;
      }
      await (ready ?? init());
      const { id, spec } = message;
      const started = Date.now();
      const total = spec.arms.length * message.seeds;
      let index = 0;
      let last = 0;
      let current: { arm: string; seed: number } | null = null;
      const doc = probeDocument(spec, {
        seeds: message.seeds,
        graphs: message.graphs,
        onRunStart: ({ arm, seed }) => {
          current = { arm, seed };
          scope.postMessage({ type: 'run-start', id, arm, seed, index: index++, total });
        },
        onProgress: (p) => {
          const now = Date.now();
          if (now - last >= PROGRESS_INTERVAL_MS || p.step === p.totalSteps) {
            last = now;
            scope.postMessage({ type: 'progress', id, arm: p.arm, seed: p.seed, step: p.step, totalSteps: p.totalSteps, loss: p.loss });
          }
          if (p.step === p.totalSteps && current) scope.postMessage({ type: 'probing', id, ...current });
        },
      });
      scope.postMessage({ type: 'done', id, doc, ms: Date.now() - started });
    } catch (error) {
      scope.postMessage({ type: 'error', id: 'id' in message ? message.id : null, message: error instanceof Error ? error.message : String(error) });
    }
  })();
});
