/**
 * The graphs of one seed: training pool, in-distribution validation set, and
 * one test set per ladder rung (size × weight scale). They depend only on the
 * spec and the seed, never on the arm, so every arm of a seed sees the same
 * graphs (paired comparison). Rungs of the same size share their graphs across
 * weight scales, so a scale shift changes only the values.
 */
import type { ExperimentSpec } from './spec.ts';
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
  validation: TaskInstance[];
  rungs: Rung[];
}

export function makeInstance(spec: ExperimentSpec, familyId: string, nodes: number, scale: number, rng: Rng): TaskInstance {
  return buildInstance(spec.task, familyId, nodes, rng, {
    weightRange: spec.train.weightRange,
    weightScale: scale,
    params: spec.train.familyParams,
  }).instance;
}

export function seedRoot(seed: number): Rng {
  return new Rng(seed);
}

export function makeSeedData(spec: ExperimentSpec, seed: number): SeedData {
  const data = seedRoot(seed).fork('data');
  const [lo, hi] = spec.train.sizes;
  const trainStream = data.fork('train');
  const train: TaskInstance[] = [];
  for (let i = 0; i < spec.train.graphs; i++) {
    const r = trainStream.fork(i);
    train.push(makeInstance(spec, spec.train.family, r.int(lo, hi), 1, r));
  }
  const validationStream = data.fork('validation');
  const validation: TaskInstance[] = [];
  for (let i = 0; i < spec.test.validationGraphs; i++) {
    const r = validationStream.fork(i);
    validation.push(makeInstance(spec, spec.train.family, r.int(lo, hi), 1, r));
  }
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
  return { train, validation, rungs };
}
