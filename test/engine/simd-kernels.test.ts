/**
 * Farfield's SIMD kernels (src/engine/simd/) must give exactly the bits of the
 * paths they replace: XNNPACK's matmul (plain, fused bias/relu, after an
 * explicit transpose) and the JavaScript graph loops. Each case runs the same
 * op with the module on and off and compares every float with Object.is, on
 * awkward shapes (tails of 1-3 lanes), NaN, -0, ties and empty segments. The
 * reference is the stock path itself, so these checks are common practice
 * (differential testing), not an outside source.
 */
import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import fs from 'node:fs';
import * as tf from '@tensorflow/tfjs-core';
import type { BackendWasm } from '@tensorflow/tfjs-backend-wasm';
import { initBackend } from '../../src/engine/backend.ts';
import { setSimdKernelsEnabled, simdKernels } from '../../src/engine/simd/simd-kernels.ts';
import { gatherPairAdd, gatherRows, segmentMax, segmentMin, segmentSum } from '../../src/model/ops.ts';
import { patchWasmMatMul, unpatchWasmMatMul } from '../../src/engine/kernels-matmul.ts';
import { Rng } from '../../src/util/rng.ts';
import { expectSameBits } from '../helpers.ts';
import { compileKernels, renderBinaryModule } from '../../scripts/build-simd.mjs';

beforeAll(async () => {
  await initBackend('wasm');
});

afterEach(() => setSimdKernelsEnabled(true));

function values(rng: Rng, n: number, specials = true): Float32Array {
  const out = new Float32Array(n);
  for (let i = 0; i < n; i++) out[i] = rng.uniform(-3, 3);
  if (specials && n > 8) {
    out[1] = NaN;
    out[2] = -0;
    out[5] = out[6]!; // a tie
  }
  return out;
}

/** Run `op` with the SIMD module on and off; return both results as plain arrays. */
function bothWays(op: () => tf.Tensor | tf.Tensor[]): [number[][], number[][]] {
  const read = (r: tf.Tensor | tf.Tensor[]) => (Array.isArray(r) ? r : [r]).map((t) => Array.from(t.dataSync()));
  setSimdKernelsEnabled(true);
  const on = tf.tidy(() => read(op()));
  setSimdKernelsEnabled(false);
  const off = tf.tidy(() => read(op()));
  setSimdKernelsEnabled(true);
  return [on, off];
}

describe('SIMD module', () => {
  it('loads on the WASM backend in Node', () => {
    expect(simdKernels(tf.backend() as unknown as BackendWasm)).not.toBeNull();
  });

  it('the committed binary is the compiled kernels.wat (run `npm run build:simd` after editing it)', async () => {
    const text = fs.readFileSync(new URL('../../src/engine/simd/kernels.wat', import.meta.url), 'utf8');
    const committed = fs.readFileSync(new URL('../../src/engine/simd/kernels-binary.ts', import.meta.url), 'utf8');
    expect(committed).toBe(renderBinaryModule(await compileKernels(text)));
  });
});

describe('matmul on the SIMD kernel is bit-identical to XNNPACK', () => {
  const shapes: [number, number, number][] = [
    [512, 32, 32],
    [2048, 32, 32],
    [64, 96, 32],
    [17, 5, 13],
    [33, 7, 9],
    [40, 1, 3],
    [24, 32, 1],
  ];
  for (const [M, K, N] of shapes) {
    it(`A·B, Aᵀ·B, A·Bᵀ and fused bias/relu for M=${M} K=${K} N=${N}`, () => {
      const rng = new Rng(M * 1000 + K * 10 + N);
      const a = tf.tensor2d(values(rng, M * K), [M, K]);
      const b = tf.tensor2d(values(rng, K * N, false), [K, N]);
      const bias = tf.tensor1d(values(rng, N, false));
      const at = tf.tensor2d(values(rng, K * M), [K, M]);
      const bt = tf.tensor2d(values(rng, N * K, false), [N, K]);
      const [on, off] = bothWays(() => [
        tf.matMul(a, b),
        tf.matMul(at, b, true, false),
        tf.matMul(a, bt, false, true),
        tf.fused.matMul({ a, b, bias }),
        tf.fused.matMul({ a, b, bias, activation: 'relu' }),
        tf.fused.matMul({ a, b, activation: 'relu' }),
        tf.fused.matMul({ a, b: bt, transposeB: true, bias, activation: 'relu' }),
      ]);
      expectSameBits(on, off);
      tf.dispose([a, b, bias, at, bt]);
    });
  }

  it('gradients of a small dense network are bit-identical', () => {
    const rng = new Rng(7);
    const x = tf.tensor2d(values(rng, 300 * 12, false), [300, 12]);
    const w1 = tf.tensor2d(values(rng, 12 * 32, false), [12, 32]);
    const b1 = tf.tensor1d(values(rng, 32, false));
    const w2 = tf.tensor2d(values(rng, 32 * 5, false), [32, 5]);
    const f = (p: tf.Tensor, q: tf.Tensor, r: tf.Tensor) =>
      tf.sum(tf.square(tf.matMul(tf.fused.matMul({ a: x, b: p as tf.Tensor2D, bias: q, activation: 'relu' }), r as tf.Tensor2D)));
    const [on, off] = bothWays(() => tf.grads(f)([w1, b1, w2]));
    expectSameBits(on, off);
    tf.dispose([x, w1, b1, w2]);
  });
});

