/** worker_threads adapter for the engine worker (the CLI's host). */
import { parentPort } from 'node:worker_threads';
import { createWorkerCore } from './worker-core.ts';
import type { ToWorker } from './protocol.ts';

if (!parentPort) throw new Error('workers/node-worker: must run inside a worker thread');
const port = parentPort;
const handle = createWorkerCore((message) => port.postMessage(message));
port.on('message', (message: ToWorker) => {
  void handle(message);
});
