/**
 * Chunked scoring against the network's own forward pass: with chunks that
 * keep each node's incoming edges together the numbers must be bit-identical
 * (every op is row-wise or runs over a node's edges in edge order); with
 * chunks so small that nodes are split, max and min stay exact and sum, mean
 * and the smooth aggregators agree to float32 rounding (relative 1e-5: another
 * order of additions, common practice for float32 sums of a few terms).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs-core';
import { initBackend } from '../../src/engine/backend.ts';
import { MessagePassingNetwork } from '../../src/model/network.ts';
import { AGGREGATOR_NAMES } from '../../src/model/catalogue.ts';
import { chunkedPredict, combinePartials } from '../../src/model/chunked-forward.ts';
import { getAggregator } from '../../src/model/aggregators.ts';
import { modelSchema, type ModelOptions } from '../../src/experiment/spec.ts';
import { Rng } from '../../src/util/rng.ts';
import { makeBatch, type FeatureTransforms } from '../../src/train/batch.ts';
import { predict } from '../../src/train/evaluate.ts';
import { buildInstance } from '../../src/tasks/sample.ts';

const identity: FeatureTransforms = { node: ['identity'], edge: ['identity'], nodeStats: [], edgeStats: [] };

beforeAll(async () => {
  await initBackend('wasm');
});

function model(overrides: Record<string, unknown>): ModelOptions {
  return modelSchema.parse({ hidden: 8, steps: { rule: 'fixed', count: 5 }, ...overrides });
}

/** A network whose update weights are not zero, so every step changes the state. */
function network(options: ModelOptions, seed: number): MessagePassingNetwork {
  const net = new MessagePassingNetwork(options, 1, 1, new Rng(seed));
  if (net.params.has('update.w2')) {
    const size = net.params.get('update.w2').size;
    const rng = new Rng(seed).fork('w2');
    net.params.set('update.w2', Array.from({ length: size }, () => rng.uniform(-0.3, 0.3)));
  }
  return net;
}

const instance = (family: string, nodes: number, seed: number) => buildInstance('shortest-path', family, nodes, new Rng(seed), { weightRange: [1, 10] }).instance;

const variants: Array<{ message: string; update: string }> = [
  { message: 'mlp', update: 'mlp' },
  { message: 'smooth-min-plus', update: 'gated' },
  { message: 'mlp', update: 'aggregate' },
];

describe('chunked forward equals forward', () => {
  for (const aggregator of AGGREGATOR_NAMES) {
    for (const variant of variants) {
      it(`${aggregator}, ${variant.message}/${variant.update}: bit-identical when chunks keep each node's edges together`, () => {
        const inst = instance('er', 40, 3);
        const net = network(model({ aggregator, ...variant }), 7);
        try {
          const [want] = predict(net, [inst], identity);
          const batch = makeBatch([inst], identity);
          // Budgets from "one node per range" up to "everything in one chunk".
          let maxIn = 0;
          const indeg = new Map<number, number>();
          for (const d of batch.dst) indeg.set(d, (indeg.get(d) ?? 0) + 1);
          for (const k of indeg.values()) maxIn = Math.max(maxIn, k);
          for (const budget of [maxIn, maxIn + 3, 50, batch.edges]) {
            const got = chunkedPredict(net, batch, { steps: 5, edgesPerChunk: budget });
            expect(Array.from(got), `budget ${budget}`).toEqual(Array.from(want!));
          }
        } finally {
          net.dispose();
        }
      });
    }
    it(`${aggregator}: nodes split over chunks combine their partial aggregates`, () => {
      const inst = instance('geometric', 30, 5);
      const net = network(model({ aggregator }), 9);
      try {
        const [want] = predict(net, [inst], identity);
        const got = chunkedPredict(net, makeBatch([inst], identity), { steps: 5, edgesPerChunk: 2 });
        if (aggregator === 'max' || aggregator === 'min') expect(Array.from(got)).toEqual(Array.from(want!));
        else for (let i = 0; i < got.length; i++) expect(Math.abs(got[i]! - want![i]!)).toBeLessThanOrEqual(1e-5 * (1 + Math.abs(want![i]!)));
      } finally {
        net.dispose();
      }
    });
  }

  it('until-stable stops at the same step as forward', () => {
    const inst = instance('er', 30, 4);
    const net = network(model({ aggregator: 'max', steps: { rule: 'until-stable', tolerance: 1e-2, cap: 40 } }), 2);
    try {
      const [want] = predict(net, [inst], identity);
      const got = chunkedPredict(net, makeBatch([inst], identity), { steps: 40, stopTolerance: 1e-2, edgesPerChunk: 16 });
      expect(Array.from(got)).toEqual(Array.from(want!));
    } finally {
      net.dispose();
    }
  });

  it('leaves no tensor behind', () => {
    const inst = instance('er', 20, 1);
    const net = network(model({ aggregator: 'mean' }), 1);
    try {
      const before = tf.memory().numTensors;
      chunkedPredict(net, makeBatch([inst], identity), { steps: 3, edgesPerChunk: 3 });
      expect(tf.memory().numTensors).toBe(before);
    } finally {
      net.dispose();
    }
  });
});

describe('combining partial aggregates', () => {
  it('max and min never combine with the 0 of a part that has no message for the node', () => {
    // Node 0: both parts have messages; node 1: only the first; node 2: only the second; node 3: neither.
    const got = tf.tidy(() => {
      const acc = tf.tensor2d([[-5], [-2], [0], [0]]);
      const part = tf.tensor2d([[-3], [0], [-7], [0]]);
      const accHas = tf.tensor2d([[1], [1], [0], [0]]);
      const partHas = tf.tensor2d([[1], [0], [1], [0]]);
      return {
        max: combinePartials(getAggregator('max'), acc, accHas, part, partHas, 1).dataSync(),
        min: combinePartials(getAggregator('min'), acc, accHas, part, partHas, 1).dataSync(),
      };
    });
    expect(Array.from(got.max)).toEqual([-3, -2, -7, 0]);
    expect(Array.from(got.min)).toEqual([-5, -2, -7, 0]);
  });
});
