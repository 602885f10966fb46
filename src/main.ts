import { runWorkerPool, wrapWebWorker } from './ui/worker-pool.ts';
import { wasmPaths } from './ui/wasm-paths.ts';
import { validateSpec } from './experiment/check.ts';
import { planRuns } from './experiment/plan.ts';
import { buildResults } from './experiment/results.ts';

const spec = validateSpec({
    farfield: 1,
    question: 'test: does max beat sum on tiny graphs?',
    task: 'shortest-path',
    train: { family: 'er', sizes: [5, 8], graphs: 32 },
    test: { sizes: [8, 12], graphsPerRung: 4, validationGraphs: 8 },
    budget: { steps: 20, batchGraphs: 8, learningRate: 0.003, clipNorm: 1, loss: 'huber', validateEvery: 10 },
    seeds: { count: 2, base: 3 },
    model: { hidden: 8, steps: { rule: 'nodes', trainJitter: 2 } },
    arms: [
      { name: 'max', model: { aggregator: 'max' } },
      { name: 'sum', model: { aggregator: 'sum' } },
    ],
});
const t0 = performance.now();
let info = { backend: 'wasm', threads: 1 };
const pool = runWorkerPool(spec, planRuns(spec), {
  workers: 2,
  createWorker: () => wrapWebWorker(new Worker(new URL('../workers/browser-worker.ts', import.meta.url), { type: 'module' })),
  init: { type: 'init', backend: 'wasm', threads: 1, wasmPaths: wasmPaths() },
  events: { onReady: (i) => { info = i; console.log('ready', JSON.stringify(i), performance.now() - t0); }, onProgress: (p, s, t, l) => console.log('progress', p.index, s, t, l) },
});
const results = await pool.done;
const doc = buildResults(spec, results, { name: 'farfield', version: '0.1.0', backend: info.backend, threads: info.threads, host: 'browser' });
console.log('DONE', doc.fingerprint, JSON.stringify(results.map((r) => [r.status, r.reason, r.seconds])), performance.now() - t0);
document.body.dataset.fp = doc.fingerprint;
