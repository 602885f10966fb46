/**
 * The fused Adam step and global norm (src/train/adam.ts) against tfjs's own
 * tf.train.adam and sqrt(addN(sum(square(g)))) — the reference is the stock
 * tfjs-core 4.22 implementation, compared bit for bit (Object.is), on both
 * backends, over several steps with and without the clipping multiply.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs-core';
import { initBackend, type BackendName } from '../../src/engine/backend.ts';
import { setSimdKernelsEnabled } from '../../src/engine/simd/simd-kernels.ts';
import { FusedAdam, globalNorm } from '../../src/train/adam.ts';
import { Rng } from '../../src/util/rng.ts';
import { expectSameBits } from '../helpers.ts';

const SHAPES = [[32, 32], [32], [3, 5], [1], [7, 13]];

function randomValues(rng: Rng, n: number, spread: number): Float32Array {
  const out = new Float32Array(n);
  for (let i = 0; i < n; i++) out[i] = rng.uniform(-spread, spread);
  return out;
}

/** Run `steps` steps of stock Adam and of FusedAdam on identical variables and gradients; return both final weights. */
function both(backend: BackendName, steps: number, scales: number[], lr: number): { stock: number[][]; fused: number[][]; norms: [number, number][] } {
  const rng = new Rng(41);
  const init = SHAPES.map((s) => randomValues(rng, s.reduce((a, b) => a * b, 1), 1));
  const gradsPerStep = Array.from({ length: steps }, () => SHAPES.map((s) => randomValues(rng, s.reduce((a, b) => a * b, 1), 3)));
  gradsPerStep[0]![1]![0] = 0; // a zero gradient (m and v stay 0 there)
  const make = () =>
    SHAPES.map((s, i) => {
      const initial = tf.tensor(init[i]!, s);
      const variable = tf.variable(initial);
      initial.dispose();
      return variable;
    });
  const stockVars = make();
  const fusedVars = make();
  const stock = tf.train.adam(lr);
  const fused = new FusedAdam(lr);
  const norms: [number, number][] = [];
  for (let t = 0; t < steps; t++) {
    tf.tidy(() => {
      const grads = gradsPerStep[t]!.map((g, i) => tf.tensor(g, SHAPES[i]));
      const scale = scales[t % scales.length]!;
      const reference = tf.sqrt(tf.addN(grads.map((g) => tf.sum(tf.square(g))))).dataSync()[0]!;
      norms.push([globalNorm(grads), reference]);
      stock.applyGradients(stockVars.map((v, i) => ({ name: v.name, tensor: scale === 1 ? grads[i]! : tf.mul(grads[i]!, scale) })));
      fused.apply(fusedVars.map((variable, i) => ({ variable, grad: grads[i]! })), scale);
    });
  }
  const read = (vs: tf.Variable[]) => vs.map((v) => Array.from(v.dataSync()));
  const out = { stock: read(stockVars), fused: read(fusedVars), norms };
  stock.dispose();
  fused.dispose();
  tf.dispose([...stockVars, ...fusedVars]);
  return out;
}

describe.each(['wasm', 'cpu'] as const)('fused Adam on %s', (backend) => {
  beforeAll(async () => {
    await initBackend(backend);
  });

  it('matches tf.train.adam bit for bit over 12 steps, with and without the clipping multiply', () => {
    const tensorsBefore = tf.memory().numTensors;
    const r = both(backend, 12, [1, 0.37, 1, 0.0123], 0.003);
    expectSameBits(r.fused, r.stock);
    for (const [ours, reference] of r.norms) expect(Object.is(ours, reference)).toBe(true);
    expect(tf.memory().numTensors).toBe(tensorsBefore);
  });

  if (backend === 'wasm') {
    it('gives the same bits without the SIMD module', () => {
      setSimdKernelsEnabled(false);
      try {
        const r = both(backend, 5, [1, 0.5], 0.01);
        expectSameBits(r.fused, r.stock);
        for (const [ours, reference] of r.norms) expect(Object.is(ours, reference)).toBe(true);
      } finally {
        setSimdKernelsEnabled(true);
      }
    });
  }

  it('returns 0 for no gradients and refuses non-float gradients', () => {
    expect(globalNorm([])).toBe(0);
    const ints = tf.tensor1d([1, 2], 'int32');
    expect(() => globalNorm([ints])).toThrow(/must be float32/);
    ints.dispose();
  });
});
