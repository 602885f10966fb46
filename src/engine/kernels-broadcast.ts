/**
 * Broadcasting Equal on the WASM backend. The stock WASM Equal takes a
 * generic path when one input broadcasts that costs ~0.2 µs per element
 * (43 ms for [384, 24, 24] against [384, 1, 24], 250x a same-shape op; the
 * stock +, −, ×, ÷ broadcast fine). Every gradient of a max or min over an
 * axis (tfjs's gradient compares x with the broadcast result) hits it, which
 * made the semiring message layers the slowest thing in the engine.
 *
 * Here: collapse axes that both inputs walk alike, then Farfield's SIMD
 * module's 3-axis loop, or a plain loop for more axes or without the module.
 * A float comparison is exact, so the bits cannot change. Same-shape or
 * non-float32 inputs keep the stock kernel.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { BackendWasm } from '@tensorflow/tfjs-backend-wasm';
import { simdKernels } from './simd/simd-kernels.ts';

import { kernelPatch } from './kernel-patch.ts';

/** Output shape and each input's element strides in it (0 along broadcast axes), or null if the shapes do not broadcast. */
export function broadcastPlan(aShape: number[], bShape: number[]): { shape: number[]; aStrides: number[]; bStrides: number[] } | null {
  const rank = Math.max(aShape.length, bShape.length);
  const pad = (s: number[]) => [...Array<number>(rank - s.length).fill(1), ...s];
  const a = pad(aShape);
  const b = pad(bShape);
  const shape: number[] = [];
  for (let d = 0; d < rank; d++) {
    if (a[d] !== b[d] && a[d] !== 1 && b[d] !== 1) return null;
    shape.push(a[d] === 1 ? b[d]! : a[d]!);
  }
  const strides = (s: number[]) => {
    const out = new Array<number>(rank).fill(0);
    let step = 1;
    for (let d = rank - 1; d >= 0; d--) {
      out[d] = s[d] === 1 ? 0 : step;
      step *= s[d]!;
    }
    return out;
  };
  return { shape, aStrides: strides(a), bStrides: strides(b) };
}

type Plan = NonNullable<ReturnType<typeof broadcastPlan>>;

/**
 * Merge neighbouring axes that both inputs walk the same way (contiguously,
 * or not at all), so e.g. [384, 24, 24] ÷ scalar becomes one flat loop.
 */
export function collapsePlan(plan: Plan): Plan {
  const shape = [...plan.shape];
  const aStrides = [...plan.aStrides];
  const bStrides = [...plan.bStrides];
  for (let d = shape.length - 2; d >= 0; d--) {
    const fits = (st: number[]) => (st[d] === 0 && st[d + 1] === 0) || st[d] === st[d + 1]! * shape[d + 1]!;
    if (fits(aStrides) && fits(bStrides)) {
      shape.splice(d, 2, shape[d]! * shape[d + 1]!);
      aStrides.splice(d, 2, aStrides[d + 1]!);
      bStrides.splice(d, 2, bStrides[d + 1]!);
    }
  }
  return { shape, aStrides, bStrides };
}

/**
 * Walk the outer axes (all but the last) like an odometer, calling `inner`
 * with the output offset and both inputs' offsets for each innermost row.
 */
function forEachRow(plan: Plan, inner: (o: number, pa: number, pb: number, n: number, sa: number, sb: number) => void): void {
  const { shape, aStrides, bStrides } = plan;
  const rank = shape.length;
  const n = rank === 0 ? 1 : shape[rank - 1]!;
  const sa = rank === 0 ? 0 : aStrides[rank - 1]!;
  const sb = rank === 0 ? 0 : bStrides[rank - 1]!;
  const total = tf.util.sizeFromShape(shape);
  const index = new Array<number>(Math.max(0, rank - 1)).fill(0);
  let ia = 0;
  let ib = 0;
  for (let o = 0; o < total; o += n) {
    inner(o, ia, ib, n, sa, sb);
    for (let d = rank - 2; d >= 0; d--) {
      index[d]!++;
      ia += aStrides[d]!;
      ib += bStrides[d]!;
      if (index[d]! < shape[d]!) break;
      ia -= aStrides[d]! * shape[d]!;
      ib -= bStrides[d]! * shape[d]!;
      index[d] = 0;
    }
  }
}

/** out[i] = (a[ia] == b[ib]) over the broadcast shape. */
export function equalLoop(out: Uint8Array, a: Float32Array, b: Float32Array, plan: Plan): void {
  forEachRow(plan, (o, pa, pb, n, sa, sb) => {
    for (let k = 0; k < n; k++, pa += sa, pb += sb) out[o + k] = a[pa] === b[pb] ? 1 : 0;
  });
}

function wrap(original: tf.KernelConfig): tf.KernelFunc {
  return (args) => {
    const { a, b } = args.inputs as { a: tf.TensorInfo; b: tf.TensorInfo };
    if (a.dtype !== 'float32' || b.dtype !== 'float32' || tf.util.arraysEqual(a.shape, b.shape)) return original.kernelFunc(args);
    const full = broadcastPlan(a.shape, b.shape);
    if (full == null) return original.kernelFunc(args); // let the stock kernel raise its own error
    const plan = collapsePlan(full);
    const backend = args.backend as BackendWasm;
    const out = backend.makeOutput(full.shape, 'bool');
    const simd = simdKernels(backend);
    if (simd != null && plan.shape.length <= 3) {
      const pad = (xs: number[], fill: number) => [...Array<number>(3 - xs.length).fill(fill), ...xs] as [number, number, number];
      simd.equal3(a, b, out, pad(plan.shape, 1), pad(plan.aStrides, 0), pad(plan.bStrides, 0));
    } else {
      // Views only after the allocation (it can grow the heap).
      equalLoop(backend.typedArrayFromHeap(out) as Uint8Array, backend.typedArrayFromHeap(a) as Float32Array, backend.typedArrayFromHeap(b) as Float32Array, plan);
    }
    return out;
  };
}

const equal = kernelPatch('broadcast', ['Equal'], wrap);

/** Re-register the WASM Equal kernel with the broadcast path. Idempotent. */
export const patchWasmBroadcast = (): void => equal.patch();

/** Restore the stock kernel (tests compare both). */
export const unpatchWasmBroadcast = (): void => equal.unpatch();
