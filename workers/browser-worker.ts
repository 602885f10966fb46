/**
 * Web Worker adapter for the engine worker (the browser's host). It wires
 * `postMessage` and the message source to the host-agnostic core; the sheet's
 * pool starts one of these per concurrent run.
 *
 * Threads: the pool already runs one worker per core, and WASM threads gave no
 * gain there (DESIGN.md, "Facts measured"); the threaded binary's pthread
 * helpers also fail to start from a bundled module worker. So each worker runs
 * the single-threaded SIMD binary: the flag is switched off before the backend
 * first initialises. Results are bit-identical either way.
 *
 * One test hook differs from the core: `{ type: 'crash', how: 'exit' }` makes
 * this worker die with an uncaught error (as a worker that runs out of memory
 * or hits an engine bug outside a run would), so the host sees the worker's
 * `error` event rather than a polite error message. (A worker that only closed
 * itself would give the page no signal at all.)
 *
 * A second test hook: a worker started under the name LOAD_FAULT_WORKER_NAME
 * (the sheet does so only for `?fault=load` in the address) throws while
 * loading, so it dies before it is ready and the pool's give-up rule runs.
 */
import { env } from '@tensorflow/tfjs-core';
// Loading the backend module registers its flags, so the one below can be set.
import '@tensorflow/tfjs-backend-wasm';
import { createWorkerCore } from './worker-core.ts';
import { LOAD_FAULT_WORKER_NAME, type FromWorker, type ToWorker } from './protocol.ts';

interface WorkerScope {
  readonly name: string;
  postMessage(message: FromWorker): void;
  addEventListener(type: 'message', listener: (event: MessageEvent<ToWorker>) => void): void;
}

env().set('WASM_HAS_MULTITHREAD_SUPPORT', false);

const scope = self as unknown as WorkerScope;
if (scope.name === LOAD_FAULT_WORKER_NAME) throw new Error('deliberate load failure (test hook ?fault=load)');
const handle = createWorkerCore((message) => scope.postMessage(message));

scope.addEventListener('message', (event) => {
  const message = event.data;
  if (message.type === 'crash' && message.how === 'exit') {
    setTimeout(() => {
      throw new Error(`deliberate worker death injected into run ${message.id}`);
    });
    return;
  }
  void handle(message);
});