describe('graph kernels on the SIMD module are bit-identical to the JavaScript loops', () => {
  for (const [nodes, edges, H] of [
    [30, 120, 32],
    [9, 40, 7],
    [5, 3, 1],
    [12, 0, 4],
  ] as const) {
    it(`gatherPairAdd, its gradient, segment max/min and their gradients (nodes ${nodes}, edges ${edges}, width ${H})`, () => {
      const rng = new Rng(nodes * 7 + edges + H);
      // Some nodes get no edge (empty segments), some many.
      const src = tf.tensor1d(Array.from({ length: edges }, () => rng.int(0, nodes - 1)), 'int32');
      const dst = tf.tensor1d(Array.from({ length: edges }, () => rng.int(0, Math.max(0, nodes - 3))), 'int32');
      const p = tf.tensor2d(values(rng, nodes * 2 * H), [nodes, 2 * H]);
      const b = tf.tensor2d(values(rng, edges * H), [edges, H]);
      const x = tf.tensor2d(values(rng, edges * H), [edges, H]);
      const [on, off] = bothWays(() => {
        const pair = gatherPairAdd(p, src, dst, b);
        const [dp, db] = tf.grads((pp: tf.Tensor, bb: tf.Tensor) => tf.sum(tf.mul(gatherPairAdd(pp as tf.Tensor2D, src, dst, bb as tf.Tensor2D), x)))([p, b]);
        const mx = segmentMax(x, dst, nodes);
        const mn = segmentMin(x, dst, nodes);
        const [gx] = tf.grads((xx: tf.Tensor) => tf.sum(tf.mul(segmentMax(xx as tf.Tensor2D, dst, nodes), tf.onesLike(mx).mul(1.5))))([x]);
        const [gn] = tf.grads((xx: tf.Tensor) => tf.sum(segmentMin(xx as tf.Tensor2D, dst, nodes)))([x]);
        return [pair, dp!, db!, mx, mn, gx!, gn!];
      });
      expectSameBits(on, off);
      tf.dispose([src, dst, p, b, x]);
    });
  }

  it('still refuses out-of-range ids with the SIMD module on', () => {
    const p = tf.zeros([3, 4]) as tf.Tensor2D;
    const b = tf.zeros([2, 2]) as tf.Tensor2D;
    const ok = tf.tensor1d([0, 1], 'int32');
    const bad = tf.tensor1d([0, 3], 'int32');
    expect(() => gatherPairAdd(p, ok, bad, b)).toThrow(/out of range 0..2/);
    expect(() => segmentMax(b, bad, 3)).toThrow(/out of range 0..2/);
    tf.dispose([p, b, ok, bad]);
  });
});

