/**
 * The first layer of the MLP message function in one kernel each way, because
 * tiny models are dominated by per-op overhead:
 *
 *   FarfieldGatherPairAdd  out[e, c] = P[src[e], c] + P[dst[e], H + c] + B[e, c]
 *                          (P = h·[W_s | W_d] is [nodes, 2H]; B is the constant edge term)
 *   FarfieldScatterPair    out[src[e], c] += dy[e, c];  out[dst[e], H + c] += dy[e, c]
 *
 * Each is the other's adjoint, so gradients of gradients work. Without these
 * the same value took a split, two gathers and two adds forward and as many
 * launches backward. Loops run in edge order, so results are deterministic.
 */
import * as tf from '@tensorflow/tfjs-core';
import { execute, type Flavour, type TypedArray } from './kernels-graph.ts';

export const PAIR_KERNELS = {
  gatherPairAdd: 'FarfieldGatherPairAdd',
  scatterPair: 'FarfieldScatterPair',
} as const;

function inRange(where: string, ids: TypedArray, limit: number): void {
  for (let i = 0; i < ids.length; i++) {
    const v = ids[i]!;
    if (!(v >= 0 && v < limit)) throw new Error(`model/ops ${where}: index ${v} at position ${i} is out of range 0..${limit - 1}`);
  }
}

function funcs(flavour: Flavour): Record<string, tf.KernelFunc> {
  return {
    [PAIR_KERNELS.gatherPairAdd]: ({ inputs, backend }) => {
      const { p, src, dst, b } = inputs as { p: tf.TensorInfo; src: tf.TensorInfo; dst: tf.TensorInfo; b: tf.TensorInfo };
      const N = p.shape[0]!;
      const H = p.shape[1]! / 2;
      const E = src.shape[0]!;
      return execute(flavour, backend, [p, src, dst, b], [{ shape: [E, H], dtype: 'float32' }], ([out], [pv, sv, dv, bv]) => {
        inRange('gatherPairAdd', sv!, N);
        inRange('gatherPairAdd', dv!, N);
        const o = out!;
        const P = pv!;
        const B = bv!;
        const twoH = 2 * H;
        for (let e = 0, k = 0; e < E; e++) {
          const s = sv![e]! * twoH;
          const d = dv![e]! * twoH + H;
          for (let c = 0; c < H; c++, k++) o[k] = P[s + c]! + P[d + c]! + B[k]!;
        }
      }, (simd, [out], [pi, si, di, bi], [, sv, dv]) => {
        inRange('gatherPairAdd', sv!, N);
        inRange('gatherPairAdd', dv!, N);
        simd.gatherPairAdd(pi!, si!, di!, bi!, out!, E, H);
      })[0]!;
    },
    [PAIR_KERNELS.scatterPair]: ({ inputs, backend, attrs }) => {
      const { dy, src, dst } = inputs as { dy: tf.TensorInfo; src: tf.TensorInfo; dst: tf.TensorInfo };
      const N = attrs!['numNodes'] as number;
      const H = dy.shape[1]!;
      const E = src.shape[0]!;
      return execute(flavour, backend, [dy, src, dst], [{ shape: [N, 2 * H], dtype: 'float32' }], ([out], [gv, sv, dv]) => {
        inRange('scatterPair', sv!, N);
        inRange('scatterPair', dv!, N);
        const o = out!;
        const G = gv!;
        o.fill(0);
        const twoH = 2 * H;
        for (let e = 0, k = 0; e < E; e++) {
          const s = sv![e]! * twoH;
          const d = dv![e]! * twoH + H;
          for (let c = 0; c < H; c++, k++) {
            const g = G[k]!;
            o[s + c] += g;
            o[d + c] += g;
          }
        }
      }, (simd, [out], [gi, si, di], [, sv, dv]) => {
        inRange('scatterPair', sv!, N);
        inRange('scatterPair', dv!, N);
        simd.scatterPair(gi!, si!, di!, out!, N, E, H);
      })[0]!;
    },
  };
}

let gradientsRegistered = false;

export function registerPairKernels(backendName: Flavour): void {
  for (const [kernelName, kernelFunc] of Object.entries(funcs(backendName))) {
    if (tf.getKernel(kernelName, backendName) == null) tf.registerKernel({ kernelName, backendName, kernelFunc });
  }
  if (gradientsRegistered) return;
  gradientsRegistered = true;
  const run = (name: string, inputs: tf.NamedTensorMap, attrs: tf.NamedAttrMap = {}) => tf.engine().runKernel(name, inputs, attrs) as tf.Tensor;
  if (tf.getGradient(PAIR_KERNELS.gatherPairAdd) == null) {
    tf.registerGradient({
      kernelName: PAIR_KERNELS.gatherPairAdd,
      inputsToSave: ['p', 'src', 'dst'],
      gradFunc: (dy, saved) => {
        const [p, src, dst] = saved as [tf.Tensor, tf.Tensor, tf.Tensor];
        const g = dy as tf.Tensor;
        return {
          p: () => run(PAIR_KERNELS.scatterPair, { dy: g, src, dst }, { numNodes: p.shape[0]! }),
          b: () => g.clone(),
          src: () => tf.zeros(src.shape, 'float32'),
          dst: () => tf.zeros(dst.shape, 'float32'),
        };
      },
    });
  }
  if (tf.getGradient(PAIR_KERNELS.scatterPair) == null) {
    tf.registerGradient({
      kernelName: PAIR_KERNELS.scatterPair,
      inputsToSave: ['dy', 'src', 'dst'],
      gradFunc: (g, saved) => {
        const [dy, src, dst] = saved as [tf.Tensor, tf.Tensor, tf.Tensor];
        return {
          dy: () => run(PAIR_KERNELS.gatherPairAdd, { p: g as tf.Tensor, src, dst, b: tf.zerosLike(dy) }),
          src: () => tf.zeros(src.shape, 'float32'),
          dst: () => tf.zeros(dst.shape, 'float32'),
        };
      },
    });
  }
}
