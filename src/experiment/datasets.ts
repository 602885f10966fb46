/**
 * The graphs of one seed: training pool, in-distribution validation set (picks
 * the kept weights), a fresh in-distribution fit set (judges them), and one test
 * set per ladder rung (size × weight scale). They depend only on the
 * spec and the seed, never on the arm, so every arm of a seed sees the same
 * graphs (paired comparison). Rungs of the same size share their graphs across
 * weight scales, so a scale shift changes only the values.
 */
import { armTraining, type ExperimentSpec } from './spec.ts';
import type { TaskInstance } from '../tasks/types.ts';
import { buildInstance } from '../tasks/sample.ts';
import { Rng } from '../util/rng.ts';

export interface Rung {
  family: string;
  size: number;
  scale: number;
  instances: TaskInstance[];
}

export interface SeedData {
  train: TaskInstance[];
  /** Chooses the kept weights during training. */
  validation: TaskInstance[];
  /** Fresh graphs of the training sizes that play no part in training or in choosing weights: the fit gate's set. */
  fit: TaskInstance[];
  rungs: Rung[];
}

/** `roundStates`: also record the exact algorithm's intermediate states (step-wise supervision); draws nothing. */
export function makeInstance(spec: ExperimentSpec, familyId: string, nodes: number, scale: number, rng: Rng, roundStates = false): TaskInstance {
  return buildInstance(spec.task, familyId, nodes, rng, {
    weightRange: spec.train.weightRange,
    weightScale: scale,
    params: spec.train.familyParams,
    roundStates,
  }).instance;
}

/** Whether any arm trains with step-wise supervision (then the training graphs carry their intermediate states). */
export function usesStepSupervision(spec: ExperimentSpec): boolean {
  return spec.arms.some((_, i) => armTraining(spec, i).stepSupervision);
}

export function seedRoot(seed: number): Rng {
  return new Rng(seed);
}

export function makeSeedData(spec: ExperimentSpec, seed: number): SeedData {
  const data = seedRoot(seed).fork('data');
  const [lo, hi] = spec.train.sizes;
  // Graphs of the training sizes from their own named stream: graph i draws its size, then itself.
  const trainingSized = (label: string, count: number, roundStates = false): TaskInstance[] => {
    const stream = data.fork(label);
    return Array.from({ length: count }, (_, i) => {
      const r = stream.fork(i);
      return makeInstance(spec, spec.train.family, r.int(lo, hi), 1, r, roundStates);
    });
  };
  const train = trainingSized('train', spec.train.graphs, usesStepSupervision(spec));
  const validation = trainingSized('validation', spec.test.validationGraphs);
  const fit = trainingSized('fit', spec.test.fitGraphs ?? spec.test.validationGraphs);
  const testFamily = spec.test.family ?? spec.train.family;
  const rungs: Rung[] = [];
  for (const size of spec.test.sizes) {
    for (const scale of spec.test.weightScales) {
      const stream = data.fork(`test:${testFamily}:${size}`);
      const instances: TaskInstance[] = [];
      for (let i = 0; i < spec.test.graphsPerRung; i++) instances.push(makeInstance(spec, testFamily, size, scale, stream.fork(i)));
      rungs.push({ family: testFamily, size, scale, instances });
    }
  }
  return { train, validation, fit, rungs };
}
