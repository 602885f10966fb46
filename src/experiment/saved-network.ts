/**
 * Trained networks saved in TensorFlow.js's weights format: a JSON file whose
 * `weightsManifest` ([{paths, weights: [{name, shape, dtype}]}], as in a tfjs
 * model.json) points at one binary shard of little-endian float32 values, in
 * manifest order, as `tf.io.encodeWeights` writes them. Beside the manifest
 * the JSON carries what is needed to rebuild and score the network without
 * retraining: the spec, the arm and seed, the engine version, the feature
 * transforms with their training-set statistics, and the run's recorded
 * errors for comparison. Host-agnostic and free of tfjs (the page builds
 * downloads with it); loading a file back into a network is in score.ts.
 *
 * Weight names are the network's parameter names (`encode.w`,
 * `message.semiring`, …), so any tfjs reader can load the shard with
 * `tf.io.decodeWeights(data, manifest[0].weights)`.
 */
import type * as tf from '@tensorflow/tfjs-core';
import { z } from 'zod';
import { describeIssue, SpecError, TRANSFORMS, type ExperimentSpec } from './spec.ts';
import type { RunResult } from './run-types.ts';
import type { FeatureTransforms } from '../train/batch.ts';
import { validateUntrusted } from '../share/spec-gate.ts';
import { specHash } from './results.ts';
import type { TrainedWeights } from './network-weights.ts';

export type { TrainedWeights };

export const NETWORK_FORMAT = 'farfield-network';

export interface SavedRung {
  family: string;
  /** Null for the in-distribution set (graphs of every training size). */
  size: number | null;
  scale: number;
  mae: number | null;
  mre: number | null;
  miss: number | null;
}

/** The JSON half of a saved network. */
export interface SavedNetwork {
  format: typeof NETWORK_FORMAT;
  version: 1;
  generatedBy: string;
  engineVersion: string;
  spec: ExperimentSpec;
  specHash: string;
  arm: string;
  armIndex: number;
  seed: number;
  seedIndex: number;
  runIndex: number;
  transforms: FeatureTransforms;
  /** The errors the run that trained this network recorded (JSON null where not finite). */
  recorded: { keptStep: number; inDistribution: SavedRung | null; ladder: SavedRung[] };
  weightsManifest: Array<{ paths: string[]; weights: tf.io.WeightsManifestEntry[] }>;
}

const rungOf = (family: string, size: number | null, scale: number, m: { mae: number; mre: number; miss: number }): SavedRung => {
  const keep = (x: number) => (Number.isFinite(x) ? x : null);
  return { family, size, scale, mae: keep(m.mae), mre: keep(m.mre), miss: keep(m.miss) };
};

/** The JSON that goes beside the shard `shardName`. */
export function savedNetworkJson(spec: ExperimentSpec, run: RunResult, weights: TrainedWeights, engineVersion: string, shardName: string): SavedNetwork {
  return {
    format: NETWORK_FORMAT,
    version: 1,
    generatedBy: `farfield ${engineVersion}`,
    engineVersion,
    spec,
    specHash: specHash(spec),
    arm: run.arm,
    armIndex: run.armIndex,
    seed: run.seed,
    seedIndex: run.seedIndex,
    runIndex: run.index,
    transforms: weights.transforms,
    recorded: {
      keptStep: run.keptStep,
      inDistribution: run.inDistribution ? rungOf(spec.train.family, null, 1, run.inDistribution) : null,
      ladder: run.ladder.map((r) => rungOf(r.family, r.size, r.scale, r.metrics)),
    },
    weightsManifest: [{ paths: [shardName], weights: weights.specs }],
  };
}

/** The two files of one saved network, named after its run, ready to write or download. */
export function savedNetworkFiles(spec: ExperimentSpec, run: RunResult, weights: TrainedWeights, engineVersion: string): { json: { name: string; text: string }; shard: { name: string; bytes: Uint8Array } } {
  const stem = networkFileStem(run);
  const shardName = `${stem}.bin`;
  return {
    json: { name: `${stem}.json`, text: JSON.stringify(savedNetworkJson(spec, run, weights, engineVersion, shardName), null, 1) + '\n' },
    shard: { name: shardName, bytes: new Uint8Array(weights.data) },
  };
}

