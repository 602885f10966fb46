/**
 * Faster WASM matmul for training.
 *
 * The stock WASM 'BatchMatMul' kernel (tfjs 4.22) hands untransposed inputs to
 * XNNPACK but runs a scalar triple loop whenever transposeA or transposeB is
 * set, and every matmul gradient sets one of them (dA = dy·Bᵀ, dB = Aᵀ·dy).
 * We re-register the kernel so a transposed input is first transposed
 * explicitly (the WASM 'Transpose' kernel, a cheap copy) and the original
 * kernel then runs untransposed. '_FusedMatMul' gets the same treatment.
 *
 * When it pays: XNNPACK packs the right-hand operand (K x N) afresh for every
 * new tensor (a fixed ~30 us plus ~10 ns per element here), while the scalar
 * loop costs ~2.4 ns per multiply-add. Measured on 2 loaded cores with fresh
 * operands (M = output rows, N = 32): M = 1 or 4 -> the stock loop is faster
 * (0.2-0.9x); M >= 16 -> transpose-first is 2-14x faster (bench/ops-bench.ts
 * prints the dense-layer case). So we transpose only when
 * M * K * N * 2.4 > 30000 + 10 * K * N, and only for batch 1 (batched matmuls
 * never take the fast path, transposed or not).
 *
 * Results: the patched kernel is bit-identical to the stock kernel applied to
 * explicitly transposed inputs; against the stock *transposed* path it differs
 * only in float32 summation order (see test/model/ops.test.ts).
 *
 * Wherever that leaves a product on XNNPACK (untransposed, or transposed and
 * worth transposing), Farfield's SIMD kernel (src/engine/simd/) computes it
 * instead, bit-identically and without XNNPACK's per-tensor packing of B: a
 * plain or fused (bias, linear or relu) A·B, Aᵀ·B directly, and A·Bᵀ after an
 * explicit transpose of the (small, weight-shaped) B.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { BackendWasm } from '@tensorflow/tfjs-backend-wasm';
import { simdKernels, type SimdKernels } from './simd/simd-kernels.ts';

import { kernelPatch } from './kernel-patch.ts';

/** Swap the last two axes of `x` with the backend's own Transpose kernel. */
function transposeLast2(x: tf.TensorInfo, backend: BackendWasm): tf.TensorInfo {
  const transpose = tf.getKernel('Transpose', 'wasm');
  const r = x.shape.length;
  const perm = x.shape.map((_, i) => i);
  perm[r - 2] = r - 1;
  perm[r - 1] = r - 2;
  return transpose.kernelFunc({ inputs: { x }, backend, attrs: { perm } }) as tf.TensorInfo;
}

function batchOf(shape: number[]): number {
  let n = 1;
  for (let i = 0; i < shape.length - 2; i++) n *= shape[i];
  return n;
}

/** Cost model from the measurements in the header (times in ns). */
export function worthTransposing(aShape: number[], bShape: number[], transposeA: boolean, transposeB: boolean): boolean {
  if (batchOf(aShape) !== 1 || batchOf(bShape) !== 1) return false;
  const ra = aShape.length;
  const rb = bShape.length;
  const M = transposeA ? aShape[ra - 1] : aShape[ra - 2];
  const K = transposeA ? aShape[ra - 2] : aShape[ra - 1];
  const N = transposeB ? bShape[rb - 2] : bShape[rb - 1];
  return M * K * N * 2.4 > 30000 + 10 * K * N;
}

/**
 * The product on the SIMD kernels, or null where they do not apply (the
 * caller then takes the XNNPACK or stock path, which gives the same bits).
 */
function simdProduct(
  simd: SimdKernels,
  args: Parameters<tf.KernelFunc>[0],
  transposeA: boolean,
  transposeB: boolean,
): tf.TensorInfo | null {
  const { a, b, bias, preluActivationWeights } = args.inputs as Record<string, tf.TensorInfo | undefined>;
  if (a == null || b == null || a.dtype !== 'float32' || b.dtype !== 'float32') return null;
  if (batchOf(a.shape) !== 1 || batchOf(b.shape) !== 1 || a.shape.length < 2 || b.shape.length < 2) return null;
  const activation = (args.attrs?.['activation'] as string | undefined) ?? 'linear';
  if (preluActivationWeights != null || (activation !== 'linear' && activation !== 'relu')) return null;
  const ra = a.shape.length;
  const rb = b.shape.length;
  const M = transposeA ? a.shape[ra - 1] : a.shape[ra - 2];
  const K = transposeA ? a.shape[ra - 2] : a.shape[ra - 1];
  const N = transposeB ? b.shape[rb - 2] : b.shape[rb - 1];
  if (bias != null && (bias.dtype !== 'float32' || bias.shape.length !== 1 || bias.shape[0] !== N)) return null;
  const fused = bias != null || activation === 'relu';
  if (transposeA && (transposeB || fused)) return null;
  if ((transposeA || transposeB) && !worthTransposing(a.shape, b.shape, transposeA, transposeB)) return null;
  const backend = args.backend as BackendWasm;
  const outShape = [...(ra >= rb ? a.shape : b.shape).slice(0, -2), M, N];
  if (transposeA) {
    const out = backend.makeOutput(outShape, 'float32');
    simd.matMulTN(a, b, out, K, M, N);
    return out;
  }
  const b2 = transposeB ? transposeLast2(b, backend) : b;
  try {
    const out = backend.makeOutput(outShape, 'float32');
    simd.matMulNN(a, b2, out, K, M, N, bias ?? null, activation === 'relu');
    return out;
  } finally {
    if (transposeB) backend.disposeData(b2.dataId);
  }
}

function wrap(original: tf.KernelConfig): tf.KernelFunc {
  return (args) => {
    const attrs = args.attrs ?? {};
    const transposeA = attrs['transposeA'] === true;
    const transposeB = attrs['transposeB'] === true;
    // Registered only for 'wasm'.
    const backend = args.backend as BackendWasm;
    const simd = simdKernels(backend);
    if (simd != null) {
      const out = simdProduct(simd, args, transposeA, transposeB);
      if (out != null) return out;
    }
    if (!transposeA && !transposeB) return original.kernelFunc(args);
    const { a, b } = args.inputs as { a: tf.TensorInfo; b: tf.TensorInfo }; // BatchMatMul's declared inputs
    if (!worthTransposing(a.shape, b.shape, transposeA, transposeB)) return original.kernelFunc(args);
    const temps: tf.TensorInfo[] = [];
    const a2 = transposeA ? transposeLast2(a, backend) : a;
    if (transposeA) temps.push(a2);
    const b2 = transposeB ? transposeLast2(b, backend) : b;
    if (transposeB) temps.push(b2);
    try {
      return original.kernelFunc({
        inputs: { ...args.inputs, a: a2, b: b2 },
        backend,
        attrs: { ...attrs, transposeA: false, transposeB: false },
      });
    } finally {
      for (const t of temps) backend.disposeData(t.dataId);
    }
  };
}

const matmul = kernelPatch('matmul', ['BatchMatMul', '_FusedMatMul'], wrap);

/** Re-register the WASM matmul kernels with the SIMD / transpose-first paths. Idempotent. */
export const patchWasmMatMul = (): void => matmul.patch();

/** Restore the stock WASM matmul kernels (benchmarks and tests compare both). */
export const unpatchWasmMatMul = (): void => matmul.unpatch();

/** True if the WASM matmul kernels are the patched ones. */
export const isWasmMatMulPatched = (): boolean => matmul.isPatched();
