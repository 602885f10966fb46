/**
 * Graph ops (src/model/ops.ts) on both backends, checked against references
 * that are common practice rather than outside packages:
 * - forward values against naive loops over plain JS numbers;
 * - gradients against central finite differences of a random projection;
 * - no leaked tensors or backend data ids; bit-identical reruns; WASM vs CPU.
 * Plus the WASM matmul patch (src/engine/kernels-matmul.ts) against the stock
 * kernel.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs-core';
import { initBackend, threadsInUse, type BackendName } from '../../src/engine/backend.ts';
import { isWasmMatMulPatched, patchWasmMatMul, unpatchWasmMatMul, worthTransposing } from '../../src/engine/kernels-matmul.ts';
import { gatherRows, segmentCounts, segmentMax, segmentMean, segmentMin, segmentSum } from '../../src/model/ops.ts';
import { Rng } from '../../src/util/rng.ts';

const BACKENDS: BackendName[] = ['wasm', 'cpu'];

// ------------------------------------------------------------ helpers ----

type Mat = number[][];

interface Graph {
  /** rows (edges) */
  E: number;
  /** segments (nodes); some are empty */
  S: number;
  ids: number[];
}

/** Random segment ids with repeats and deliberately empty segments. */
function randomGraph(rng: Rng, S: number, E: number): Graph {
  const used = Array.from({ length: S }, (_, s) => s).filter(() => rng.next() < 0.75);
  if (used.length === 0) used.push(0);
  const ids = Array.from({ length: E }, () => used[rng.int(0, used.length - 1)]);
  return { E, S, ids };
}

/** Values are float32-representable, so copies (gather, max, min) compare exactly. */
function randomMat(rng: Rng, rows: number, cols: number, draw: () => number = () => rng.uniform(-2, 2)): Mat {
  return Array.from({ length: rows }, () => Array.from({ length: cols }, () => Math.fround(draw())));
}

/** Values from {-2,-1,0,1,2}: many exact ties. */
function tieMat(rng: Rng, rows: number, cols: number): Mat {
  return randomMat(rng, rows, cols, () => rng.int(-2, 2));
}

/** Distinct values at least 0.1 apart: no near-ties for finite differences of max/min. */
function distinctMat(rng: Rng, rows: number, cols: number): Mat {
  const n = rows * cols;
  const vals = Array.from({ length: n }, (_, i) => (i - n / 2) * 0.1);
  for (let i = n - 1; i > 0; i--) {
    const j = rng.int(0, i);
    [vals[i], vals[j]] = [vals[j], vals[i]];
  }
  return Array.from({ length: rows }, (_, r) => vals.slice(r * cols, (r + 1) * cols));
}

const t2 = (m: Mat, cols: number) => tf.tensor2d(m.flat(), [m.length, cols]);
const ids1 = (ids: number[]) => tf.tensor1d(ids, 'int32');
const toMat = (t: tf.Tensor): Mat => t.arraySync() as Mat;

// Naive references (plain loops over JS numbers).
function naiveGather(x: Mat, idx: number[]): Mat {
  return idx.map((i) => x[i].slice());
}
function naiveSegmentSum(x: Mat, g: Graph, C: number): Mat {
  const out = Array.from({ length: g.S }, () => new Array<number>(C).fill(0));
  g.ids.forEach((s, e) => x[e].forEach((v, c) => (out[s][c] += v)));
  return out;
}
function naiveCounts(g: Graph): number[] {
  const cnt = new Array<number>(g.S).fill(0);
  for (const s of g.ids) cnt[s]++;
  return cnt;
}
function naiveSegmentMean(x: Mat, g: Graph, C: number): Mat {
  const cnt = naiveCounts(g);
  return naiveSegmentSum(x, g, C).map((row, s) => row.map((v) => v / Math.max(cnt[s], 1)));
}
/** Values (0 for empty) and arg edge (lowest index among ties, -1 for empty). */
function naiveSegmentExtreme(x: Mat, g: Graph, C: number, isMax: boolean): { values: Mat; arg: number[][] } {
  const values = Array.from({ length: g.S }, () => new Array<number>(C).fill(0));
  const arg = Array.from({ length: g.S }, () => new Array<number>(C).fill(-1));
  g.ids.forEach((s, e) => {
    for (let c = 0; c < C; c++) {
      const v = x[e][c];
      const better = isMax ? v > values[s][c] : v < values[s][c];
      if (arg[s][c] < 0 || better) {
        values[s][c] = v;
        arg[s][c] = e;
      }
    }
  });
  return { values, arg };
}

