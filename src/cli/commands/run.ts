import { cpus } from 'node:os';
import { writeFileSync, renameSync, rmSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { parse, UsageError, intFlag } from '../args.ts';
import { loadSpec } from '../load.ts';
import { planRuns, shardRuns } from '../../experiment/plan.ts';
import { buildResults, ENGINE_VERSION, specHash as hashSpec } from '../../experiment/results.ts';
import { checkSpec } from '../../experiment/check.ts';
import { LIMITS } from '../../experiment/limits.ts';
import type { RunResult } from '../../experiment/run.ts';
import type { BackendName } from '../../engine/backend.ts';
import { runPool } from '../pool.ts';
import { ProgressLine } from '../progress.ts';
import { renderResults } from '../format.ts';
import { Journal, readJournal } from '../journal.ts';
import { attachGraphFiles, graphsFlag } from '../graph-files.ts';
import { savedNetworkFiles, type TrainedWeights } from '../../experiment/saved-network.ts';
import type { ExperimentSpec } from '../../experiment/spec.ts';

export function parseShard(value: string | undefined): { index: number; count: number } | undefined {
  if (value === undefined) return undefined;
  const m = /^(\d+)\/(\d+)$/.exec(value);
  const index = m ? Number(m[1]) : NaN;
  const count = m ? Number(m[2]) : NaN;
  if (!m || count < 1 || count > LIMITS.totalRuns.max || index < 1 || index > count) {
    throw new UsageError(`--shard: got "${value}", allowed i/N with 1 <= i <= N <= ${LIMITS.totalRuns.max}`);
  }
  return { index, count };
}

function writeAtomically(path: string, text: string): void {
  const temp = `${path}.tmp-${process.pid}`;
  writeFileSync(temp, text);
  renameSync(temp, path);
}

/** Write one trained network as DIR/<stem>.json (manifest, spec, arm, seed) and DIR/<stem>.bin (the shard). */
function saveNetwork(dir: string, spec: ExperimentSpec, result: RunResult, weights: TrainedWeights): void {
  const { json, shard } = savedNetworkFiles(spec, result, weights, ENGINE_VERSION);
  writeFileSync(join(dir, shard.name), shard.bytes);
  writeAtomically(join(dir, json.name), json.text);
}

export async function commandRun(args: string[]): Promise<number> {
  const { values, positionals } = parse(args, {
    seeds: { type: 'string' },
    workers: { type: 'string' },
    out: { type: 'string' },
    json: { type: 'boolean' },
    shard: { type: 'string' },
    resume: { type: 'boolean' },
    backend: { type: 'string' },
    quiet: { type: 'boolean' },
    'inject-fault': { type: 'string' },
    graphs: { type: 'string' },
    'keep-networks': { type: 'string' },
  });
  if (positionals.length !== 1) throw new UsageError('usage: farfield run <preset.json | link> [--seeds N] [--workers K] [--out FILE] [--json] [--keep-networks DIR]');
  const loaded = await loadSpec(positionals[0]);
  let spec = loaded.spec;
  const seeds = intFlag('seeds', values.seeds, LIMITS.seeds.min, LIMITS.seeds.max);
  if (seeds !== undefined) spec = checkSpec({ ...spec, seeds: { ...spec.seeds, count: seeds } });
  // Graph files (the preset's test.files and --graphs): read, hashed and checked here; their content rides on each run's plan.
  const graphFiles = await attachGraphFiles(spec, loaded.source === 'file' ? positionals[0]! : null, graphsFlag(values.graphs));
  spec = graphFiles.spec;
  const workers = intFlag('workers', values.workers, 1, 64) ?? Math.max(1, cpus().length);
  const backend = (values.backend ?? 'wasm') as BackendName;
  if (backend !== 'wasm' && backend !== 'cpu') throw new UsageError(`--backend: got "${values.backend}", allowed wasm | cpu`);
  const shard = parseShard(values.shard);
  if (values.resume && !values.out) throw new UsageError('--resume needs --out FILE (the journal lives beside it as FILE.journal)');
  const faults = new Map<number, 'throw' | 'exit'>();
  if (values['inject-fault']) {
    // Test hook: "3:throw,5:exit" makes those runs' workers fail on purpose.
    for (const part of values['inject-fault'].split(',')) {
      const [i, how] = part.split(':');
      if (!/^\d+$/.test(i ?? '') || (how !== 'throw' && how !== 'exit')) throw new UsageError(`--inject-fault: got "${part}", allowed RUN:throw or RUN:exit`);
      faults.set(Number(i), how);
    }
  }

  const keepDir = values['keep-networks'];
  if (keepDir !== undefined) {
    if (!keepDir) throw new UsageError('--keep-networks: give a folder to write the trained networks into');
    mkdirSync(keepDir, { recursive: true });
  }

  const hash = hashSpec(spec);
  let plans = planRuns(spec).map((p) => (graphFiles.files.length ? { ...p, files: graphFiles.files } : p));
  if (shard) plans = shardRuns(plans, shard);
  const journalPath = values.out ? `${values.out}.journal` : null;
  const finished: RunResult[] = journalPath && values.resume ? readJournal(journalPath, hash) : [];
  const finishedIndex = new Set(finished.map((r) => r.index));
  const todo = plans.filter((p) => !finishedIndex.has(p.index));
  const journal = journalPath ? new Journal(journalPath, hash, Boolean(values.resume)) : null;
  if (finished.length && !values.quiet) process.stderr.write(`resuming: ${finished.length} finished run(s) read from ${journalPath}, ${todo.length} to go\n`);
  if (finished.length && keepDir !== undefined) process.stderr.write(`--keep-networks: the ${finished.length} run(s) read from the journal were trained earlier; only the runs trained now are saved\n`);
  if (!values.quiet) {
    process.stderr.write(`${spec.question}\n${todo.length} run(s) on ${Math.min(workers, Math.max(todo.length, 1))} worker(s), ${backend} backend${shard ? `, shard ${shard.index}/${shard.count}` : ''}\n`);
  }

  const progress = new ProgressLine(todo.length, process.stderr, Boolean(values.quiet));
  let engine = { backend: backend as string, threads: 1 };
  const pool = runPool(spec, todo, {
    workers,
    backend,
    faults,
    keepWeights: keepDir !== undefined,
    events: {
      onReady: (info) => (engine = info),
      onStart: (plan) => progress.start(plan),
      onProgress: (plan, step, total, loss) => progress.progress(plan, step, total, loss),
      onResult: (result, weights) => {
        if (keepDir !== undefined && weights) saveNetwork(keepDir, spec, result, weights);
        journal?.append(result);
        progress.result(result);
      },
    },
  });
  const interrupt = () => {
    progress.finish();
    process.stderr.write(`\ninterrupted: finished runs are kept in ${journalPath ?? '(no journal: pass --out FILE to keep them)'}; rerun with --resume to continue\n`);
    void pool.cancel().then(() => process.exit(130));
  };
  process.once('SIGINT', interrupt);
  process.once('SIGTERM', interrupt);
  const fresh = await pool.done;
  process.removeListener('SIGINT', interrupt);
  process.removeListener('SIGTERM', interrupt);
  progress.finish();
  journal?.close();

  const all = [...finished.filter((r) => plans.some((p) => p.index === r.index)), ...fresh];
  const doc = buildResults(spec, all, { name: 'farfield', version: ENGINE_VERSION, backend: engine.backend, threads: engine.threads, host: 'node' }, shard);
  const text = JSON.stringify(doc, null, 1);
  if (values.out) {
    writeAtomically(values.out, text + '\n');
    if (journalPath) rmSync(journalPath, { force: true });
  }
  if (values.json) process.stdout.write(text + '\n');
  else process.stdout.write(renderResults(doc) + '\n');
  if (loaded.fingerprint && !shard) {
    const same = loaded.fingerprint === doc.fingerprint;
    process.stderr.write(same ? `fingerprint ${doc.fingerprint} matches the link\n` : `fingerprint ${doc.fingerprint} differs from the link's ${loaded.fingerprint}\n`);
  }
  return 0;
}
