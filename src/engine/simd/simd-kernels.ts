/**
 * Farfield's own WASM SIMD kernels (src/engine/simd/kernels.wat), run on the
 * tfjs WASM backend's memory so inputs and outputs are used in place.
 *
 * Why: the backend's matmul hands every product to XNNPACK, which packs the
 * right-hand operand afresh for each new tensor (about 7 ns per element here);
 * for the small, fresh operands of a training step (every gradient and most
 * forward products) that packing costs more than the arithmetic. Our kernel
 * reads B in place and was 2-4x faster on the reference step's shapes.
 *
 * Every kernel reproduces the float32 operations, in order, of the path it
 * replaces, so results are bit-identical with or without it (checked by
 * test/engine/simd-kernels.test.ts); where the module cannot load (no WASM
 * SIMD, or a shared-memory threaded build) callers use the stock path.
 */
import type { BackendWasm } from '@tensorflow/tfjs-backend-wasm';
import { util, type TensorInfo } from '@tensorflow/tfjs-core';
import { KERNELS_WASM_BASE64 } from './kernels-binary.ts';

interface Exports {
  mm_tn(a: number, b: number, c: number, K: number, M: number, N: number): void;
  mm_nn(a: number, b: number, c: number, K: number, M: number, N: number, bias: number, relu: number): void;
  mm_strided(a: number, b: number, c: number, K: number, M: number, N: number, rs: number, ks: number): void;
  gather_pair_add(p: number, src: number, dst: number, b: number, out: number, E: number, H: number): void;
  scatter_pair(dy: number, src: number, dst: number, out: number, nodes: number, E: number, H: number): void;
  scatter_by_arg(dy: number, arg: number, out: number, rows: number, n: number, C: number): void;
  segment_extreme(x: number, ids: number, vals: number, arg: number, E: number, C: number, S: number, isMax: number): void;
  copy_block(src: number, dst: number, rows: number, width: number, srcStride: number, dstStride: number): void;
  col_sum(x: number, out: number, rows: number, cols: number): void;
  adam_step(
    value: number, grad: number, m: number, v: number, outValue: number, outM: number, outV: number, n: number,
    scale: number, b1: number, c1: number, b2: number, c2: number, o1: number, o2: number, eps: number, nlr: number,
  ): void;
  sum_squares(x: number, n: number): number;
  relu(x: number, out: number, n: number): void;
  leaky_relu(x: number, out: number, n: number, alpha: number): void;
  relu_grad(dy: number, x: number, out: number, n: number): void;
  leaky_grad(dy: number, x: number, out: number, n: number, alpha: number): void;
  add(a: number, b: number, out: number, n: number): void;
  segment_sum(x: number, ids: number, out: number, E: number, H: number, S: number): void;
  gather_rows(x: number, ids: number, out: number, E: number, H: number): void;
  neg(x: number, out: number, n: number): void;
  shift_div(x: number, p: number, ids: number, out: number, E: number, H: number, tau: number): void;
  mul_div_neg(a: number, b: number, out: number, negOut: number, n: number, tau: number): void;
  semiring_hard(h: number, w: number, y: number, N: number, H: number, Hp: number, isMin: number): void;
  semiring_shift(h: number, w: number, peak: number, out: number, N: number, H: number, Hp: number, d: number): void;
  semiring_totals(b: number, c: number, N: number, H: number, Hp: number): void;
  semiring_hard_grad(h: number, w: number, y: number, dy: number, dh: number, dw: number, ds: number, N: number, H: number, Hp: number): void;
  semiring_smooth_grad(
    h: number, w: number, peak: number, b: number, c: number, dy: number, dh: number, dw: number, tmp: number, N: number, H: number, Hp: number, d: number,
  ): void;
  equal3(a: number, b: number, out: number, d0: number, d1: number, d2: number, as0: number, as1: number, as2: number, bs0: number, bs1: number, bs2: number): void;
}