function expectClose(actual: Mat, expected: Mat, tol: number): void {
  expect(actual.length).toBe(expected.length);
  actual.forEach((row, r) =>
    row.forEach((v, c) => {
      const e = expected[r][c];
      if (Math.abs(v - e) > tol * Math.max(1, Math.abs(e))) {
        throw new Error(`mismatch at [${r}, ${c}]: got ${v}, expected ${e} (tol ${tol})`);
      }
    }),
  );
}

function bits(t: tf.Tensor): number[] {
  const d = t.dataSync();
  return Array.from(new Uint32Array(d.buffer, d.byteOffset, d.length));
}

/**
 * Central finite differences (common practice) of L(x) = sum(R * f(x)), with
 * the projection done in float64 from the op's float32 outputs.
 */
function fdGradient(f: (x: tf.Tensor2D) => tf.Tensor, x: Mat, cols: number, R: number[], eps = 1e-2): Mat {
  const loss = (m: Mat) =>
    tf.tidy(() => {
      const y = f(t2(m, cols)).dataSync();
      let s = 0;
      for (let i = 0; i < y.length; i++) s += R[i] * y[i];
      return s;
    });
  return x.map((row, r) =>
    row.map((v, c) => {
      const plus = x.map((rr) => rr.slice());
      const minus = x.map((rr) => rr.slice());
      plus[r][c] = v + eps;
      minus[r][c] = v - eps;
      return (loss(plus) - loss(minus)) / (2 * eps);
    }),
  );
}

/** Analytic gradient of sum(R * f(x)) through the registered gradients. */
function tapeGradient(f: (x: tf.Tensor2D) => tf.Tensor, x: Mat, cols: number, R: number[]): Mat {
  return tf.tidy(() => {
    const xt = t2(x, cols);
    const g = tf.grad((z: tf.Tensor) => {
      const y = f(z as tf.Tensor2D);
      return tf.sum(tf.mul(y, tf.tensor(R, y.shape)));
    })(xt);
    return toMat(g);
  });
}

function projection(rng: Rng, n: number): number[] {
  return Array.from({ length: n }, () => rng.uniform(-1, 1));
}

function dataIds(): number {
  return tf.engine().backend.numDataIds();
}

// -------------------------------------------------------------- tests ----

describe('engine/backend', () => {
  it('initialises each backend idempotently and reports threads', async () => {
    const a = await initBackend('wasm');
    const b = await initBackend('wasm');
    expect(a).toEqual({ backend: 'wasm', threads: 1, simd: true }); // tfjs disables WASM threads in Node; Node 20 has WASM SIMD
    expect(b).toEqual(a);
    expect(threadsInUse()).toBe(1);
    expect(tf.getBackend()).toBe('wasm');
    expect(isWasmMatMulPatched()).toBe(true);
    const c = await initBackend('cpu');
    expect(c).toEqual({ backend: 'cpu', threads: 1, simd: false });
    expect(tf.getBackend()).toBe('cpu');
    // Standard gradients are registered (tfjs-core alone has none).
    expect(tf.getGradient('Sum')).toBeDefined();
    expect(tf.getGradient('BatchMatMul')).toBeDefined();
  });
});

