/**
 * Reading a results document from untrusted text (a results.json someone sent,
 * or one written by an older engine) for the standalone report. Host-agnostic.
 *
 * The runs are checked field by field with a schema, the spec goes through
 * the spec checker, and the statistics, verdicts and fingerprint are then
 * recomputed from the runs (`buildResults`), so a report can never show a
 * verdict its own runs do not support. A fingerprint in the file that
 * differs from the recomputed one is reported, not silently replaced.
 *
 * JSON has no NaN or Infinity: `JSON.stringify` writes both as null, so a
 * metric may read back as null; it becomes NaN (not a finite number), which
 * the comparison ranks as a blow-up exactly as it did before saving. The
 * fingerprint counts every non-finite value as null, so it survives the trip;
 * files from an older engine took it over "NaN"/"Infinity", which null no
 * longer tells apart: when such a file holds nulls and its recorded
 * fingerprint does not recompute, it is kept as recorded and marked
 * unverified rather than replaced.
 */
import { z } from 'zod';
import { buildResults, RESULTS_KIND, type EngineInfo, type ResultsDocument } from '../experiment/results.ts';
import { describeIssue, SpecError } from '../experiment/spec.ts';
import { LIMITS } from '../experiment/limits.ts';
import type { RunResult } from '../experiment/run-types.ts';
import { readJsonText, JsonTextError } from '../share/json-text.ts';
import { validateUntrusted } from '../share/spec-gate.ts';

/** Largest results file read: a 64-seed, 16-arm run with its loss curves stays far below. */
export const RESULTS_MAX_BYTES = 64 * 1024 * 1024;

export class ResultsFileError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ResultsFileError';
  }
}

/** A metric value: a number, or null where JSON could not hold NaN/±Infinity (read back as NaN). */
const value = z
  .number()
  .nullable()
  .transform((v) => v ?? NaN);
const count = (max: number) => z.number().int().min(0).max(max);
const metrics = z.object({ mae: value, mre: value, miss: value, nodes: count(1e9) });
const perMetric = z.object({ mae: value, mre: value, miss: value });
const baseline = z.object({ best: perMetric, train: perMetric, bestConstant: perMetric, trainConstant: perMetric });
const rung = z.object({
  family: z.string().max(64),
  size: count(1e6),
  scale: z.number().positive(),
  metrics,
  baseline: baseline.optional(),
  depthMean: value,
  depthMax: value,
  meanDegree: value,
  /** Graph-file rungs: which file, its size and what was counted. */
  file: z
    .object({
      name: z.string().max(400),
      sha256: z.string().max(64),
      nodes: count(1e8),
      edges: count(1e9),
      directed: z.boolean(),
      source: z.string().max(200).optional(),
      counted: count(1e8),
    })
    .optional(),
});
const run = z.object({
  index: count(LIMITS.totalRuns.max),
  arm: z.string().max(LIMITS.textLength.max),
  armIndex: count(LIMITS.arms.max),
  seed: z.number().int(),
  seedIndex: count(LIMITS.seeds.max),
  status: z.enum(['ok', 'diverged', 'failed', 'cancelled']),
  reason: z.string().max(10_000).optional(),
  divergedAt: z.number().int().optional(),
  lastFiniteLoss: value.optional(),
  stepsDone: count(1e9),
  keptStep: count(1e9),
  validationCurve: z.array(z.object({ step: count(1e9), value, relative: value })).optional(),
  lossCurve: z.array(value),
  lossEvery: z.number().int().min(1),
  parameters: count(1e9),
  inDistribution: metrics.nullable(),
  validation: metrics.nullable().optional(),
  ladder: z.array(rung),
  seconds: z.number().min(0),
});
const engine = z.object({
  name: z.literal('farfield'),
  version: z.string().max(64),
  backend: z.string().max(64),
  threads: z.number().int().min(0),
  host: z.enum(['node', 'browser']),
});
const fileSchema = z.object({
  kind: z.literal(RESULTS_KIND),
  version: z.literal(1),
  engine,
  spec: z.unknown(),
  fingerprint: z.string().max(64).optional(),
  shard: z.object({ index: z.number().int().min(1), count: z.number().int().min(1) }).optional(),
  runs: z.array(run).max(LIMITS.totalRuns.max),
});

export interface ReadResults {
  doc: ResultsDocument;
  /** The fingerprint the file carried, when it differs from the one recomputed from its runs (then `doc` holds the recomputed one). */
  fingerprintMismatch: string | null;
  /** The file's runs hold non-finite errors (null in JSON), so its recorded fingerprint, kept in `doc`, could not be checked. */
  fingerprintUnverified: boolean;
}

/** Whether any recorded error of the runs is not a finite number (null in the file). */
function holdsNonFinite(runs: readonly RunResult[]): boolean {
  const bad = (m: { mae: number; mre: number; miss: number } | null | undefined) => m != null && ![m.mae, m.mre, m.miss].every(Number.isFinite);
  return runs.some((r) => bad(r.inDistribution) || r.ladder.some((l) => bad(l.metrics)));
}

/** Parse, check and recompute a results document; every refusal names the file and the field. */
export function readResultsText(text: string, origin: string): ReadResults {
  if (text.length > RESULTS_MAX_BYTES) throw new ResultsFileError(`${origin}: ${text.length} characters, allowed at most ${RESULTS_MAX_BYTES}`);
  let raw: unknown;
  try {
    raw = readJsonText(text);
  } catch (error) {
    if (error instanceof JsonTextError) throw new ResultsFileError(`${origin}:${error.message}`);
    throw error;
  }
  const kind = (raw as { kind?: unknown } | null)?.kind;
  if (kind !== RESULTS_KIND) throw new ResultsFileError(`${origin}: kind: got ${JSON.stringify(kind ?? null)}, allowed "${RESULTS_KIND}" (the file "farfield run --out" writes)`);
  const parsed = fileSchema.safeParse(raw);
  if (!parsed.success) {
    const problems = parsed.error.issues.slice(0, 6).map((issue) => describeIssue(issue, raw));
    throw new ResultsFileError(`${origin}: ${problems.join('; ')}`);
  }
  let spec;
  try {
    spec = validateUntrusted(parsed.data.spec);
  } catch (error) {
    if (error instanceof SpecError) throw new ResultsFileError(`${origin}: spec.${error.problems.join(`; spec.`)}`);
    throw error;
  }
  const runs = parsed.data.runs as RunResult[];
  const arms = spec.arms.length;
  runs.forEach((r, i) => {
    if (r.armIndex >= arms || spec.arms[r.armIndex]!.name !== r.arm) {
      throw new ResultsFileError(`${origin}: runs[${i}].arm: got "${r.arm}" (arm ${r.armIndex}), not an arm of the spec (${spec.arms.map((a) => a.name).join(', ')})`);
    }
  });
  const doc = buildResults(spec, runs, parsed.data.engine as EngineInfo, parsed.data.shard);
  const carried = parsed.data.fingerprint;
  if (!carried || carried === doc.fingerprint) return { doc, fingerprintMismatch: null, fingerprintUnverified: false };
  if (holdsNonFinite(runs)) return { doc: { ...doc, fingerprint: carried }, fingerprintMismatch: null, fingerprintUnverified: true };
  return { doc, fingerprintMismatch: carried, fingerprintUnverified: false };
}
