/**
 * Graph kernels for message passing, for the 'wasm' and 'cpu' backends, with
 * their gradients registered in tfjs's gradient registry.
 *
 *   FarfieldGatherRows    out[e, :] = x[indices[e], :]          grad: SegmentSum
 *   FarfieldSegmentSum    out[s, :] = sum_{e: ids[e]=s} x[e, :]  grad: GatherRows
 *   FarfieldSegmentMax    (values, arg) per segment and channel  grad: ScatterByArg
 *   FarfieldSegmentMin    (values, arg) per segment and channel  grad: ScatterByArg
 *   FarfieldScatterByArg  out[arg[s,c], c] += dy[s, c]           grad: GatherByArg
 *   FarfieldGatherByArg   out[s, c] = x[arg[s,c], c] (0 if arg<0) grad: ScatterByArg
 *   FarfieldSegmentMean   sum / max(count, 1)                    grad: SegmentMeanGrad
 *   FarfieldSegmentMeanGrad out[e, :] = dy[ids[e], :] / max(count, 1)  grad: SegmentMean
 *   FarfieldSegmentCounts out[s, 0] = #{e: ids[e] = s} (float32, no gradient)
 *
 * Every gradient is itself one of these linear kernels, so gradients of
 * gradients work too, and no gradient ever builds a mask from a
 * differentiable tensor.
 *
 * Conventions: x is row-major [rows, channels]; ids/indices/arg are int32 and
 * must be in range (out-of-range ids throw; negative ids are not "dropped" as
 * in TF's unsorted_segment_sum). Empty segments give 0 for sum, mean, max and
 * min; their arg is -1. Max/min ties go to the lowest edge index; a NaN input
 * wins over numbers (so a divergence is not hidden). Loops run in a fixed
 * order, so equal inputs give bit-identical outputs.
 *
 * Implementation: plain TS loops over the backend's memory, except that on
 * WASM gather-rows, segment-sum and the sum inside segment-mean (and its
 * gradient's gather) call the backend's own C++ GatherNd / ScatterNd, which are
 * 4-8x faster than a JS loop and give the same bits (a copy; a float32 sum in
 * edge order). On WASM every output is allocated (backend.makeOutput) BEFORE
 * any heap view is taken with backend.typedArrayFromHeap, because an
 * allocation can grow the heap and detach earlier views; views are re-taken
 * after any call that allocates. On CPU, inputs are read from
 * backend.data.get(dataId).values and outputs made with makeTensorInfo.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { BackendWasm } from '@tensorflow/tfjs-backend-wasm';
import type { MathBackendCPU } from '@tensorflow/tfjs-backend-cpu';
import { simdKernels, type SimdKernels } from './simd/simd-kernels.ts';

export const K = {
  gatherRows: 'FarfieldGatherRows',
  segmentSum: 'FarfieldSegmentSum',
  segmentMax: 'FarfieldSegmentMax',
  segmentMin: 'FarfieldSegmentMin',
  scatterByArg: 'FarfieldScatterByArg',
  gatherByArg: 'FarfieldGatherByArg',
  segmentMean: 'FarfieldSegmentMean',
  segmentMeanGrad: 'FarfieldSegmentMeanGrad',
  segmentCounts: 'FarfieldSegmentCounts',
} as const;

export type TypedArray = Float32Array | Int32Array | Uint8Array;
export type Flavour = 'wasm' | 'cpu';
type NumDType = 'float32' | 'int32' | 'bool';
export interface OutSpec {
  shape: number[];
  dtype: NumDType;
}
export type Body = (outs: TypedArray[], ins: TypedArray[]) => void;
/**
 * The same kernel on Farfield's SIMD module (WASM only): gets views of the
 * inputs for checks, and the tensor infos to hand to the module. Must give
 * the same bits as `Body`.
 */
export type SimdBody = (simd: SimdKernels, outs: tf.TensorInfo[], ins: tf.TensorInfo[], inViews: TypedArray[]) => void;

function newTyped(dtype: NumDType, size: number): TypedArray {
  if (dtype === 'float32') return new Float32Array(size);
  if (dtype === 'int32') return new Int32Array(size);
  return new Uint8Array(size);
}

/**
 * Run `body` with views of the inputs and freshly allocated outputs on either
 * backend. Output arrays are NOT zeroed on WASM; bodies must write every element.
 */
