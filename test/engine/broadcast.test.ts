/**
 * Broadcasting Equal on WASM (src/engine/kernels-broadcast.ts) must give the
 * stock kernel's exact results: each case runs with the patch (SIMD module and
 * plain-loop paths) and with the stock kernel and compares every value.
 * The reference is tfjs's own WASM kernel (differential testing, common
 * practice).
 */
import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs-core';
import { initBackend } from '../../src/engine/backend.ts';
import { setSimdKernelsEnabled } from '../../src/engine/simd/simd-kernels.ts';
import { broadcastPlan, collapsePlan, patchWasmBroadcast, unpatchWasmBroadcast } from '../../src/engine/kernels-broadcast.ts';
import { Rng } from '../../src/util/rng.ts';
import { expectSameBits } from '../helpers.ts';

beforeAll(async () => {
  await initBackend('wasm');
});
afterEach(() => {
  patchWasmBroadcast();
  setSimdKernelsEnabled(true);
});

function values(rng: Rng, shape: number[]): tf.Tensor {
  const n = shape.reduce((a, b) => a * b, 1);
  const v = new Float32Array(n);
  for (let i = 0; i < n; i++) v[i] = Math.round(rng.uniform(-4, 4) * 4) / 4; // quarter steps, so Equal finds ties
  if (n > 6) {
    v[0] = NaN;
    v[1] = -0;
    v[2] = Infinity;
    v[3] = 0;
  }
  return tf.tensor(v, shape);
}

const PAIRS: [number[], number[]][] = [
  [[5, 4, 6], [5, 1, 6]],
  [[7, 3], [3]],
  [[3], [7, 3]],
  [[2, 3, 4], []],
  [[], [4, 1]],
  [[6, 1], [1, 5]],
  [[2, 1, 3, 1], [1, 4, 1, 5]],
];

describe('broadcasting Equal on WASM', () => {
  for (const [aShape, bShape] of PAIRS) {
    it(`equal of [${aShape}] and [${bShape}] (both orders) matches the stock kernel, with and without the SIMD module`, () => {
      const rng = new Rng(aShape.length * 31 + bShape.length);
      const a = values(rng, aShape);
      const b = values(rng, bShape);
      const ops = () => [tf.equal(a, b), tf.equal(b, a)];
      const read = () => tf.tidy(() => ops().map((t) => ({ dtype: t.dtype, shape: t.shape, values: Array.from(t.dataSync()) })));
      const simd = read();
      setSimdKernelsEnabled(false);
      const loop = read();
      setSimdKernelsEnabled(true);
      unpatchWasmBroadcast();
      const stock = read();
      patchWasmBroadcast();
      expect(simd).toEqual(stock);
      expect(loop).toEqual(stock);
      // Quarter-step values give ties, so a wrong index would show (tiny operands may have none).
      if (a.size >= 8 && b.size >= 8) expect(stock.every((r) => r.values.some((v) => v === 1))).toBe(true);
      tf.dispose([a, b]);
    });
  }

  it('the gradient of a max over an axis (an Equal against the broadcast result) is unchanged', () => {
    const rng = new Rng(5);
    const x = values(rng, [6, 4, 5]);
    const grad = () => tf.tidy(() => Array.from(tf.grad((t: tf.Tensor) => tf.sum(tf.mul(tf.max(t, 1), tf.range(1, 31).reshape([6, 5]))))(x).dataSync()));
    const patched = grad();
    unpatchWasmBroadcast();
    const stock = grad();
    patchWasmBroadcast();
    expectSameBits([patched], [stock]);
    x.dispose();
  });

  it('plans shapes like numpy and refuses shapes that do not broadcast', () => {
    expect(broadcastPlan([5, 1, 6], [4, 1])).toEqual({ shape: [5, 4, 6], aStrides: [6, 0, 1], bStrides: [0, 1, 0] });
    expect(broadcastPlan([3], [4])).toBeNull();
    // Axes walked alike are merged: a scalar operand gives one flat loop; [n, 1, k] against [n, j, k] keeps three axes.
    expect(collapsePlan(broadcastPlan([384, 24, 24], [])!)).toEqual({ shape: [221184], aStrides: [1], bStrides: [0] });
    expect(collapsePlan(broadcastPlan([8, 1, 24], [8, 24, 24])!).shape).toEqual([8, 24, 24]);
    expect(collapsePlan(broadcastPlan([7, 3], [3])!).shape).toEqual([7, 3]);
    const a = tf.ones([3]);
    const b = tf.ones([4]);
    expect(() => tf.add(a, b)).toThrow(/broadcast|shapes/i);
    tf.dispose([a, b]);
  });
});