/** Float32 constants of one Adam step (see src/train/adam.ts). */
export interface AdamConstants {
  scale: number;
  b1: number;
  c1: number;
  b2: number;
  c2: number;
  o1: number;
  o2: number;
  eps: number;
  nlr: number;
}

export interface SimdKernels {
  /** C[M,N] = Aᵀ·B for A [K,M], B [K,N] (float32, row-major, batch 1). */
  matMulTN(a: TensorInfo, b: TensorInfo, c: TensorInfo, K: number, M: number, N: number): void;
  /** C[M,N] = act(bias + A·B) for A [M,K], B [K,N]; bias [N] or null; act relu or linear. */
  matMulNN(a: TensorInfo, b: TensorInfo, c: TensorInfo, K: number, M: number, N: number, bias: TensorInfo | null, relu: boolean): void;
  /** out[e, :] = p[src[e], :H] + p[dst[e], H:] + b[e, :] (one float64 sum, rounded once). Ids must be checked. */
  gatherPairAdd(p: TensorInfo, src: TensorInfo, dst: TensorInfo, b: TensorInfo, out: TensorInfo, E: number, H: number): void;
  /** out [nodes, 2H] = scatter of dy [E, H] to rows src (first half) and dst (second half). Ids must be checked. */
  scatterPair(dy: TensorInfo, src: TensorInfo, dst: TensorInfo, out: TensorInfo, nodes: number, E: number, H: number): void;
  /** out [rows, C] = 0, then out[arg[o], o mod C] += dy[o] where arg[o] >= 0; arg must be < rows. */
  scatterByArg(dy: TensorInfo, arg: TensorInfo, out: TensorInfo, rows: number, n: number, C: number): void;
  /** Per segment and channel max or min with its arg edge (kernels-graph.ts semantics). Ids must be checked. */
  segmentExtreme(x: TensorInfo, ids: TensorInfo, vals: TensorInfo, arg: TensorInfo, E: number, C: number, S: number, isMax: boolean): void;
  /** Copy rows x width 4-byte values from src (starting at element srcStart, row stride srcStride) to dst likewise. */
  copyBlock(src: TensorInfo, srcStart: number, dst: TensorInfo, dstStart: number, rows: number, width: number, srcStride: number, dstStride: number): void;
  /** out[c] = sum of x[r, c] over rows in order, for x viewed as [rows, cols]. */
  colSum(x: TensorInfo, out: TensorInfo, rows: number, cols: number): void;
  /** One Adam step over value/grad/m/v (same size) into three fresh outputs. */
  adamStep(value: TensorInfo, grad: TensorInfo, m: TensorInfo, v: TensorInfo, outs: [TensorInfo, TensorInfo, TensorInfo], k: AdamConstants): void;
  /** Sum of squares of all n values of x, in order, in float32. */
  sumSquares(x: TensorInfo, n: number): number;
  /** out = (a == b) as bytes over a broadcast of 3 axes (shape, and each input's element strides, 0 where it broadcasts). */
  equal3(a: TensorInfo, b: TensorInfo, out: TensorInfo, shape: [number, number, number], aStrides: [number, number, number], bStrides: [number, number, number]): void;
  /** The same kernels on raw byte offsets, for fused kernels that keep their intermediates in one block. */
  raw: RawSimd;
}

/**
 * Pointer-level access for fused kernels (src/engine/kernels-process.ts): byte
 * offsets into the backend's memory instead of tensors, plus the backend's own
 * allocator. Views of `memory.buffer` go stale whenever `malloc` grows the
 * memory, so take them after allocating.
 */
