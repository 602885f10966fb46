/** worker_threads adapter for the engine worker (the CLI's host). */
import { parentPort } from 'node:worker_threads';
import { createWorkerCore } from './worker-core.ts';
import type { ToWorker } from './protocol.ts';

// Test hook (like `--inject-fault`): a worker that throws while loading, for the pool's give-up test.
if (process.env.FARFIELD_TEST_WORKER_LOAD_FAULT) throw new Error(`deliberate load failure (${process.env.FARFIELD_TEST_WORKER_LOAD_FAULT})`);
if (!parentPort) throw new Error('workers/node-worker: must run inside a worker thread');
const port = parentPort;
const handle = createWorkerCore((message) => port.postMessage(message));
port.on('message', (message: ToWorker) => {
  void handle(message);
});
