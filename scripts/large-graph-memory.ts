/**
 * Measures scoring at the graph-file caps: a seeded random graph of 100,000
 * nodes and 1,000,000 undirected edges (a ring plus random chords, so it is
 * connected) as an edge-list file, read, solved (shortest-path) and scored by
 * an untrained network in edge chunks. Prints the time of each phase and the
 * process's peak resident memory.
 *
 *   npx tsx scripts/large-graph-memory.ts [--steps 16] [--aggregator max]
 */
import { parseArgs } from 'node:util';
import { initBackend } from '../src/engine/backend.ts';
import { Rng } from '../src/util/rng.ts';
import { readGraphFile } from '../src/graphs/files/read.ts';
import { fileInstance } from '../src/tasks/file-instance.ts';
import { getTask } from '../src/tasks/registry.ts';
import { MessagePassingNetwork } from '../src/model/network.ts';
import { modelSchema } from '../src/experiment/spec.ts';
import { evaluateLarge } from '../src/train/evaluate-large.ts';
import { GRAPH_FILE_LIMITS } from '../src/graphs/files/caps.ts';

const { values } = parseArgs({ options: { steps: { type: 'string', default: '16' }, aggregator: { type: 'string', default: 'max' } } });
const N = GRAPH_FILE_LIMITS.graphFileNodes.max;
const M = GRAPH_FILE_LIMITS.graphFileEdges.max;
const mb = (bytes: number) => `${(bytes / 2 ** 20).toFixed(0)} MB`;
const peak = () => process.resourceUsage().maxRSS * 1024;
let t = Date.now();
const phase = (name: string) => {
  const now = Date.now();
  process.stdout.write(`${name}: ${((now - t) / 1000).toFixed(1)} s, peak RSS so far ${mb(peak())}\n`);
  t = now;
};

await initBackend('wasm');
const rng = new Rng(16).fork('large-graph');
const seen = new Set<number>();
const rows = ['source,target,weight'];
const add = (u: number, v: number) => {
  const key = Math.min(u, v) * N + Math.max(u, v);
  if (u === v || seen.has(key)) return false;
  seen.add(key);
  rows.push(`${u},${v},${rng.int(1, 10)}`);
  return true;
};
for (let i = 0; i < N; i++) add(i, (i + 1) % N);
while (rows.length - 1 < M) add(rng.int(0, N - 1), rng.int(0, N - 1));
const text = rows.join('\n') + '\n';
seen.clear();
rows.length = 0;
phase(`generated ${N} nodes, ${M} edges (${mb(text.length)} of text)`);
const file = readGraphFile({ name: 'large.csv' }, text);
phase('read');
const { instance } = fileInstance(getTask('shortest-path'), file, { source: '0' });
phase(`solved (depth ${instance.depth})`);
const model = modelSchema.parse({ hidden: 32, aggregator: values.aggregator, steps: { rule: 'fixed', count: Number(values.steps) } });
const network = new MessagePassingNetwork(model, 1, 1, new Rng(1));
const { metrics } = evaluateLarge(network, instance, { node: ['identity'], edge: ['identity'], nodeStats: [], edgeStats: [] });
phase(`scored ${values.steps} message-passing steps, ${instance.messageSrc.length} message edges (mae ${metrics.mae.toFixed(1)})`);
network.dispose();
process.stdout.write(`peak RSS ${mb(peak())}\n`);
