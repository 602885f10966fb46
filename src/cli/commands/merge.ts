/**
 * `farfield merge part-*.json --out results.json`: combine the results of
 * shards (`run --shard i/N`) and recompute the statistics. The merged
 * fingerprint equals that of an unsharded run of the same spec.
 */
import { readFileSync } from 'node:fs';
import { parse, UsageError } from '../args.ts';
import { buildResults, RESULTS_KIND, type ResultsDocument } from '../../experiment/results.ts';
import { validateSpec } from '../../experiment/check.ts';
import type { RunResult } from '../../experiment/run.ts';
import { canonicalJson } from '../../util/hash.ts';
import { renderResults } from '../format.ts';
import { writeFileSync } from 'node:fs';

function readPart(path: string): ResultsDocument {
  let doc: unknown;
  try {
    doc = JSON.parse(readFileSync(path, 'utf8'));
  } catch (error) {
    throw new Error(`cli/merge: ${path}: ${error instanceof Error ? error.message : String(error)}`);
  }
  const d = doc as Partial<ResultsDocument>;
  if (!d || d.kind !== RESULTS_KIND || !Array.isArray(d.runs) || !d.spec || typeof d.specHash !== 'string') {
    throw new Error(`cli/merge: ${path} is not a farfield results document (kind "${RESULTS_KIND}")`);
  }
  return d as ResultsDocument;
}

export async function commandMerge(args: string[]): Promise<number> {
  const { values, positionals } = parse(args, { out: { type: 'string' }, json: { type: 'boolean' } });
  if (positionals.length < 1) throw new UsageError('usage: farfield merge part-1.json part-2.json ... [--out results.json] [--json]');
  const parts = positionals.map(readPart);
  const first = parts[0]!;
  const spec = validateSpec(first.spec);
  const byIndex = new Map<number, RunResult>();
  parts.forEach((part, p) => {
    if (part.specHash !== first.specHash) {
      throw new Error(`cli/merge: ${positionals[p]} is from spec ${part.specHash}, but ${positionals[0]} is from spec ${first.specHash}`);
    }
    if (part.engine?.version !== first.engine?.version) {
      throw new Error(`cli/merge: ${positionals[p]} was computed by engine ${part.engine?.version}, but ${positionals[0]} by engine ${first.engine?.version}; shards must come from one engine version`);
    }
    for (const run of part.runs) {
      const seen = byIndex.get(run.index);
      if (seen && canonicalJson({ ...seen, seconds: 0 }) !== canonicalJson({ ...run, seconds: 0 })) {
        throw new Error(`cli/merge: run ${run.index} (${run.arm}, seed ${run.seed}) appears twice with different results`);
      }
      byIndex.set(run.index, run);
    }
  });
  const expected = spec.arms.length * spec.seeds.count;
  const doc = buildResults(spec, [...byIndex.values()], first.engine);
  if (byIndex.size < expected) process.stderr.write(`merge: ${byIndex.size} of ${expected} runs present; missing runs are reported as not run\n`);
  const text = JSON.stringify(doc, null, 1);
  if (values.out) writeFileSync(values.out, text + '\n');
  process.stdout.write((values.json ? text : renderResults(doc)) + '\n');
  return 0;
}