/** A file-system-safe stem per run: "run3-max-seed7". */
export function networkFileStem(run: Pick<RunResult, 'index' | 'arm' | 'seed'>): string {
  const arm = run.arm.replace(/[^A-Za-z0-9_.=+-]+/g, '_').replace(/^[._]+/, '').slice(0, 40) || 'arm';
  return `run${run.index}-${arm}-seed${run.seed}`;
}

export class NetworkFileError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'NetworkFileError';
  }
}

const finiteOrNull = z.number().nullable();
const savedRung = z.object({ family: z.string().max(64), size: z.number().nullable(), scale: z.number(), mae: finiteOrNull, mre: finiteOrNull, miss: finiteOrNull });
const stats = z.array(z.object({ mean: z.number(), std: z.number().positive() })).max(64);
const MAX_PARAMETERS = 16_000_000;
const weightEntry = z.object({
  name: z.string().min(1).max(80),
  shape: z.array(z.number().int().min(0).max(MAX_PARAMETERS)).max(4),
  dtype: z.literal('float32'),
});
const fileSchema = z.object({
  format: z.literal(NETWORK_FORMAT),
  version: z.literal(1),
  generatedBy: z.string().max(80),
  engineVersion: z.string().max(40),
  spec: z.unknown(),
  specHash: z.string().max(64),
  arm: z.string().max(80),
  armIndex: z.number().int().min(0),
  seed: z.number().int(),
  seedIndex: z.number().int().min(0),
  runIndex: z.number().int().min(0),
  transforms: z.object({ node: z.array(z.enum(TRANSFORMS)).max(64), edge: z.array(z.enum(TRANSFORMS)).max(64), nodeStats: stats, edgeStats: stats }),
  recorded: z.object({ keptStep: z.number().int().min(0), inDistribution: savedRung.nullable(), ladder: z.array(savedRung).max(256) }),
  weightsManifest: z
    .array(
      z.object({
        // The shard sits beside the JSON: a bare file name, never a path that could leave its folder.
        paths: z.array(z.string().min(1).max(200).regex(/^(?!\.\.?$)[^/\\]+$/, 'allowed a file name beside the JSON, no folders')).length(1),
        weights: z.array(weightEntry).min(1).max(256),
      }),
    )
    .length(1),
});

/** Check the JSON half of a saved network; every refusal names the field and what is allowed. */
export function readSavedNetwork(raw: unknown, origin: string): SavedNetwork {
  const parsed = fileSchema.safeParse(raw);
  if (!parsed.success) {
    const problems = parsed.error.issues.slice(0, 6).map((issue) => describeIssue(issue, raw));
    throw new NetworkFileError(`${origin}: ${problems.join('; ')}`);
  }
  let spec: ExperimentSpec;
  try {
    spec = validateUntrusted(parsed.data.spec);
  } catch (error) {
    if (error instanceof SpecError) throw new NetworkFileError(`${origin}: spec.${error.problems.join('; spec.')}`);
    throw error;
  }
  const file = { ...parsed.data, spec } as SavedNetwork;
  if (file.armIndex >= spec.arms.length || spec.arms[file.armIndex]!.name !== file.arm) {
    throw new NetworkFileError(`${origin}: arm: got "${file.arm}" (armIndex ${file.armIndex}), allowed one of the spec's arms (${spec.arms.map((a) => a.name).join(', ')})`);
  }
  return file;
}

/** Bytes the shard must hold: 4 per float32 value, in manifest order. */
export function shardBytes(file: SavedNetwork): number {
  return file.weightsManifest[0]!.weights.reduce((sum, w) => sum + 4 * w.shape.reduce((a, b) => a * b, 1), 0);
}