for (const backend of BACKENDS) {
  describe(`model/ops on ${backend}`, () => {
    beforeAll(async () => {
      await initBackend(backend);
    });

    it('gatherRows matches a naive loop (repeated and unused rows, empty index list)', () => {
      const rng = new Rng(11);
      for (const [rows, E, C] of [[7, 20, 3], [1, 5, 1], [12, 0, 4], [30, 90, 8]]) {
        const x = randomMat(rng, rows, C);
        const idx = Array.from({ length: E }, () => rng.int(0, rows - 1));
        const out = tf.tidy(() => toMat(gatherRows(t2(x, C), ids1(idx))));
        if (E === 0) expect(out).toEqual([]);
        else expectClose(out, naiveGather(x, idx), 0); // a copy: exact
      }
    });

    it('segmentSum, segmentMean and segmentCounts match naive loops (empty segments = 0)', () => {
      const rng = new Rng(12);
      for (const [S, E, C] of [[6, 15, 3], [10, 40, 5], [3, 1, 2], [5, 0, 2], [40, 200, 16]]) {
        const g = randomGraph(rng, S, E);
        const x = randomMat(rng, E, C);
        const [sum, mean, cnt] = tf.tidy(() => {
          const xt = E === 0 ? tf.zeros([0, C]) as tf.Tensor2D : t2(x, C);
          const it = ids1(g.ids);
          return [toMat(segmentSum(xt, it, S)), toMat(segmentMean(xt, it, S)), toMat(segmentCounts(it, S))];
        });
        expectClose(sum, naiveSegmentSum(x, g, C), 1e-5);
        expectClose(mean, naiveSegmentMean(x, g, C), 1e-5);
        expect(cnt.map((r) => r[0])).toEqual(naiveCounts(g));
        const empty = naiveCounts(g).findIndex((k) => k === 0);
        if (empty >= 0) expect(sum[empty].every((v) => v === 0) && mean[empty].every((v) => v === 0)).toBe(true);
      }
    });

    it('segmentMax and segmentMin match naive loops, with exact ties and empty segments', () => {
      const rng = new Rng(13);
      for (const [S, E, C] of [[6, 25, 3], [12, 60, 4], [4, 1, 2], [30, 150, 8]]) {
        const g = randomGraph(rng, S, E);
        const x = tieMat(rng, E, C);
        for (const isMax of [true, false]) {
          const op = isMax ? segmentMax : segmentMin;
          const out = tf.tidy(() => toMat(op(t2(x, C), ids1(g.ids), S)));
          const ref = naiveSegmentExtreme(x, g, C, isMax);
          expectClose(out, ref.values, 0);
          // The gradient of sum(R * max) puts R[s, c] on the arg edge only
          // (ties: the lowest edge index) and 0 elsewhere.
          const R = projection(rng, S * C);
          const grad = tapeGradient((z) => op(z, ids1(g.ids), S), x, C, R);
          const expected = x.map((row) => row.map(() => 0));
          ref.arg.forEach((row, s) => row.forEach((e, c) => e >= 0 && (expected[e][c] += R[s * C + c])));
          expectClose(grad, expected, 1e-6);
        }
      }
    });

    it('max/min propagate NaN instead of hiding it', () => {
      const out = tf.tidy(() =>
        toMat(segmentMax(tf.tensor2d([1, NaN, 3, 2], [4, 1]), ids1([0, 0, 0, 1]), 2)),
      );
      expect(Number.isNaN(out[0][0])).toBe(true);
      expect(out[1][0]).toBe(2);
    });

    it('gradients of every op match central finite differences', () => {
      const rng = new Rng(14);
      const S = 7;
      const E = 18;
      const C = 3;
      const g = randomGraph(rng, S, E);
      const ops: [string, (z: tf.Tensor2D) => tf.Tensor, number][] = [
        ['gatherRows', (z) => gatherRows(z, ids1(g.ids)), E * C],
        ['segmentSum', (z) => segmentSum(z, ids1(g.ids), S), S * C],
        ['segmentMean', (z) => segmentMean(z, ids1(g.ids), S), S * C],
        ['segmentMax', (z) => segmentMax(z, ids1(g.ids), S), S * C],
        ['segmentMin', (z) => segmentMin(z, ids1(g.ids), S), S * C],
      ];
      for (const [name, f, outSize] of ops) {
        // gatherRows reads a [S, C] input (rows indexed by ids); the others [E, C].
        const rows = name === 'gatherRows' ? S : E;
        const x = distinctMat(rng, rows, C);
        const R = projection(rng, outSize);
        const analytic = tapeGradient(f, x, C, R);
        const numeric = fdGradient(f, x, C, R);
        try {
          expectClose(analytic, numeric, 2e-3);
        } catch (err) {
          throw new Error(`${name}: ${(err as Error).message}`);
        }
      }
    });

    it('composed gradients (gather -> message -> max/sum/mean -> tanh) match finite differences', () => {
      const rng = new Rng(15);
      const N = 9;
      const E = 30;
      const C = 2;
      const src = Array.from({ length: E }, () => rng.int(0, N - 1));
      const dst = Array.from({ length: E }, () => rng.int(0, N - 2)); // node N-1 receives nothing
      const W = tf.tensor2d(randomMat(rng, C, C), [C, C]);
      const f = (h: tf.Tensor2D) => {
        const s = ids1(src);
        const d = ids1(dst);
        const m = tf.add(gatherRows(h, s), tf.mul(gatherRows(h, d), 0.5)) as tf.Tensor2D;
        const agg = tf.addN([segmentMax(m, d, N), segmentMin(m, d, N), segmentSum(m, d, N), segmentMean(m, d, N)]);
        return tf.tanh(tf.matMul(tf.mul(agg, 0.3), W));
      };
      // Distinct h values 0.1 apart: max/min over different sources never near-tie.
      const h = distinctMat(rng, N, C);
      const R = projection(rng, N * C);
      expectClose(tapeGradient(f, h, C, R), fdGradient(f, h, C, R), 2e-3);
      W.dispose();
    });

    it('second-order gradients (gradient of a gradient) match finite differences', () => {
      const rng = new Rng(16);
      const S = 5;
      const E = 12;
      const C = 2;
      const g = randomGraph(rng, S, E);
      const R1 = projection(rng, S * C);
      // f(x) = sum over ops of sum(R1 * op(x)^2); h(x) = <R2, grad f(x)>.
      const inner = (z: tf.Tensor2D) => {
        const ids = ids1(g.ids);
        const y = tf.addN([segmentSum(z, ids, S), segmentMean(z, ids, S), segmentMax(z, ids, S)]);
        return tf.sum(tf.mul(tf.square(y), tf.tensor(R1, y.shape)));
      };
      const gradF = (z: tf.Tensor2D) => tf.grad((w: tf.Tensor) => inner(w as tf.Tensor2D))(z);
      const x = distinctMat(rng, E, C);
      const R2 = projection(rng, E * C);
      expectClose(tapeGradient(gradF, x, C, R2), fdGradient(gradF, x, C, R2), 2e-3);
    });

    it('leaks no tensors or backend memory in forward+backward (tidy and variableGrads)', () => {
      const rng = new Rng(17);
      const g = randomGraph(rng, 20, 70);
      const C = 4;
      const init = t2(tieMat(rng, 20, C), C);
      const x = tf.variable(init) as tf.Variable<tf.Rank.R2>;
      init.dispose();
      const src = ids1(Array.from({ length: 70 }, () => rng.int(0, 19)));
      const dst = ids1(g.ids);
      const loss = () => {
        const m = gatherRows(x, src);
        const y = tf.addN([segmentSum(m, dst, 20), segmentMax(m, dst, 20), segmentMin(m, dst, 20), segmentMean(m, dst, 20)]);
        return tf.add(tf.sum(tf.square(y)), tf.sum(segmentCounts(dst, 20))) as tf.Scalar;
      };
      loss().dispose(); // warm-up
      const tensors = tf.memory().numTensors;
      const ids = dataIds();
      tf.tidy(() => {
        tf.grad((z: tf.Tensor) => tf.sum(segmentMax(gatherRows(z as tf.Tensor2D, src), dst, 20)))(x);
      });
      expect(tf.memory().numTensors).toBe(tensors);
      const { value, grads } = tf.variableGrads(loss, [x]);
      value.dispose();
      tf.dispose(grads);
      expect(tf.memory().numTensors).toBe(tensors);
      expect(dataIds()).toBe(ids);
      // A failing op (out-of-range id) must not leak either.
      const m = tf.zeros([70, C]) as tf.Tensor2D;
      const before = [tf.memory().numTensors, dataIds()];
      expect(() => tf.tidy(() => segmentSum(m, ids1([...g.ids.slice(0, 69), 99]), 20))).toThrow(/out of range/);
      expect(() => tf.tidy(() => segmentMean(m, ids1([...g.ids.slice(0, 69), 20]), 20))).toThrow(/out of range/);
      expect(() => tf.tidy(() => segmentMax(m, ids1([...g.ids.slice(0, 69), -1]), 20))).toThrow(/out of range/);
      expect(() => tf.tidy(() => gatherRows(x, ids1([0, 20])))).toThrow(/out of range/);
      expect([tf.memory().numTensors, dataIds()]).toEqual(before);
      m.dispose();
      expect(tf.memory().numTensors).toBe(tensors);
      expect(dataIds()).toBe(ids);
      tf.dispose([x, src, dst]);
    });

    it('rejects bad arguments with a message saying where', () => {
      tf.tidy(() => {
        const x = tf.zeros([3, 2]) as tf.Tensor2D;
        expect(() => segmentSum(x, tf.tensor1d([0, 1, 2]) as tf.Tensor1D, 3)).toThrow(/model\/ops segmentSum: segmentIds must be a 1-D int32/);
        expect(() => segmentSum(x, ids1([0, 1]), 3)).toThrow(/2 segment ids for 3 rows/);
        expect(() => segmentMean(x, ids1([0, 1, 2]), 2.5)).toThrow(/non-negative integer/);
        expect(() => gatherRows(tf.zeros([3]) as unknown as tf.Tensor2D, ids1([0]))).toThrow(/must be 2-D/);
        expect(() => segmentMax(tf.zeros([3, 2], 'int32') as tf.Tensor2D, ids1([0, 1, 2]), 3)).toThrow(/x must be float32/);
        // gatherRows also copies int32 rows.
        expect(gatherRows(tf.tensor2d([[1, 2], [3, 4]], [2, 2], 'int32'), ids1([1, 1, 0])).arraySync()).toEqual([[3, 4], [3, 4], [1, 2]]);
      });
    });

    it('gives bit-identical outputs and gradients on reruns', () => {
      const rng = new Rng(18);
      const g = randomGraph(rng, 30, 120);
      const C = 8;
      const x = randomMat(rng, 30, C);
      const src = Array.from({ length: 120 }, () => rng.int(0, 29));
      const run = () =>
        tf.tidy(() => {
          const xt = t2(x, C);
          const f = (z: tf.Tensor) => {
            const m = tf.relu(gatherRows(z as tf.Tensor2D, ids1(src))) as tf.Tensor2D;
            const d = ids1(g.ids);
            return tf.sum(tf.square(tf.addN([segmentSum(m, d, 30), segmentMax(m, d, 30), segmentMean(m, d, 30)])));
          };
          const { value, grad } = tf.valueAndGrad(f)(xt);
          return [...bits(value), ...bits(grad)];
        });
      expect(run()).toEqual(run());
    });
  });
}

