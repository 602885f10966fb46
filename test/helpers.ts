import { validateSpec } from '../src/experiment/check.ts';
import type { ExperimentSpec, SpecInput } from '../src/experiment/spec.ts';

/** A small, fast spec for tests; override any part. */
export function tinySpec(overrides: Partial<SpecInput> = {}): ExperimentSpec {
  const base: SpecInput = {
    farfield: 1,
    question: 'test: does max beat sum on tiny graphs?',
    task: 'shortest-path',
    train: { family: 'er', sizes: [5, 8], graphs: 32 },
    test: { sizes: [8, 12], graphsPerRung: 4, validationGraphs: 8 },
    budget: { steps: 20, batchGraphs: 8, learningRate: 0.003, clipNorm: 1, loss: 'huber', validateEvery: 10 },
    seeds: { count: 2, base: 3 },
    model: { hidden: 8, steps: { rule: 'nodes', trainJitter: 2 } },
    arms: [
      { name: 'max', model: { aggregator: 'max' } },
      { name: 'sum', model: { aggregator: 'sum' } },
    ],
  };
  return validateSpec({ ...base, ...overrides });
}
