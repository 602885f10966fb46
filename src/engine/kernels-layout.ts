/**
 * Concat, SplitV and column sums for the WASM backend on Farfield's SIMD
 * module (src/engine/simd/). The stock kernels copy row by row from
 * JavaScript (Concat), slice once per output (SplitV), or transpose the whole
 * input before reducing (Sum over leading axes, every bias gradient); in a
 * training step they cost more than the products they feed.
 *
 * Same bits by construction: concat and split are copies, and the column sum
 * adds rows in order from 0 exactly as the stock Sum does after its transpose
 * (checked in test/engine/simd-kernels.test.ts). Anything else (other dtypes,
 * reductions that keep a leading axis, no SIMD module) takes the stock kernel.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { BackendWasm } from '@tensorflow/tfjs-backend-wasm';
import { simdKernels } from './simd/simd-kernels.ts';

import { kernelPatch } from './kernel-patch.ts';

const size = tf.util.sizeFromShape;
const fourByte = (dtype: string) => dtype === 'float32' || dtype === 'int32';

function normaliseAxis(axis: number, rank: number): number {
  return axis < 0 ? axis + rank : axis;
}

/** `shape` with its `axis` dimension set to `length`. */
function withAxis(shape: number[], axis: number, length: number): number[] {
  const out = [...shape];
  out[axis] = length;
  return out;
}

/**
 * Start column of each block when blocks of these widths sit side by side in
 * a row (viewed as [outer, Σ widths]): the layout concat writes and split reads.
 */
function blockStarts(widths: readonly number[]): number[] {
  let column = 0;
  return widths.map((w) => {
    const start = column;
    column += w;
    return start;
  });
}

function concat(original: tf.KernelConfig): tf.KernelFunc {
  return (args) => {
    const backend = args.backend as BackendWasm;
    const simd = simdKernels(backend);
    const all = Object.values(args.inputs) as tf.TensorInfo[];
    const inputs = all.filter((t) => size(t.shape) > 0);
    if (simd == null || inputs.length < 2 || !inputs.every((t) => fourByte(t.dtype) && t.dtype === inputs[0]!.dtype)) {
      return original.kernelFunc(args);
    }
    const rank = inputs[0]!.shape.length;
    const axis = normaliseAxis(args.attrs!['axis'] as number, rank);
    const outer = size(inputs[0]!.shape.slice(0, axis));
    const widths = inputs.map((t) => size(t.shape.slice(axis)));
    const total = widths.reduce((a, b) => a + b, 0);
    const out = backend.makeOutput(withAxis(inputs[0]!.shape, axis, inputs.reduce((s, t) => s + t.shape[axis]!, 0)), inputs[0]!.dtype);
    blockStarts(widths).forEach((start, i) => simd.copyBlock(inputs[i]!, 0, out, start, outer, widths[i]!, widths[i]!, total));
    return out;
  };
}

function splitV(original: tf.KernelConfig): tf.KernelFunc {
  return (args) => {
    const backend = args.backend as BackendWasm;
    const simd = simdKernels(backend);
    const x = (args.inputs as { x: tf.TensorInfo }).x;
    if (simd == null || !fourByte(x.dtype) || size(x.shape) === 0) return original.kernelFunc(args);
    const attrs = args.attrs as unknown as { numOrSizeSplits: number | number[]; axis: number };
    const axis = normaliseAxis(attrs.axis, x.shape.length);
    const sizes = tf.backend_util.prepareSplitSize(x as unknown as tf.Tensor, attrs.numOrSizeSplits, axis);
    const outer = size(x.shape.slice(0, axis));
    const inner = size(x.shape.slice(axis + 1));
    const total = x.shape[axis]! * inner;
    const outs = sizes.map((s) => backend.makeOutput(withAxis(x.shape, axis, s), x.dtype));
    const widths = sizes.map((s) => s * inner);
    blockStarts(widths).forEach((start, i) => {
      if (widths[i]! > 0) simd.copyBlock(x, start, outs[i]!, 0, outer, widths[i]!, total, widths[i]!);
    });
    return outs;
  };
}

function sum(original: tf.KernelConfig): tf.KernelFunc {
  return (args) => {
    const backend = args.backend as BackendWasm;
    const simd = simdKernels(backend);
    const x = (args.inputs as { x: tf.TensorInfo }).x;
    const rank = x.shape.length;
    if (simd == null || x.dtype !== 'float32' || rank < 2 || size(x.shape) === 0) return original.kernelFunc(args);
    const attrs = args.attrs as unknown as { axis: number | number[]; keepDims: boolean };
    const axes = [...new Set((Array.isArray(attrs.axis) ? attrs.axis : [attrs.axis]).map((a) => normaliseAxis(a, rank)))].sort((a, b) => a - b);
    // Only "every axis but the last" (a bias gradient): one sum per column.
    if (axes.length !== rank - 1 || axes.some((a, i) => a !== i)) return original.kernelFunc(args);
    const cols = x.shape[rank - 1]!;
    const outShape = attrs.keepDims ? [...x.shape.slice(0, -1).map(() => 1), cols] : [cols];
    const out = backend.makeOutput(outShape, 'float32');
    simd.colSum(x, out, size(x.shape) / cols, cols);
    return out;
  };
}

const PATCHES: Record<string, (original: tf.KernelConfig) => tf.KernelFunc> = { Concat: concat, SplitV: splitV, Sum: sum };
const layout = kernelPatch('layout', Object.keys(PATCHES), (stock, name) => PATCHES[name]!(stock));

/** Re-register the WASM Concat, SplitV and Sum kernels with the SIMD paths. Idempotent. */
export const patchWasmLayout = (): void => layout.patch();
