/**
 * Scoring a saved network without retraining: on a spec's ladder (the test
 * graphs of the network's own seed, generated exactly as the run that trained
 * it generated them) and its graph files. Each set is scored by the same code
 * the run used (`evaluateSet`, `evaluateLarge` for files), so on the network's
 * own spec the numbers are the recorded ones to the last bit;
 * `compareRecorded` checks that. Host-agnostic.
 */
import * as tf from '@tensorflow/tfjs-core';
import { armModel, type ExperimentSpec } from './spec.ts';
import { makeSeedData, seedRoot } from './datasets.ts';
import { fileRung, type GraphFileContent } from './file-rungs.ts';
import { getTask } from '../tasks/registry.ts';
import { evaluateLarge } from '../train/evaluate-large.ts';
import { NetworkFileError, shardBytes, type SavedNetwork, type SavedRung } from './saved-network.ts';
import { specHash } from './results.ts';
import { MessagePassingNetwork } from '../model/network.ts';
import { evaluateSet } from '../train/evaluate.ts';
import type { Metrics } from '../train/metrics.ts';
import type { TaskInstance } from '../tasks/types.ts';
import { canonicalJson } from '../util/hash.ts';

export interface ScoredSet {
  /** "n = 12" rungs carry family, size and scale; the in-distribution set has size null. */
  family: string;
  size: number | null;
  scale: number;
  graphs: number;
  metrics: Metrics;
}

export interface LadderScore {
  inDistribution: ScoredSet;
  ladder: ScoredSet[];
  /** Whether the generated rungs are the ones the network's own run was scored on (then the numbers must match). */
  ownLadder: boolean;
}

/** The ladder spec must pose the same task as the network was trained for, or its inputs mean something else. */
export function checkSameTask(file: SavedNetwork, ladder: ExperimentSpec): void {
  if (canonicalJson(ladder.task) !== canonicalJson(file.spec.task)) {
    throw new Error(`experiment/score: the network was trained on task ${canonicalJson(file.spec.task)}, the preset poses ${canonicalJson(ladder.task)}; allowed: a preset of the same task`);
  }
}

/**
 * The ladder's generated rungs from the network's seed, then each of its graph
 * files (`test.files`, content supplied by the host) as one more rung, scored
 * in edge chunks exactly as a run scores them.
 */
export interface LadderOptions {
  /** The content of the ladder's graph files. */
  files?: readonly GraphFileContent[];
  /** Whether this is the network's own ladder; default: the ladder's spec hash equals the network's. */
  own?: boolean;
}

export function scoreOnLadder(file: SavedNetwork, network: MessagePassingNetwork, ladder: ExperimentSpec, options: LadderOptions = {}): LadderScore {
  checkSameTask(file, ladder);
  const task = getTask(ladder.task);
  const data = makeSeedData(ladder, file.seed);
  const score = (family: string, size: number | null, scale: number, instances: readonly TaskInstance[]): ScoredSet => ({
    family,
    size,
    scale,
    graphs: instances.length,
    metrics: evaluateSet(network, instances, file.transforms).metrics,
  });
  return {
    inDistribution: score(ladder.train.family, null, 1, data.fit),
    ladder: [
      ...data.rungs.map((r) => score(r.family, r.size, r.scale, r.instances)),
      ...(ladder.test.files ?? []).map((f): ScoredSet => {
        const rung = fileRung(task, f, options.files);
        return { family: rung.family, size: rung.instance.nodes, scale: 1, graphs: 1, metrics: evaluateLarge(network, rung.instance, file.transforms).metrics };
      }),
    ],
    ownLadder: options.own ?? specHash(ladder) === file.specHash,
  };
}

/** A recorded value (null where it was not finite) against a fresh one, compared exactly. */
function same(recorded: number | null, fresh: number): boolean {
  return recorded === null ? !Number.isFinite(fresh) : Object.is(recorded, fresh);
}

export interface RecordedCheck {
  set: ScoredSet;
  recorded: SavedRung | null;
  /** Equal to the last bit; null where the run recorded nothing for this set (a graph file added now). */
  exact: boolean | null;
}

/** Every scored set beside the run's recorded errors, equal to the last bit or not. */
export function compareRecorded(file: SavedNetwork, score: LadderScore): RecordedCheck[] {
  const find = (s: ScoredSet) =>
    s.size === null ? file.recorded.inDistribution : (file.recorded.ladder.find((r) => r.family === s.family && r.size === s.size && r.scale === s.scale) ?? null);
  return [score.inDistribution, ...score.ladder].map((set) => {
    const recorded = find(set);
    const exact = recorded === null ? null : same(recorded.mae, set.metrics.mae) && same(recorded.mre, set.metrics.mre) && same(recorded.miss, set.metrics.miss);
    return { set, recorded, exact };
  });
}

/**
 * Rebuild the arm's network and load the saved weights into it. Every
 * parameter the architecture declares must be in the file with its shape, and
 * nothing else, so a shard from another arm or spec is refused rather than
 * half-loaded. The caller disposes the network.
 */
export function loadSavedNetwork(file: SavedNetwork, data: ArrayBuffer, origin: string): MessagePassingNetwork {
  const entries = file.weightsManifest[0]!.weights;
  const expected = shardBytes(file);
  if (data.byteLength !== expected) {
    throw new NetworkFileError(`${origin}: the shard ${file.weightsManifest[0]!.paths[0]} holds ${data.byteLength} bytes, the manifest describes ${expected}`);
  }
  const task = getTask(file.spec.task);
  const network = new MessagePassingNetwork(armModel(file.spec, file.armIndex), task.nodeFeatureNames.length, task.edgeFeatureNames.length, seedRoot(file.seed));
  const decoded = tf.io.decodeWeights(data, entries);
  try {
    const names = new Set(Object.keys(decoded));
    for (const [name, variable] of network.params.vars) {
      const tensor = decoded[name];
      if (!tensor) throw new NetworkFileError(`${origin}: weightsManifest: no weight "${name}", which arm ${file.arm} of this spec needs`);
      if (tensor.shape.join('x') !== variable.shape.join('x')) {
        throw new NetworkFileError(`${origin}: weightsManifest: "${name}" has shape [${tensor.shape.join(', ')}], arm ${file.arm} needs [${variable.shape.join(', ')}]`);
      }
      variable.assign(tensor);
      names.delete(name);
    }
    if (names.size) throw new NetworkFileError(`${origin}: weightsManifest: weights this arm does not have: ${[...names].join(', ')}`);
  } catch (error) {
    network.dispose();
    throw error;
  } finally {
    tf.dispose(Object.values(decoded));
  }
  return network;
}
