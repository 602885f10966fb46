/**
 * A fixed small spec's `specHash` (src/experiment/results.ts), pinned from the
 * current implementation. The hash is SHA-256 of the canonical JSON of the
 * validated spec, defaults included, so it moves when canonicalJson, the hash,
 * or any default `validateSpec` fills in changes. Results documents, journals
 * and the sheet's kept runs are keyed by it; a change must be deliberate.
 * (The same spec is test/fixtures/tiny.json; `farfield run` prints this hash.)
 */
import { describe, expect, it } from 'vitest';
import { validateSpec } from '../../src/experiment/check.ts';
import { specHash } from '../../src/experiment/results.ts';
import { canonicalJson, sha256Hex } from '../../src/util/hash.ts';

const input = {
  farfield: 1,
  question: 'Fixture: a tiny max-versus-sum run for command-line tests',
  task: 'shortest-path',
  train: { family: 'er', sizes: [5, 8], graphs: 32 },
  test: { sizes: [8, 12], graphsPerRung: 4, validationGraphs: 8 },
  budget: { steps: 30, batchGraphs: 8, learningRate: 0.003, clipNorm: 1, loss: 'huber', validateEvery: 10 },
  seeds: { count: 2, base: 3 },
  model: { hidden: 8, steps: { rule: 'nodes', trainJitter: 2 } },
  arms: [
    { name: 'max', model: { aggregator: 'max' } },
    { name: 'sum', model: { aggregator: 'sum' } },
  ],
};

describe('specHash: pinned (from the current implementation)', () => {
  it('the fixed tiny spec hashes to 20d95e7da53f8691', () => {
    expect(specHash(validateSpec(input))).toBe('20d95e7da53f8691');
  });

  it('is the first 16 hex digits of SHA-256 over the canonical JSON', () => {
    const spec = validateSpec(input);
    expect(specHash(spec)).toBe(sha256Hex(canonicalJson(spec)).slice(0, 16));
  });

  it('does not depend on the key order of the input', () => {
    const reordered = { arms: input.arms, seeds: input.seeds, budget: input.budget, model: input.model, test: input.test, train: input.train, task: input.task, question: input.question, farfield: 1 };
    expect(specHash(validateSpec(reordered))).toBe('20d95e7da53f8691');
  });

  it('moves when any value changes', () => {
    expect(specHash(validateSpec({ ...input, seeds: { count: 2, base: 4 } }))).not.toBe('20d95e7da53f8691');
  });
});