export interface RawSimd {
  memory: WebAssembly.Memory;
  offset(t: TensorInfo): number;
  malloc(bytes: number): number;
  free(pointer: number): void;
  mmNN(a: number, b: number, c: number, K: number, M: number, N: number, bias: number, relu: boolean): void;
  mmTN(a: number, b: number, c: number, K: number, M: number, N: number): void;
  /** C[M,N] = A·B from 0 in k order, A(i, k) at a + 4·(i·rs + k·ks), B [K,N] row-major. */
  mmStrided(a: number, b: number, c: number, K: number, M: number, N: number, rs: number, ks: number): void;
  gatherPairAdd(p: number, src: number, dst: number, b: number, out: number, E: number, H: number): void;
  scatterPair(dy: number, src: number, dst: number, out: number, nodes: number, E: number, H: number): void;
  scatterByArg(dy: number, arg: number, out: number, rows: number, n: number, C: number): void;
  segmentExtreme(x: number, ids: number, vals: number, arg: number, E: number, C: number, S: number, isMax: boolean): void;
  colSum(x: number, out: number, rows: number, cols: number): void;
  copyBlock(src: number, dst: number, rows: number, width: number, srcStride: number, dstStride: number): void;
  /** The stock Relu (NaN stays NaN, -0 becomes 0). */
  relu(x: number, out: number, n: number): void;
  /** The stock LeakyRelu: x < 0 ? α·x : x. */
  leakyRelu(x: number, out: number, n: number, alpha: number): void;
  /** mul(dy, step(x)), the Relu gradient. */
  reluGrad(dy: number, x: number, out: number, n: number): void;
  /** where(x > 0, dy, dy·α), the LeakyRelu gradient. */
  leakyGrad(dy: number, x: number, out: number, n: number, alpha: number): void;
  /** out = a + b (float32; out may alias an input). */
  add(a: number, b: number, out: number, n: number): void;
  /** out[r, :] = x[r, :] + b. */
  /** out [S, H] = 0, then rows of x added to rows ids[e] in edge order. */
  segmentSum(x: number, ids: number, out: number, E: number, H: number, S: number): void;
  /** out[e, :] = x[ids[e], :]. */
  gatherRows(x: number, ids: number, out: number, E: number, H: number): void;
  /** out = −x (a sign flip, as the stock Neg). */
  neg(x: number, out: number, n: number): void;
  /** out[e, c] = (x[e, c] − p[ids[e], c]) / τ, each operation rounded to float32 (Sub, then RealDiv by a scalar). */
  shiftDiv(x: number, p: number, ids: number, out: number, E: number, H: number, tau: number): void;
  /** q = (a·b) / τ rounded after each operation; out = q, negOut = −q. */
  mulDivNeg(a: number, b: number, out: number, negOut: number, n: number, tau: number): void;
  /** Semiring layers on [N, H] states with W padded to [H, Hp] (Hp = H rounded up to 4): see kernels.wat. */
  semiringHard(h: number, w: number, y: number, N: number, H: number, Hp: number, isMin: boolean): void;
  semiringShift(h: number, w: number, peak: number, out: number, N: number, H: number, Hp: number, d: number): void;
  semiringTotals(b: number, c: number, N: number, H: number, Hp: number): void;
  semiringHardGrad(h: number, w: number, y: number, dy: number, dh: number, dw: number, ds: number, N: number, H: number, Hp: number): void;
  semiringSmoothGrad(h: number, w: number, peak: number, b: number, c: number, dy: number, dh: number, dw: number, tmp: number, N: number, H: number, Hp: number, d: number): void;
}

/** The Emscripten module object behind BackendWasm.wasm, as far as we use it. */
interface EmscriptenModule {
  _malloc(bytes: number): number;
  _free(pointer: number): void;
  asm?: { memory?: unknown };
  wasmMemory?: unknown;
  wasmExports?: { memory?: unknown };
}

function backendMemory(backend: BackendWasm): WebAssembly.Memory | null {
  const module = backend.wasm as unknown as EmscriptenModule;
  for (const candidate of [module.asm?.memory, module.wasmMemory, module.wasmExports?.memory]) {
    if (candidate instanceof WebAssembly.Memory) return candidate;
  }
  return null;
}

function decode(base64: string): Uint8Array {
  const text = atob(base64);
  const bytes = new Uint8Array(text.length);
  for (let i = 0; i < text.length; i++) bytes[i] = text.charCodeAt(i);
  return bytes;
}

const loaded = new WeakMap<object, SimdKernels | null>();
let disabled = false;