export function execute(
  flavour: Flavour,
  backendObj: unknown,
  ins: tf.TensorInfo[],
  outs: OutSpec[],
  body: Body,
  simdBody?: SimdBody,
): tf.TensorInfo[] {
  if (flavour === 'wasm') {
    // Kernel args carry the backend as KernelBackend; this function is only
    // registered for 'wasm', so it is a BackendWasm.
    const backend = backendObj as BackendWasm;
    const simd = simdBody == null ? null : simdKernels(backend);
    const infos = outs.map((o) => backend.makeOutput(o.shape, o.dtype));
    // Views only after all allocations (see header).
    const inArrays = ins.map((t) => backend.typedArrayFromHeap(t) as TypedArray);
    try {
      if (simd != null) simdBody!(simd, infos, ins, inArrays);
      else body(infos.map((i) => backend.typedArrayFromHeap(i) as TypedArray), inArrays);
    } catch (err) {
      for (const i of infos) backend.disposeData(i.dataId);
      throw err;
    }
    return infos;
  }
  // Registered only for 'cpu', so the backend is a MathBackendCPU.
  const backend = backendObj as MathBackendCPU;
  const outArrays = outs.map((o) => newTyped(o.dtype, sizeOf(o.shape)));
  const inArrays = ins.map((t) => backend.data.get(t.dataId).values as TypedArray);
  body(outArrays, inArrays);
  return outs.map((o, i) => backend.makeTensorInfo(o.shape, o.dtype, outArrays[i]));
}

function sizeOf(shape: number[]): number {
  let n = 1;
  for (const d of shape) n *= d;
  return n;
}

function checkIds(where: string, ids: TypedArray, limit: number): void {
  for (let i = 0; i < ids.length; i++) {
    const v = ids[i];
    if (!(v >= 0 && v < limit)) {
      throw new Error(`model/ops ${where}: index ${v} at position ${i} is out of range 0..${limit - 1}`);
    }
  }
}

// ---------------------------------------------------------------- loops ----

function gatherRowsLoop(out: TypedArray, x: TypedArray, idx: TypedArray, C: number): void {
  const E = idx.length;
  for (let e = 0, o = 0; e < E; e++) {
    let s = idx[e] * C;
    for (let c = 0; c < C; c++) out[o++] = x[s++];
  }
}

function segmentSumLoop(out: TypedArray, x: TypedArray, ids: TypedArray, C: number): void {
  out.fill(0);
  const E = ids.length;
  for (let e = 0, i = 0; e < E; e++) {
    let o = ids[e] * C;
    for (let c = 0; c < C; c++) out[o++] += x[i++];
  }
}

/**
 * Arg-max (isMax) or arg-min per segment and channel; empty -> value 0, arg -1.
 * The first edge of a segment initialises the row; a later edge replaces a
 * channel only if strictly better (so ties keep the lowest edge index) or if it
 * is NaN and the current value is not (so a NaN is never hidden).
 */
function segmentExtremeLoop(
  vals: TypedArray,
  arg: TypedArray,
  x: TypedArray,
  ids: TypedArray,
  C: number,
  S: number,
  isMax: boolean,
): void {
  const seen = new Uint8Array(S);
  const E = ids.length;
  for (let e = 0; e < E; e++) {
    const s = ids[e];
    const o = s * C;
    const i = e * C;
    if (seen[s] === 0) {
      seen[s] = 1;
      for (let c = 0; c < C; c++) {
        vals[o + c] = x[i + c];
        arg[o + c] = e;
      }
    } else if (isMax) {
      for (let c = 0; c < C; c++) {
        const v = x[i + c];
        const best = vals[o + c];
        if (v > best || (v !== v && best === best)) {
          vals[o + c] = v;
          arg[o + c] = e;
        }
      }
    } else {
      for (let c = 0; c < C; c++) {
        const v = x[i + c];
        const best = vals[o + c];
        if (v < best || (v !== v && best === best)) {
          vals[o + c] = v;
          arg[o + c] = e;
        }
      }
    }
  }
  for (let s = 0; s < S; s++) {
    if (seen[s] === 0) {
      vals.fill(0, s * C, (s + 1) * C);
      arg.fill(-1, s * C, (s + 1) * C);
    }
  }
}

