/**
 * The bench's "previous path" network (bench/previous-network.ts) must be
 * engine 0.2.0's composition of the same mathematics: its outputs and
 * gradients agree with this engine's network to float32 rounding (common
 * practice: relative differences of a few ulps per product), while the bits
 * differ — the input term sits inside every step's product there and is
 * computed once per pass here. Otherwise its timing would compare unlike work.
 */
import { describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs-core';
import { initBackend } from '../../src/engine/backend.ts';
import { setFusedProcessEnabled } from '../../src/engine/kernels-process.ts';
import { MessagePassingNetwork } from '../../src/model/network.ts';
import { modelSchema } from '../../src/experiment/spec.ts';
import { Rng } from '../../src/util/rng.ts';
import { PreviousEngineNetwork } from '../../bench/previous-network.ts';
import { referenceInstances } from '../../bench/reference.ts';
import { makeBatch } from '../../src/train/batch.ts';
import { uploadBatch } from '../../src/train/tensors.ts';
import type { FeatureTransforms } from '../../src/train/batch.ts';

const TRANSFORMS: FeatureTransforms = { node: ['identity'], edge: ['identity'], nodeStats: [], edgeStats: [] };

function outcome(network: MessagePassingNetwork, steps: number): { y: Float32Array; grads: Map<string, Float32Array> } {
  const instances = referenceInstances(6);
  const batch = uploadBatch(makeBatch(instances, TRANSFORMS));
  try {
    let result: { y: Float32Array; grads: Map<string, Float32Array> } | null = null;
    tf.tidy(() => {
      const vars = [...network.params.vars.values()];
      const { grads } = tf.variableGrads(() => tf.sum(tf.square(network.forward(batch, { steps }).prediction)) as tf.Scalar, vars);
      const y = network.forward(batch, { steps }).prediction.dataSync() as Float32Array;
      const byParam = [...network.params.vars].map(([param, v]) => [param, (grads[v.name]!.dataSync() as Float32Array).slice()] as const);
      result = { y: y.slice(), grads: new Map(byParam) };
    });
    return result!;
  } finally {
    batch.dispose();
  }
}

describe("the bench's previous-path network", () => {
  for (const activation of ['relu', 'leaky-relu'] as const) {
    it(`computes this engine's function with engine 0.2.0's rounding (${activation}, biases on)`, async () => {
      await initBackend('wasm');
      const options = modelSchema.parse({ hidden: 16, aggregator: 'max', activation, steps: { rule: 'fixed', count: 6, trainJitter: 0 } });
      const features = referenceInstances(1)[0]!;
      const make = (Kind: typeof MessagePassingNetwork) => {
        const network = new Kind(options, features.nodeInputs[0]!.length, features.edgeInputs[0]!.length, new Rng(5));
        // Move every weight off its start (the update's output layer starts at zero, which would hide the update).
        const rng = new Rng(9);
        network.params.restore(new Map([...network.params.snapshot()].map(([name, w]) => [name, Float32Array.from(w, (v) => v + rng.uniform(-0.2, 0.2))])));
        return network;
      };
      const current = make(MessagePassingNetwork);
      const previous = make(PreviousEngineNetwork);
      setFusedProcessEnabled(false);
      try {
        const a = outcome(current, 6);
        const b = outcome(previous, 6);
        let differ = 0;
        for (let i = 0; i < a.y.length; i++) {
          expect(Math.abs(a.y[i]! - b.y[i]!)).toBeLessThanOrEqual(1e-4 * (1 + Math.abs(a.y[i]!)));
          if (!Object.is(a.y[i], b.y[i])) differ++;
        }
        expect(differ).toBeGreaterThan(0);
        expect([...b.grads.keys()].sort()).toEqual([...a.grads.keys()].sort());
        for (const [name, g] of a.grads) {
          const h = b.grads.get(name)!;
          const scale = Math.max(1e-6, ...g.map(Math.abs));
          for (let i = 0; i < g.length; i++) expect(Math.abs(g[i]! - h[i]!), name).toBeLessThanOrEqual(1e-3 * scale);
        }
      } finally {
        setFusedProcessEnabled(true);
        current.dispose();
        previous.dispose();
      }
    });
  }
});