describe('model/ops: WASM and CPU agree', () => {
  it('forward and gradient agree to ~1e-5', async () => {
    const rng = new Rng(19);
    const g = randomGraph(rng, 40, 160);
    const C = 6;
    const x = randomMat(rng, 40, C);
    const src = Array.from({ length: 160 }, () => rng.int(0, 39));
    const compute = () =>
      tf.tidy(() => {
        const f = (z: tf.Tensor) => {
          const m = tf.tanh(gatherRows(z as tf.Tensor2D, ids1(src))) as tf.Tensor2D;
          const d = ids1(g.ids);
          return tf.addN([segmentSum(m, d, 40), segmentMax(m, d, 40), segmentMin(m, d, 40), segmentMean(m, d, 40)]);
        };
        const xt = t2(x, C);
        const y = toMat(f(xt));
        const grad = toMat(tf.grad((z: tf.Tensor) => tf.sum(tf.square(f(z))))(xt));
        return { y, grad };
      });
    await initBackend('wasm');
    const w = compute();
    await initBackend('cpu');
    const c = compute();
    expectClose(w.y, c.y, 1e-5);
    expectClose(w.grad, c.grad, 1e-5);
  });
});

describe('engine/kernels-identity: zero-copy WASM Identity', () => {
  it('shares the buffer safely: a clone outlives its source, nothing leaks', async () => {
    await initBackend('wasm');
    const ids = dataIds();
    const x = tf.tensor2d([[1, 2], [3, 4]]);
    const y = tf.clone(x);
    expect(dataIds()).toBe(ids + 1); // one shared buffer
    x.dispose();
    expect(y.arraySync()).toEqual([[1, 2], [3, 4]]);
    y.dispose();
    expect(dataIds()).toBe(ids);
  });
});