function scatterByArgLoop(out: TypedArray, dy: TypedArray, arg: TypedArray, C: number): void {
  out.fill(0);
  const n = arg.length;
  for (let o = 0, c = 0; o < n; o++) {
    const a = arg[o];
    if (a >= 0) out[a * C + c] += dy[o];
    if (++c === C) c = 0;
  }
}

function gatherByArgLoop(out: TypedArray, x: TypedArray, arg: TypedArray, C: number): void {
  const n = arg.length;
  for (let o = 0, c = 0; o < n; o++) {
    const a = arg[o];
    out[o] = a >= 0 ? x[a * C + c] : 0;
    if (++c === C) c = 0;
  }
}

function countsOf(ids: TypedArray, S: number): Int32Array {
  const cnt = new Int32Array(S);
  for (let e = 0; e < ids.length; e++) cnt[ids[e]]++;
  return cnt;
}

function segmentMeanLoop(out: TypedArray, x: TypedArray, ids: TypedArray, C: number, S: number): void {
  segmentSumLoop(out, x, ids, C);
  const cnt = countsOf(ids, S);
  for (let s = 0, o = 0; s < S; s++) {
    const k = cnt[s];
    if (k > 1) for (let c = 0; c < C; c++, o++) out[o] /= k;
    else o += C;
  }
}

function segmentMeanGradLoop(out: TypedArray, dy: TypedArray, ids: TypedArray, C: number, S: number): void {
  const cnt = countsOf(ids, S);
  const E = ids.length;
  for (let e = 0, o = 0; e < E; e++) {
    const s = ids[e];
    const k = cnt[s] > 1 ? cnt[s] : 1;
    let i = s * C;
    for (let c = 0; c < C; c++) out[o++] = dy[i++] / k;
  }
}

// -------------------------------------------------------------- kernels ----

type Attrs = tf.NamedAttrMap;
type Inputs = tf.NamedTensorInfoMap;

function attrInt(attrs: Attrs, name: string): number {
  const v = attrs[name];
  if (typeof v !== 'number') throw new Error(`model/ops: missing kernel attribute '${name}'`);
  return v;
}

function input(inputs: Inputs, name: string): tf.TensorInfo {
  const t = inputs[name];
  if (t == null) throw new Error(`model/ops: missing kernel input '${name}'`);
  return t;
}

function cols(x: tf.TensorInfo): number {
  return x.shape.length === 2 ? x.shape[1] : 1;
}

type KernelTable = Record<(typeof K)[keyof typeof K], tf.KernelFunc>;

function kernelFuncs(flavour: Flavour): KernelTable {
  const table = jsKernelFuncs(flavour);
  return flavour === 'wasm' ? { ...table, ...wasmNativeKernelFuncs() } : table;
}

/** An int32 [E] tensor viewed as [E, 1] (same data), as GatherNd/ScatterNd want. */
function asColumn(ids: tf.TensorInfo): tf.TensorInfo {
  return { dataId: ids.dataId, dtype: ids.dtype, shape: [ids.shape[0], 1] };
}

/**
 * On WASM, the pure copy/sum kernels delegate to the backend's own C++
 * GatherNd / ScatterNd (ScatterNd sums duplicate indices, sequentially, in
 * edge order: exactly segment sum). Measured 4-8x faster than a JS loop over
 * the heap (bench/ops-bench.ts). We still validate ids in JS first: the C++
 * kernels do not bounds-check and would read or write outside the tensor.
 */