/** Turn the SIMD kernels off (benchmarks and tests compare both paths). */
export function setSimdKernelsEnabled(enabled: boolean): void {
  disabled = !enabled;
}

/** The memory our module may import: the backend's own, unless it is shared (a threaded build). */
function usableMemory(backend: BackendWasm): WebAssembly.Memory | null {
  const memory = backendMemory(backend);
  if (memory == null || (typeof SharedArrayBuffer !== 'undefined' && memory.buffer instanceof SharedArrayBuffer)) return null;
  return memory;
}

function load(backend: BackendWasm): SimdKernels | null {
  const memory = usableMemory(backend);
  if (memory == null) return null;
  try {
    // Synchronous compile: fine in workers and Node. A browser's main thread refuses modules over 4 kB
    // this way, which is why initBackend prepares the module asynchronously first (prepareSimdKernels).
    const module = new WebAssembly.Module(decode(KERNELS_WASM_BASE64) as BufferSource);
    return bind(backend, memory, new WebAssembly.Instance(module, { env: { memory } }).exports as unknown as Exports);
  } catch {
    return null; // no WASM SIMD here: the stock path is used
  }
}

/** Compile and instantiate the module asynchronously (allowed everywhere) and keep it for this backend. */
export async function prepareSimdKernels(backend: BackendWasm): Promise<void> {
  const key = backend.wasm as unknown as object;
  if (loaded.has(key)) return;
  const memory = usableMemory(backend);
  let kernels: SimdKernels | null = null;
  if (memory != null) {
    try {
      const { instance } = await WebAssembly.instantiate(decode(KERNELS_WASM_BASE64) as BufferSource, { env: { memory } });
      kernels = bind(backend, memory, instance.exports as unknown as Exports);
    } catch {
      kernels = null;
    }
  }
  if (!loaded.has(key)) loaded.set(key, kernels);
}