describe('engine/kernels-matmul: WASM transpose-first BatchMatMul', () => {
  beforeAll(async () => {
    await initBackend('wasm');
  });

  const cases: [number[], number[], boolean, boolean][] = [
    [[37, 19], [19, 23], false, false],
    [[19, 37], [19, 23], true, false],
    [[37, 19], [23, 19], false, true],
    [[19, 37], [23, 19], true, true],
    [[3, 19, 37], [3, 23, 19], true, true],
    [[2, 5, 7], [1, 5, 4], true, false], // broadcast batch: stock path
    [[64, 1], [64, 32], true, false], // one output row: stock path is cheaper
    [[512, 32], [512, 32], true, false], // a dense layer's weight gradient
  ];

  it('equals the stock kernel on explicitly transposed inputs bit for bit (or is the stock path), within 1e-5 of the stock transposed path', () => {
    const rng = new Rng(20);
    for (const [sa, sb, ta, tb] of cases) {
      tf.tidy(() => {
        const a = tf.tensor(randomMat(rng, 1, sa.reduce((p, q) => p * q, 1))[0], sa);
        const b = tf.tensor(randomMat(rng, 1, sb.reduce((p, q) => p * q, 1))[0], sb);
        const swap = (t: tf.Tensor) => {
          const perm = t.shape.map((_, i) => i);
          [perm[perm.length - 2], perm[perm.length - 1]] = [perm[perm.length - 1], perm[perm.length - 2]];
          return tf.transpose(t, perm);
        };
        patchWasmMatMul();
        const ids = dataIds();
        const patched = tf.matMul(a, b, ta, tb);
        expect(dataIds()).toBe(ids + 1); // temporaries freed
        unpatchWasmMatMul();
        const stockT = tf.matMul(a, b, ta, tb);
        const stockExplicit = tf.matMul(ta ? swap(a) : a, tb ? swap(b) : b);
        patchWasmMatMul();
        const transposes = worthTransposing(sa, sb, ta, tb);
        expect(bits(patched)).toEqual(bits(transposes ? stockExplicit : stockT));
        const p = patched.dataSync();
        const s = stockT.dataSync();
        // float32 sums of K products in a different order: allow ~K ulps.
        const K = ta ? sa[sa.length - 2] : sa[sa.length - 1];
        for (let i = 0; i < p.length; i++) expect(Math.abs(p[i] - s[i])).toBeLessThan(2e-6 * K * Math.max(1, Math.abs(s[i])));
      });
    }
    expect(isWasmMatMulPatched()).toBe(true);
    expect(cases.map(([sa, sb, ta, tb]) => worthTransposing(sa, sb, ta, tb))).toEqual([true, true, true, true, false, false, false, true]);
  });

  it('also patches fused matmul (bias + relu) and dense-layer gradients stay correct', () => {
    const rng = new Rng(21);
    tf.tidy(() => {
      const a = t2(randomMat(rng, 64, 8), 8);
      const w = t2(randomMat(rng, 8, 32), 32);
      const bias = tf.tensor1d(randomMat(rng, 1, 32)[0]);
      expect(worthTransposing([8, 64], [32, 8], true, true)).toBe(true);
      const fused = tf.fused.matMul({ a, b: w, transposeA: false, transposeB: false, bias, activation: 'relu' });
      const fusedT = tf.fused.matMul({ a: tf.transpose(a), b: tf.transpose(w), transposeA: true, transposeB: true, bias, activation: 'relu' });
      expect(bits(fusedT)).toEqual(bits(fused));
      const R = projection(rng, 64 * 32);
      const x = toMat(a);
      const f = (z: tf.Tensor2D) => tf.tanh(tf.add(tf.matMul(z, w), bias)); // smooth, for finite differences
      expectClose(tapeGradient(f, x, 8, R), fdGradient(f, x, 8, R), 2e-3);
    });
  });
});