function wasmNativeKernelFuncs(): Pick<KernelTable, 'FarfieldGatherRows' | 'FarfieldSegmentSum' | 'FarfieldSegmentMean' | 'FarfieldSegmentMeanGrad'> {
  const native = (name: string, backend: BackendWasm, inputs: Inputs, attrs: Attrs): tf.TensorInfo => {
    const k = tf.getKernel(name, 'wasm');
    if (k == null) throw new Error(`model/ops: the WASM backend has no '${name}' kernel`);
    return k.kernelFunc({ inputs, backend, attrs }) as tf.TensorInfo;
  };
  const idsView = (backend: BackendWasm, ids: tf.TensorInfo) => backend.typedArrayFromHeap(ids) as TypedArray;
  const scatterSum = (backend: BackendWasm, x: tf.TensorInfo, ids: tf.TensorInfo, S: number): tf.TensorInfo =>
    native('ScatterNd', backend, { indices: asColumn(ids), updates: x }, { shape: [S, cols(x)] });
  return {
    [K.gatherRows]: ({ inputs, backend: b }) => {
      const backend = b as BackendWasm; // registered for 'wasm' only
      const x = input(inputs, 'x');
      const indices = input(inputs, 'indices');
      checkIds('gatherRows', idsView(backend, indices), x.shape[0]);
      return native('GatherNd', backend, { params: x, indices: asColumn(indices) }, {});
    },
    [K.segmentSum]: ({ inputs, backend: b, attrs }) => {
      const backend = b as BackendWasm;
      const x = input(inputs, 'x');
      const ids = input(inputs, 'segmentIds');
      const S = attrInt(attrs ?? {}, 'numSegments');
      checkIds('segmentSum', idsView(backend, ids), S);
      return scatterSum(backend, x, ids, S);
    },
    [K.segmentMean]: ({ inputs, backend: b, attrs }) => {
      const backend = b as BackendWasm;
      const x = input(inputs, 'x');
      const ids = input(inputs, 'segmentIds');
      const S = attrInt(attrs ?? {}, 'numSegments');
      const C = cols(x);
      checkIds('segmentMean', idsView(backend, ids), S);
      const out = scatterSum(backend, x, ids, S);
      // Views only now, after the allocation.
      const ov = backend.typedArrayFromHeap(out) as TypedArray;
      const cnt = countsOf(idsView(backend, ids), S);
      for (let s = 0, o = 0; s < S; s++) {
        const k = cnt[s];
        if (k > 1) for (let c = 0; c < C; c++, o++) ov[o] /= k;
        else o += C;
      }
      return out;
    },
    [K.segmentMeanGrad]: ({ inputs, backend: b }) => {
      const backend = b as BackendWasm;
      const dy = input(inputs, 'dy');
      const ids = input(inputs, 'segmentIds');
      const S = dy.shape[0];
      const C = cols(dy);
      checkIds('segmentMean (gradient)', idsView(backend, ids), S);
      // scaled[s] = dy[s] / max(count, 1), then gather rows: same rounding as
      // the JS loop (one division per element, then a copy).
      const scaled = backend.makeOutput([S, C], 'float32');
      const sv = backend.typedArrayFromHeap(scaled) as TypedArray;
      const dv = backend.typedArrayFromHeap(dy) as TypedArray;
      const cnt = countsOf(idsView(backend, ids), S);
      for (let s = 0, o = 0; s < S; s++) {
        const k = cnt[s] > 1 ? cnt[s] : 1;
        for (let c = 0; c < C; c++, o++) sv[o] = dv[o] / k;
      }
      try {
        return native('GatherNd', backend, { params: scaled, indices: asColumn(ids) }, {});
      } finally {
        backend.disposeData(scaled.dataId);
      }
    },
  };
}