describe('concat, split and column sums on the SIMD module are bit-identical to the stock kernels', () => {
  it('concat along the last and the first axis, float32 and int32, with empty and odd-width parts', () => {
    const rng = new Rng(11);
    const a = tf.tensor2d(values(rng, 7 * 5), [7, 5]);
    const b = tf.tensor2d(values(rng, 7 * 3), [7, 3]);
    const c = tf.tensor2d(values(rng, 7 * 8), [7, 8]);
    const empty = tf.zeros([7, 0]);
    const ints = [tf.tensor2d([1, 2, 3, 4], [2, 2], 'int32'), tf.tensor2d([5, 6], [2, 1], 'int32')];
    const [on, off] = bothWays(() => [
      tf.concat([a, b, c], 1),
      tf.concat([a, empty, b], 1),
      tf.concat([a, a], 0),
      tf.concat(ints, 1),
      tf.concat([tf.reshape(a, [7, 5, 1]), tf.reshape(a, [7, 5, 1])], 2),
    ]);
    expectSameBits(on, off);
    tf.dispose([a, b, c, empty, ...ints]);
  });

  it('split along the last and a middle axis, and the gradient of a concat', () => {
    const rng = new Rng(12);
    const x = tf.tensor2d(values(rng, 9 * 13), [9, 13]);
    const y = tf.tensor3d(values(rng, 4 * 6 * 3), [4, 6, 3]);
    const [on, off] = bothWays(() => [
      ...tf.split(x, [5, 0, 8], 1),
      ...tf.split(y, 3, 1),
      ...tf.grads((p: tf.Tensor, q: tf.Tensor) => tf.sum(tf.mul(tf.concat([p, q], 1), tf.range(0, 13).reshape([1, 13]))))([
        tf.slice(x, [0, 0], [9, 6]),
        tf.slice(x, [0, 6], [9, 7]),
      ]),
    ]);
    expectSameBits(on, off);
    tf.dispose([x, y]);
  });

  it('sums over every axis but the last (bias gradients); other reductions keep the stock path', () => {
    const rng = new Rng(13);
    const x = tf.tensor3d(values(rng, 1 * 301 * 13), [1, 301, 13]);
    const w = tf.tensor2d(values(rng, 512 * 32), [512, 32]);
    const [on, off] = bothWays(() => [
      tf.sum(x, [0, 1]),
      tf.sum(x, [1, 0], true),
      tf.sum(w, 0),
      tf.sum(w, -2),
      tf.sum(w, 1),
      tf.sum(w),
      tf.sum(x, [1]),
    ]);
    expectSameBits(on, off);
    tf.dispose([x, w]);
  });
});

/**
 * The pointer-level functions the fused process kernels use, each against the
 * stock op whose rule it copies (tf.relu, tf.leakyRelu, the Relu and LeakyRelu
 * gradients, Add with and without a broadcast row, the segment sum and row
 * gather, and a matmul summed in the stock scalar loop's k-blocks), on widths
 * with SIMD tails and values with NaN, ±0, ±∞ and ties.
 */