function bind(backend: BackendWasm, memory: WebAssembly.Memory, exports: Exports): SimdKernels {
  const offset = (t: TensorInfo): number => backend.dataIdMap.get(t.dataId)!.memoryOffset;
  const module = backend.wasm as unknown as EmscriptenModule;
  const raw: RawSimd = {
    memory,
    offset,
    malloc: (bytes) => module._malloc(bytes),
    free: (pointer) => module._free(pointer),
    mmNN: (a, b, c, K, M, N, bias, relu) => exports.mm_nn(a, b, c, K, M, N, bias, relu ? 1 : 0),
    mmTN: (a, b, c, K, M, N) => exports.mm_tn(a, b, c, K, M, N),
    mmStrided: (a, b, c, K, M, N, rs, ks) => exports.mm_strided(a, b, c, K, M, N, rs, ks),
    gatherPairAdd: (p, src, dst, b, out, E, H) => exports.gather_pair_add(p, src, dst, b, out, E, H),
    scatterPair: (dy, src, dst, out, nodes, E, H) => exports.scatter_pair(dy, src, dst, out, nodes, E, H),
    scatterByArg: (dy, arg, out, rows, n, C) => exports.scatter_by_arg(dy, arg, out, rows, n, C),
    segmentExtreme: (x, ids, vals, arg, E, C, S, isMax) => exports.segment_extreme(x, ids, vals, arg, E, C, S, isMax ? 1 : 0),
    colSum: (x, out, rows, cols) => exports.col_sum(x, out, rows, cols),
    copyBlock: (src, dst, rows, width, srcStride, dstStride) => exports.copy_block(src, dst, rows, width, srcStride, dstStride),
    relu: (x, out, n) => exports.relu(x, out, n),
    leakyRelu: (x, out, n, alpha) => exports.leaky_relu(x, out, n, alpha),
    reluGrad: (dy, x, out, n) => exports.relu_grad(dy, x, out, n),
    leakyGrad: (dy, x, out, n, alpha) => exports.leaky_grad(dy, x, out, n, alpha),
    add: (a, b, out, n) => exports.add(a, b, out, n),
    segmentSum: (x, ids, out, E, H, S) => exports.segment_sum(x, ids, out, E, H, S),
    gatherRows: (x, ids, out, E, H) => exports.gather_rows(x, ids, out, E, H),
    neg: (x, out, n) => exports.neg(x, out, n),
    shiftDiv: (x, p, ids, out, E, H, tau) => exports.shift_div(x, p, ids, out, E, H, tau),
    mulDivNeg: (a, b, out, negOut, n, tau) => exports.mul_div_neg(a, b, out, negOut, n, tau),
    semiringHard: (h, w, y, N, H, Hp, isMin) => exports.semiring_hard(h, w, y, N, H, Hp, isMin ? 1 : 0),
    semiringShift: (h, w, peak, out, N, H, Hp, d) => exports.semiring_shift(h, w, peak, out, N, H, Hp, d),
    semiringTotals: (b, c, N, H, Hp) => exports.semiring_totals(b, c, N, H, Hp),
    semiringHardGrad: (h, w, y, dy, dh, dw, ds, N, H, Hp) => exports.semiring_hard_grad(h, w, y, dy, dh, dw, ds, N, H, Hp),
    semiringSmoothGrad: (h, w, peak, b, c, dy, dh, dw, tmp, N, H, Hp, d) => exports.semiring_smooth_grad(h, w, peak, b, c, dy, dh, dw, tmp, N, H, Hp, d),
  };
  return {
    raw,
    matMulTN(a, b, c, K, M, N) {
      exports.mm_tn(offset(a), offset(b), offset(c), K, M, N);
    },
    matMulNN(a, b, c, K, M, N, bias, relu) {
      exports.mm_nn(offset(a), offset(b), offset(c), K, M, N, bias == null ? 0 : offset(bias), relu ? 1 : 0);
    },
    gatherPairAdd(p, src, dst, b, out, E, H) {
      exports.gather_pair_add(offset(p), offset(src), offset(dst), offset(b), offset(out), E, H);
    },
    scatterPair(dy, src, dst, out, nodes, E, H) {
      exports.scatter_pair(offset(dy), offset(src), offset(dst), offset(out), nodes, E, H);
    },
    scatterByArg(dy, arg, out, rows, n, C) {
      exports.scatter_by_arg(offset(dy), offset(arg), offset(out), rows, n, C);
    },
    copyBlock(src, srcStart, dst, dstStart, rows, width, srcStride, dstStride) {
      exports.copy_block(offset(src) + 4 * srcStart, offset(dst) + 4 * dstStart, rows, width, srcStride, dstStride);
    },
    adamStep(value, grad, m, v, [outValue, outM, outV], k) {
      exports.adam_step(
        offset(value), offset(grad), offset(m), offset(v), offset(outValue), offset(outM), offset(outV), util.sizeFromShape(value.shape),
        k.scale, k.b1, k.c1, k.b2, k.c2, k.o1, k.o2, k.eps, k.nlr,
      );
    },
    equal3(a, b, out, [d0, d1, d2], [as0, as1, as2], [bs0, bs1, bs2]) {
      exports.equal3(offset(a), offset(b), offset(out), d0, d1, d2, as0, as1, as2, bs0, bs1, bs2);
    },
    sumSquares(x, n) {
      return exports.sum_squares(offset(x), n);
    },
    colSum(x, out, rows, cols) {
      exports.col_sum(offset(x), offset(out), rows, cols);
    },
    segmentExtreme(x, ids, vals, arg, E, C, S, isMax) {
      exports.segment_extreme(offset(x), offset(ids), offset(vals), offset(arg), E, C, S, isMax ? 1 : 0);
    },
  };
}

/** The kernels bound to this backend's memory, or null where they cannot run. */
export function simdKernels(backend: BackendWasm): SimdKernels | null {
  if (disabled) return null;
  const key = backend.wasm as unknown as object;
  if (!loaded.has(key)) loaded.set(key, load(backend));
  return loaded.get(key) ?? null;
}