function jsKernelFuncs(flavour: Flavour): KernelTable {
  const run = (backend: unknown, ins: tf.TensorInfo[], outs: OutSpec[], body: Body, simdBody?: SimdBody): tf.TensorInfo[] =>
    execute(flavour, backend, ins, outs, body, simdBody);
  return {
    [K.gatherRows]: ({ inputs, backend }) => {
      const x = input(inputs, 'x');
      const indices = input(inputs, 'indices');
      const C = cols(x);
      const E = indices.shape[0];
      const rows = x.shape[0];
      return run(backend, [x, indices], [{ shape: [E, C], dtype: x.dtype as NumDType }], ([out], [xv, iv]) => {
        checkIds('gatherRows', iv, rows);
        gatherRowsLoop(out, xv, iv, C);
      })[0];
    },
    [K.segmentSum]: ({ inputs, backend, attrs }) => {
      const x = input(inputs, 'x');
      const segmentIds = input(inputs, 'segmentIds');
      const S = attrInt(attrs ?? {}, 'numSegments');
      const C = cols(x);
      return run(backend, [x, segmentIds], [{ shape: [S, C], dtype: 'float32' }], ([out], [xv, iv]) => {
        checkIds('segmentSum', iv, S);
        segmentSumLoop(out, xv, iv, C);
      })[0];
    },
    [K.segmentMax]: ({ inputs, backend, attrs }) => extremeKernel(run, inputs, backend, attrs ?? {}, true),
    [K.segmentMin]: ({ inputs, backend, attrs }) => extremeKernel(run, inputs, backend, attrs ?? {}, false),
    [K.scatterByArg]: ({ inputs, backend, attrs }) => {
      const dy = input(inputs, 'dy');
      const arg = input(inputs, 'arg');
      const R = attrInt(attrs ?? {}, 'numRows');
      const C = cols(dy);
      const checkArg = (av: TypedArray) => {
        for (let i = 0; i < av.length; i++) {
          if (av[i] >= R) throw new Error(`model/ops scatterByArg: arg ${av[i]} out of range 0..${R - 1}`);
        }
      };
      return run(
        backend,
        [dy, arg],
        [{ shape: [R, C], dtype: 'float32' }],
        ([out], [dv, av]) => {
          checkArg(av);
          scatterByArgLoop(out, dv, av, C);
        },
        (simd, [out], [dyInfo, argInfo], [, av]) => {
          checkArg(av);
          simd.scatterByArg(dyInfo, argInfo, out, R, av.length, C);
        },
      )[0];
    },
    [K.gatherByArg]: ({ inputs, backend }) => {
      const x = input(inputs, 'x');
      const arg = input(inputs, 'arg');
      const C = cols(x);
      const R = x.shape[0];
      return run(backend, [x, arg], [{ shape: [...arg.shape], dtype: 'float32' }], ([out], [xv, av]) => {
        for (let i = 0; i < av.length; i++) {
          if (av[i] >= R) throw new Error(`model/ops gatherByArg: arg ${av[i]} out of range 0..${R - 1}`);
        }
        gatherByArgLoop(out, xv, av, C);
      })[0];
    },
    [K.segmentMean]: ({ inputs, backend, attrs }) => {
      const x = input(inputs, 'x');
      const segmentIds = input(inputs, 'segmentIds');
      const S = attrInt(attrs ?? {}, 'numSegments');
      const C = cols(x);
      return run(backend, [x, segmentIds], [{ shape: [S, C], dtype: 'float32' }], ([out], [xv, iv]) => {
        checkIds('segmentMean', iv, S);
        segmentMeanLoop(out, xv, iv, C, S);
      })[0];
    },
    [K.segmentMeanGrad]: ({ inputs, backend, attrs }) => {
      const dy = input(inputs, 'dy');
      const segmentIds = input(inputs, 'segmentIds');
      const S = dy.shape[0];
      const E = attrInt(attrs ?? {}, 'numRows');
      const C = cols(dy);
      return run(backend, [dy, segmentIds], [{ shape: [E, C], dtype: 'float32' }], ([out], [dv, iv]) => {
        checkIds('segmentMean (gradient)', iv, S);
        segmentMeanGradLoop(out, dv, iv, C, S);
      })[0];
    },
    [K.segmentCounts]: ({ inputs, backend, attrs }) => {
      const segmentIds = input(inputs, 'segmentIds');
      const S = attrInt(attrs ?? {}, 'numSegments');
      return run(backend, [segmentIds], [{ shape: [S, 1], dtype: 'float32' }], ([out], [iv]) => {
        checkIds('segmentCounts', iv, S);
        out.fill(0);
        for (let e = 0; e < iv.length; e++) out[iv[e]] += 1;
      })[0];
    },
  };
}

function extremeKernel(
  run: (backend: unknown, ins: tf.TensorInfo[], outs: OutSpec[], body: Body, simdBody?: SimdBody) => tf.TensorInfo[],
  inputs: Inputs,
  backend: unknown,
  attrs: Attrs,
  isMax: boolean,
): tf.TensorInfo[] {
  const x = input(inputs, 'x');
  const segmentIds = input(inputs, 'segmentIds');
  const S = attrInt(attrs, 'numSegments');
  const C = cols(x);
  return run(
    backend,
    [x, segmentIds],
    [
      { shape: [S, C], dtype: 'float32' },
      { shape: [S, C], dtype: 'int32' },
    ],
    ([vals, arg], [xv, iv]) => {
      checkIds(isMax ? 'segmentMax' : 'segmentMin', iv, S);
      segmentExtremeLoop(vals, arg, xv, iv, C, S, isMax);
    },
    (simd, [vals, arg], [xInfo, idsInfo], [, iv]) => {
      checkIds(isMax ? 'segmentMax' : 'segmentMin', iv, S);
      simd.segmentExtreme(xInfo, idsInfo, vals, arg, iv.length, C, S, isMax);
    },
  );
}

// ------------------------------------------------------------ gradients ----

