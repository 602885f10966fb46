/**
 * `farfield score <network.json> [<preset.json | link>] [--graphs a.gr,b.csv] [--json]`:
 * score a network saved by `run --keep-networks` without retraining. On its
 * own spec's ladder (the default) the errors must equal, to the last bit, the
 * ones its run recorded; the command says so and exits 1 if they do not.
 * Another preset of the same task gives its ladder, generated from the
 * network's seed. `--graphs` adds graph files as rungs (or supplies the
 * content of files the spec names), read as `run --graphs` reads them.
 */
import { readFileSync, statSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { parse, UsageError } from '../args.ts';
import { loadSpec } from '../load.ts';
import { attachGraphFiles, graphsFlag } from '../graph-files.ts';
import { num, renderTable } from '../format.ts';
import { initBackend } from '../../engine/backend.ts';
import { ENGINE_VERSION, specHash } from '../../experiment/results.ts';
import { NetworkFileError, readSavedNetwork, shardBytes, type SavedNetwork } from '../../experiment/saved-network.ts';
import { compareRecorded, loadSavedNetwork, scoreOnLadder, type RecordedCheck, type ScoredSet } from '../../experiment/score.ts';
import { readJsonText, JsonTextError } from '../../share/json-text.ts';

const USAGE = 'usage: farfield score <network.json> [<preset.json | link>] [--graphs a.gr,b.csv] [--json]';
/** The JSON half of a saved network is small (a spec and a manifest); the shard holds the numbers. */
const MAX_JSON_BYTES = 1024 * 1024;

function fail(message: string): never {
  throw new Error(`cli/score: ${message}`);
}

function readBytes(path: string, max: number): Buffer {
  try {
    const size = statSync(path).size;
    if (size > max) fail(`${path}: ${size} bytes, allowed at most ${max}`);
    return readFileSync(path);
  } catch (error) {
    if (error instanceof Error && error.message.startsWith('cli/score: ')) throw error;
    fail(`${path}: ${error instanceof Error ? error.message : String(error)}`);
  }
}

function readNetwork(path: string): { file: SavedNetwork; data: ArrayBuffer } {
  let raw: unknown;
  try {
    raw = readJsonText(readBytes(path, MAX_JSON_BYTES).toString('utf8'));
  } catch (error) {
    if (error instanceof JsonTextError) fail(`${path}:${error.message}`);
    throw error;
  }
  try {
    const file = readSavedNetwork(raw, path);
    // The schema allows only a bare file name: the shard sits beside the JSON.
    const bytes = readBytes(join(dirname(path), file.weightsManifest[0]!.paths[0]!), shardBytes(file));
    return { file, data: bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer };
  } catch (error) {
    if (error instanceof NetworkFileError) fail(error.message);
    throw error;
  }
}

function setLabel(s: ScoredSet): string {
  return s.size === null ? `in-distribution (${s.family})` : `${s.family} n = ${s.size}${s.scale !== 1 ? ` ×${s.scale}` : ''}`;
}

function render(file: SavedNetwork, sets: readonly ScoredSet[], checks: readonly RecordedCheck[] | null): string {
  const rows: string[][] = [['set', 'graphs', 'mae', 'mre', 'miss', ...(checks ? ['recorded mae', 'same bits'] : [])]];
  sets.forEach((s, i) => {
    const c = checks?.[i];
    const same = c?.exact === null ? 'not recorded' : c?.exact ? 'yes' : 'NO';
    rows.push([setLabel(s), String(s.graphs), num(s.metrics.mae), num(s.metrics.mre), num(s.metrics.miss), ...(c ? [num(c.recorded?.mae ?? NaN), same] : [])]);
  });
  return `${file.arm}, seed ${file.seed} (run ${file.runIndex} of spec ${file.specHash}; trained by farfield ${file.engineVersion})\n${renderTable(rows)}`;
}

export async function commandScore(args: string[]): Promise<number> {
  const { values, positionals } = parse(args, { json: { type: 'boolean' }, graphs: { type: 'string' } });
  if (positionals.length < 1 || positionals.length > 2) throw new UsageError(USAGE);
  const { file, data } = readNetwork(positionals[0]!);
  const loaded = positionals[1] ? await loadSpec(positionals[1]) : null;
  const base = loaded?.spec ?? file.spec;
  // Files the preset names resolve beside it; --graphs files are added as rungs or supply named ones.
  const attached = await attachGraphFiles(base, loaded?.source === 'file' ? positionals[1]! : null, graphsFlag(values.graphs));
  const ladder = attached.spec;
  if (file.engineVersion !== ENGINE_VERSION) {
    process.stderr.write(`score: the network was trained by farfield ${file.engineVersion}, this is ${ENGINE_VERSION}; the numbers may differ from the recorded ones\n`);
  }
  await initBackend('wasm');
  let network;
  try {
    network = loadSavedNetwork(file, data, positionals[0]!);
  } catch (error) {
    if (error instanceof NetworkFileError) fail(error.message);
    throw error;
  }
  try {
    // Own ladder: the spec the network was trained on, whatever graph files are added to it now.
    const score = scoreOnLadder(file, network, ladder, { files: attached.files, own: specHash(base) === file.specHash });
    const sets = [score.inDistribution, ...score.ladder];
    const checks = score.ownLadder ? compareRecorded(file, score) : null;
    const compared = checks?.filter((c) => c.exact !== null) ?? [];
    const reproduces = compared.length ? compared.every((c) => c.exact) : null;
    if (values.json) {
      const plain = (s: ScoredSet, i: number) => ({ ...s, ...(checks ? { recorded: checks[i]!.recorded, exact: checks[i]!.exact } : {}) });
      process.stdout.write(JSON.stringify({ arm: file.arm, seed: file.seed, specHash: file.specHash, ownLadder: score.ownLadder, reproduces, sets: sets.map(plain) }, null, 1) + '\n');
    } else {
      process.stdout.write(render(file, sets, checks) + '\n');
      if (reproduces === null) process.stdout.write('Scored on another spec\'s ladder (graphs from the network\'s seed): nothing recorded to compare.\n');
    }
    if (reproduces === false) {
      process.stderr.write(`score: ${compared.filter((c) => !c.exact).length} set(s) differ from the errors the run recorded\n`);
      return 1;
    }
    if (reproduces && !values.json) process.stdout.write(`All ${compared.length} recorded sets reproduce the run's errors exactly.\n`);
    return 0;
  } finally {
    network.dispose();
  }
}
