/**
 * Scoring a saved network without retraining: on a spec's ladder (the test
 * graphs of the network's own seed, generated exactly as the run that trained
 * it generated them) or on given graphs. Each set is scored by the same
 * `evaluateSet` the run used, so on the network's own spec the numbers are
 * the recorded ones to the last bit; `compareRecorded` checks that.
 * Host-agnostic.
 */
import type { ExperimentSpec } from './spec.ts';
import { makeSeedData } from './datasets.ts';
import type { SavedNetwork, SavedRung } from './saved-network.ts';
import { specHash } from './results.ts';
import type { MessagePassingNetwork } from '../model/network.ts';
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
  /** Whether the ladder is the one the network's own run was scored on (then the numbers must match). */
  ownLadder: boolean;
}

/** The ladder spec must pose the same task as the network was trained for, or its inputs mean something else. */
export function checkSameTask(file: SavedNetwork, ladder: ExperimentSpec): void {
  if (canonicalJson(ladder.task) !== canonicalJson(file.spec.task)) {
    throw new Error(`experiment/score: the network was trained on task ${canonicalJson(file.spec.task)}, the preset poses ${canonicalJson(ladder.task)}; allowed: a preset of the same task`);
  }
}

export function scoreOnLadder(file: SavedNetwork, network: MessagePassingNetwork, ladder: ExperimentSpec): LadderScore {
  checkSameTask(file, ladder);
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
    ladder: data.rungs.map((r) => score(r.family, r.size, r.scale, r.instances)),
    ownLadder: specHash(ladder) === file.specHash,
  };
}

export function scoreOnGraphs(file: SavedNetwork, network: MessagePassingNetwork, label: string, instances: readonly TaskInstance[]): ScoredSet {
  return { family: label, size: null, scale: 1, graphs: instances.length, metrics: evaluateSet(network, instances, file.transforms).metrics };
}

/** A recorded value (null where it was not finite) against a fresh one, compared exactly. */
function same(recorded: number | null, fresh: number): boolean {
  return recorded === null ? !Number.isFinite(fresh) : Object.is(recorded, fresh);
}

export interface RecordedCheck {
  set: ScoredSet;
  recorded: SavedRung | null;
  exact: boolean;
}

/** Every scored set beside the run's recorded errors, equal to the last bit or not. */
export function compareRecorded(file: SavedNetwork, score: LadderScore): RecordedCheck[] {
  const find = (s: ScoredSet) =>
    s.size === null ? file.recorded.inDistribution : (file.recorded.ladder.find((r) => r.family === s.family && r.size === s.size && r.scale === s.scale) ?? null);
  return [score.inDistribution, ...score.ladder].map((set) => {
    const recorded = find(set);
    const exact = recorded !== null && same(recorded.mae, set.metrics.mae) && same(recorded.mre, set.metrics.mre) && same(recorded.miss, set.metrics.miss);
    return { set, recorded, exact };
  });
}