describe('pointer-level functions for the fused process kernels', () => {
  const backend = () => tf.backend() as unknown as BackendWasm;
  const raw = () => simdKernels(backend())!.raw;
  /** Copy values into a fresh block; returns its byte pointer. */
  const put = (values: ArrayLike<number>, int = false): number => {
    const r = raw();
    const p = r.malloc(4 * Math.max(1, values.length));
    if (int) new Int32Array(r.memory.buffer, p, values.length).set(values);
    else new Float32Array(r.memory.buffer, p, values.length).set(values);
    return p;
  };
  const take = (p: number, n: number) => Array.from(new Float32Array(raw().memory.buffer, p, n));
  const special = (rng: Rng, n: number) => {
    const v = values(rng, n);
    if (n > 12) {
      v[3] = Infinity;
      v[4] = -Infinity;
      v[7] = 0;
      v[9] = -0;
    }
    return v;
  };
  const LEAKY = 0.01;

  for (const n of [1, 3, 4, 13, 64, 101]) {
    it(`relu, leaky relu, their gradients and adds for ${n} values`, () => {
      const r = raw();
      const rng = new Rng(n + 100);
      const x = special(rng, n);
      const dy = special(rng, n);
      const px = put(x);
      const pdy = put(dy);
      const out = put(new Float32Array(n));
      const check = (run: () => void, stock: () => tf.Tensor) => {
        run();
        const expected = Array.from(tf.tidy(stock).dataSync());
        expectSameBits([take(out, n)], [expected]);
      };
      const X = () => tf.tensor1d(x);
      const DY = () => tf.tensor1d(dy);
      check(() => r.relu(px, out, n), () => tf.relu(X()));
      check(() => r.leakyRelu(px, out, n, Math.fround(LEAKY)), () => tf.leakyRelu(X(), LEAKY));
      check(() => r.reluGrad(pdy, px, out, n), () => tf.mul(DY(), tf.step(X())));
      check(() => r.leakyGrad(pdy, px, out, n, Math.fround(LEAKY)), () => tf.where(tf.greater(X(), 0), DY(), tf.mul(DY(), LEAKY)));
      check(() => r.add(px, pdy, out, n), () => tf.add(X(), DY()));
      for (const p of [px, pdy, out]) r.free(p);
    });
  }

  for (const [rows, cols] of [
    [5, 7],
    [9, 32],
    [1, 3],
  ] as const) {
    it(`segment sum and row gather for ${rows} x ${cols}`, () => {
      const r = raw();
      const rng = new Rng(rows * 31 + cols);
      const x = special(rng, rows * cols);
      const ids = Array.from({ length: rows }, () => rng.int(0, 3));
      const px = put(x);
      const pids = put(ids, true);
      const out = put(new Float32Array(rows * cols));
      const sums = put(new Float32Array(4 * cols));
      r.segmentSum(px, pids, sums, rows, cols, 4);
      const idsT = tf.tensor1d(ids, 'int32');
      expectSameBits([take(sums, 4 * cols)], [Array.from(tf.tidy(() => segmentSum(tf.tensor2d(x, [rows, cols]), idsT, 4)).dataSync())]);
      r.gatherRows(sums, pids, out, rows, cols);
      expectSameBits([take(out, rows * cols)], [Array.from(tf.tidy(() => gatherRows(segmentSum(tf.tensor2d(x, [rows, cols]), idsT, 4), idsT)).dataSync())]);
      idsT.dispose();
      for (const p of [px, pids, out, sums]) r.free(p);
    });
  }

  it('the smooth aggregators\' steps: negation, shift by the segment peak over τ, product over τ', () => {
    const r = raw();
    const rng = new Rng(41);
    const [E, H, S] = [23, 7, 5];
    const tau = 0.37;
    const x = special(rng, E * H);
    const peak = values(rng, S * H);
    const ids = Array.from({ length: E }, () => rng.int(0, S - 1));
    const y = special(rng, E * H);
    const px = put(x);
    const pp = put(peak);
    const pids = put(ids, true);
    const py = put(y);
    const out = put(new Float32Array(E * H));
    const negOut = put(new Float32Array(E * H));
    const X = () => tf.tensor2d(x, [E, H]);
    r.neg(px, out, E * H);
    expectSameBits([take(out, E * H)], [Array.from(tf.tidy(() => tf.neg(X())).dataSync())]);
    const idsT = tf.tensor1d(ids, 'int32');
    r.shiftDiv(px, pp, pids, out, E, H, Math.fround(tau));
    expectSameBits([take(out, E * H)], [Array.from(tf.tidy(() => tf.div(tf.sub(X(), gatherRows(tf.tensor2d(peak, [S, H]), idsT)), tau)).dataSync())]);
    r.mulDivNeg(px, py, out, negOut, E * H, Math.fround(tau));
    const q = tf.tidy(() => Array.from(tf.div(tf.mul(X(), tf.tensor2d(y, [E, H])), tau).dataSync()));
    expectSameBits([take(out, E * H), take(negOut, E * H)], [q, Array.from(tf.tidy(() => tf.neg(tf.tensor1d(q)).dataSync()))]);
    idsT.dispose();
    for (const p of [px, pp, pids, py, out, negOut]) r.free(p);
  });

  it('a product summed in 48-wide k-blocks equals the stock scalar matmul of a transposed operand', () => {
    // The stock kernel (unpatched) on Aᵀ·B with K = 130 rows: the block rule kernels-process.ts reproduces.
    const r = raw();
    const rng = new Rng(5);
    const [K, M, N] = [130, 6, 5];
    const a = values(rng, K * M, false);
    const b = values(rng, K * N, false);
    const pa = put(a);
    const pb = put(b);
    const out = put(new Float32Array(M * N));
    const block = put(new Float32Array(M * N));
    for (let k0 = 0; k0 < K; k0 += 48) {
      const target = k0 === 0 ? out : block;
      r.mmStrided(pa + 4 * k0 * M, pb + 4 * k0 * N, target, Math.min(48, K - k0), M, N, 1, M);
      if (k0 > 0) r.add(out, block, out, M * N);
    }
    unpatchWasmMatMul();
    try {
      const stock = tf.tidy(() => tf.matMul(tf.tensor2d(a, [K, M]), tf.tensor2d(b, [K, N]), true, false).dataSync());
      expectSameBits([take(out, M * N)], [Array.from(stock)]);
    } finally {
      patchWasmMatMul();
    }
    for (const p of [pa, pb, out, block]) r.free(p);
  });
});
