/**
 * Small measuring tools shared by the benchmarks (bench/ops-bench.ts and
 * `farfield bench`): a timing loop, the WASM matmul ceiling, load average,
 * a forced garbage collection for honest heap numbers, and a geometric mean.
 */
import os from 'node:os';
import v8 from 'node:v8';
import vm from 'node:vm';
import * as tf from '@tensorflow/tfjs-core';

/**
 * Mean milliseconds per call of `f` over at least `minMs` (after one warm-up
 * call). Callers never return a TypedArray from tf.tidy (tidy walks it element
 * by element, ~10 ms).
 */
export function timeIt(f: () => void, minMs: number): number {
  f();
  let n = 0;
  const t0 = performance.now();
  while (performance.now() - t0 < minMs || n === 0) {
    f();
    n++;
  }
  return (performance.now() - t0) / n;
}

/** One measured stretch of an `n x n x n` float32 matmul on the active backend. */
export interface MatmulSample {
  flops: number;
  seconds: number;
}

/**
 * Time `a·b` for random n x n operands (untransposed, batch 1: the WASM fast
 * path) for about `ms` milliseconds on the active backend. FLOPs = 2·n³ per
 * product (one multiply and one add per term).
 */
export function matmulSample(n: number, ms: number): MatmulSample {
  const a = tf.randomNormal([n, n], 0, 1, 'float32', 1) as tf.Tensor2D;
  const b = tf.randomNormal([n, n], 0, 1, 'float32', 2) as tf.Tensor2D;
  try {
    const msPerProduct = timeIt(() => tf.tidy(() => void tf.matMul(a, b).dataSync()), ms);
    return { flops: 2 * n ** 3, seconds: msPerProduct / 1000 };
  } finally {
    tf.dispose([a, b]);
  }
}

/** GFLOP/s over several samples: total FLOPs over total time. */
export function gflops(samples: readonly MatmulSample[]): number {
  let flops = 0;
  let seconds = 0;
  for (const s of samples) {
    flops += s.flops;
    seconds += s.seconds;
  }
  return seconds > 0 ? flops / seconds / 1e9 : NaN;
}

/** 1, 5 and 15 minute load averages, rounded to 0.01. */
export function loadAverage(): [number, number, number] {
  const [a, b, c] = os.loadavg();
  const r = (x: number | undefined) => Math.round((x ?? 0) * 100) / 100;
  return [r(a), r(b), r(c)];
}

export function geometricMean(values: readonly number[]): number {
  if (values.length === 0) return NaN;
  return Math.exp(values.reduce((s, v) => s + Math.log(v), 0) / values.length);
}

let gcFunction: (() => void) | null | undefined;

/**
 * Run a full garbage collection if possible (enables --expose-gc at run time
 * and fetches `gc` from a fresh context). Returns false when unavailable.
 */
export function collectGarbage(): boolean {
  if (gcFunction === undefined) {
    try {
      v8.setFlagsFromString('--expose-gc');
      gcFunction = vm.runInNewContext('gc') as () => void;
    } catch {
      gcFunction = null;
    }
  }
  if (gcFunction == null) return false;
  gcFunction();
  return true;
}

export const MB = 1024 * 1024;

export function round(x: number, digits = 2): number {
  if (!Number.isFinite(x)) return x;
  const f = 10 ** digits;
  return Math.round(x * f) / f;
}