const run1 = (name: string, inputs: tf.NamedTensorMap, attrs: Attrs): tf.Tensor =>
  tf.engine().runKernel(name, inputs, attrs) as tf.Tensor;

/** Gradient for an int32 input: never requested (ints are pruned from the tape). */
const noGrad = (t: tf.Tensor) => () => tf.zeros(t.shape, 'float32');

const gradients: tf.GradConfig[] = [
  {
    kernelName: K.gatherRows,
    inputsToSave: ['indices'],
    gradFunc: (dy, saved, attrs) => {
      const [indices] = saved;
      return {
        x: () => run1(K.segmentSum, { x: dy as tf.Tensor, segmentIds: indices }, { numSegments: attrInt(attrs, 'numRows') }),
        indices: noGrad(indices),
      };
    },
  },
  {
    kernelName: K.segmentSum,
    inputsToSave: ['segmentIds'],
    gradFunc: (dy, saved) => {
      const [segmentIds] = saved;
      const d = dy as tf.Tensor;
      return {
        x: () => run1(K.gatherRows, { x: d, indices: segmentIds }, { numRows: d.shape[0] }),
        segmentIds: noGrad(segmentIds),
      };
    },
  },
  ...[K.segmentMax, K.segmentMin].map(
    (kernelName): tf.GradConfig => ({
      kernelName,
      inputsToSave: ['segmentIds'],
      outputsToSave: [false, true],
      gradFunc: (dys, saved, attrs) => {
        // Two outputs (values, arg); only the values carry a gradient.
        const dy = (dys as tf.Tensor[])[0];
        const [segmentIds, arg] = saved;
        return {
          x: () => run1(K.scatterByArg, { dy, arg }, { numRows: attrInt(attrs, 'numRows') }),
          segmentIds: noGrad(segmentIds),
        };
      },
    }),
  ),
  {
    kernelName: K.scatterByArg,
    inputsToSave: ['arg'],
    gradFunc: (dy, saved) => {
      const [arg] = saved;
      const g = dy as tf.Tensor;
      return { dy: () => run1(K.gatherByArg, { x: g, arg }, { numRows: g.shape[0] }), arg: noGrad(arg) };
    },
  },
  {
    kernelName: K.gatherByArg,
    inputsToSave: ['arg'],
    gradFunc: (dy, saved, attrs) => {
      const [arg] = saved;
      return {
        x: () => run1(K.scatterByArg, { dy: dy as tf.Tensor, arg }, { numRows: attrInt(attrs, 'numRows') }),
        arg: noGrad(arg),
      };
    },
  },
  {
    kernelName: K.segmentMean,
    inputsToSave: ['segmentIds'],
    gradFunc: (dy, saved, attrs) => {
      const [segmentIds] = saved;
      return {
        x: () =>
          run1(
            K.segmentMeanGrad,
            { dy: dy as tf.Tensor, segmentIds },
            { numRows: attrInt(attrs, 'numRows'), numSegments: attrInt(attrs, 'numSegments') },
          ),
        segmentIds: noGrad(segmentIds),
      };
    },
  },
  {
    // segmentMeanGrad is linear in dy; its adjoint is segmentMean.
    kernelName: K.segmentMeanGrad,
    inputsToSave: ['segmentIds'],
    gradFunc: (g, saved, attrs) => {
      const [segmentIds] = saved;
      return {
        dy: () =>
          run1(
            K.segmentMean,
            { x: g as tf.Tensor, segmentIds },
            { numSegments: attrInt(attrs, 'numSegments'), numRows: attrInt(attrs, 'numRows') },
          ),
        segmentIds: noGrad(segmentIds),
      };
    },
  },
];

// --------------------------------------------------------- registration ----

let gradientsRegistered = false;

/**
 * Register the graph kernels for `backendName` (and the shared gradients).
 * Idempotent, and safe if another copy of this module already registered them
 * (the kernel registry is global to tfjs-core, module state may not be).
 */
export function registerGraphKernels(backendName: Flavour): void {
  const funcs = kernelFuncs(backendName);
  for (const [kernelName, kernelFunc] of Object.entries(funcs)) {
    if (tf.getKernel(kernelName, backendName) == null) {
      tf.registerKernel({ kernelName, backendName, kernelFunc });
    }
  }
  if (!gradientsRegistered) {
    for (const g of gradients) {
      if (tf.getGradient(g.kernelName) == null) tf.registerGradient(g);
    }
    gradientsRegistered = true;
  }
}
