/**
 * The whole process phase of the message-passing network, T steps of
 *
 *   P = h·[W_s | W_d]              pre = P[src, :H] + P[dst, H:] + ê·W_e (+ b)
 *   m = act(pre)·W₂ (+ b₂)         a = ⊕_{e→v} m_e        (sum, mean, max, min, smooth-max, smooth-min)
 *   h ← h + (act([h, a]·[W_h; W_a] + u))·W_u2 (+ b_u2)      u = x̂·W_x (+ b_u), an input
 *
 * — or, with a semiring message layer, m = (h ⊗ W)[src] + ê·W_e (+ b) with
 * (h ⊗ W)_j = min_k / max_k (h_k + W_kj) or its smooth log-sum-exp version —
 * as ONE kernel forward and ONE kernel backward, with the mlp update. Why: the presets' batches are tiny (about 150 nodes and 350 edges),
 * so the stock composition spent most of a training step in per-launch
 * bookkeeping — about 97 tfjs kernel launches per message-passing step, 2,700
 * per training step. Fused, a whole training step launches a few dozen.
 *
 * Same bits by construction. Every float32 operation of the stock composition
 * (src/model/network.ts on the WASM backend with Farfield's kernels) is
 * repeated in the same order: products on the same SIMD matmul (k order from
 * the bias or 0), the same gather/scatter/segment kernels, elementwise ops
 * with the stock kernels' exact rules (a NaN stays NaN through relu, -0 stays
 * -0 through leaky relu), and every gradient that several uses send to one
 * tensor added in the order tfjs's tape adds them: for a weight (and the
 * input term u), step T's share first, then T−1 …; for a state hᵗ⁻¹, the
 * residual's, then the concat's, then the first layer's. u, like the edge
 * term, is computed once per forward pass outside the kernels, and its
 * gradient (the sum of every step's share) flows back through one product.
 * test/engine/process-kernel.test.ts compares every value and every gradient
 * with `Object.is` against the stock path.
 *
 * The forward kernel, when recording, also returns a stash: each step's
 * state, messages' activations, concat, hidden layer and arg-extremes, which
 * the backward kernel reads instead of recomputing (the activations stand in
 * for their inputs in the activation gradients' sign tests).
 * Scratch memory is one block per backend, grown when a batch needs more and
 * reused by every later launch.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { BackendWasm } from '@tensorflow/tfjs-backend-wasm';
import { simdKernels, type RawSimd } from './simd/simd-kernels.ts';
import { worthTransposing } from './kernels-matmul.ts';

export const PROCESS_KERNELS = { forward: 'FarfieldProcess', backward: 'FarfieldProcessGrad' } as const;

export type ProcessAggregator = 'sum' | 'mean' | 'max' | 'min' | 'smooth-max' | 'smooth-min';
export type ProcessActivation = 'relu' | 'leaky-relu';
/** The message layer: the mlp, or a semiring layer m_e = (h ⊗ W)_src + edge term (src/model/semiring.ts). */
export type ProcessMessage = 'mlp' | 'min-plus' | 'max-plus' | 'smooth-min-plus' | 'smooth-max-plus';

export interface ProcessAttrs {
  steps: number;
  message: ProcessMessage;
  /** τ of the smooth semiring layers (unused by the others). */
  messageTemperature: number;
  aggregator: ProcessAggregator;
  /** τ of the smooth aggregators (unused by the others). */
  temperature: number;
  activation: ProcessActivation;
  /** Under a gradient tape: keep a stash for the backward kernel. */
  record: boolean;
  hasMessageBias: boolean;
  hasOutputBias: boolean;
}

/**
 * Block width of the stock WASM matmul's scalar loop, which runs a product
 * with a transposed operand that Farfield's patch does not transpose first
 * (src/engine/kernels-matmul.ts: too small to pay): each output is the sum,
 * from 0, of 48-wide k-blocks each summed from 0 in k order. Found by
 * reproducing that kernel's outputs bit for bit (test/engine/process-kernel.test.ts
 * covers products of both kinds).
 */
const STOCK_BLOCK = 48;

let matmulFlops = 0;

/** Matmul FLOPs (2·M·K·N per product) the fused kernels have run in this thread: the bench's profile counts them. */
export function fusedKernelMatmulFlops(): number {
  return matmulFlops;
}

/** The forward's products: act(bias + A·B), A [M,K], B [K,N], in k order from the bias or 0. */
function matmul(raw: RawSimd, a: number, b: number, c: number, K: number, M: number, N: number, bias: number, relu: boolean): void {
  matmulFlops += 2 * M * K * N;
  raw.mmNN(a, b, c, K, M, N, bias, relu);
}

/** Leaky relu's slope as the stock kernel applies it (the attribute is rounded to float32). */
const LEAKY = Math.fround(0.01);

/** Float offsets of one step's saved values inside the stash. */
interface StepLayout {
  h: number;
  act: number;
  concat: number;
  hidden: number;
  arg: number;
  /** Smooth aggregators: exp of the shifted messages [E, H] and log's argument [N, H], which their gradients read. */
  exp: number;
  safe: number;
  /** Semiring layers: the senders' values (hard) or the maxima of the scaled sums (smooth), [N, Hp]. */
  sy: number;
  /** Smooth semiring layers: exp of the shifted sums [N, H, Hp] and their sums over k [N, Hp]. */
  sb: number;
  sc: number;
  size: number;
}

/** How an aggregator aggregates, as far as the kernels care. */
type AggregatorKind = 'additive' | 'extreme' | 'smooth';

function kindOf(aggregator: ProcessAggregator): AggregatorKind {
  if (aggregator === 'max' || aggregator === 'min') return 'extreme';
  if (aggregator === 'smooth-max' || aggregator === 'smooth-min') return 'smooth';
  return 'additive';
}

/** The message layer's family: the mlp, a hard (min / max) or a smooth (log-sum-exp) semiring layer. */
type MessageKind = 'mlp' | 'hard' | 'smooth';

function messageKindOf(message: ProcessMessage): MessageKind {
  if (message === 'mlp') return 'mlp';
  return message === 'smooth-min-plus' || message === 'smooth-max-plus' ? 'smooth' : 'hard';
}

function stepLayout(N: number, E: number, H: number, kind: AggregatorKind, message: MessageKind): StepLayout {
  const NH = N * H;
  const EH = message === 'mlp' ? E * H : 0;
  const h = 0;
  const act = h + NH;
  const concat = act + EH;
  const hidden = concat + 2 * NH;
  const arg = hidden + NH;
  const exp = arg + (kind === 'additive' ? 0 : NH);
  const safe = exp + (kind === 'smooth' ? E * H : 0);
  const NHp = N * padded(H);
  const sy = safe + (kind === 'smooth' ? NH : 0);
  const sb = sy + (message === 'mlp' ? 0 : NHp);
  const sc = sb + (message === 'smooth' ? NHp * H : 0);
  return { h, act, concat, hidden, arg, exp, safe, sy, sb, sc, size: sc + (message === 'smooth' ? NHp : 0) };
}

// ------------------------------------------------------------ scratch ----

const arenas = new WeakMap<RawSimd, { pointer: number; bytes: number }>();

/** Scratch above this size is not kept between launches (scoring a very large graph would otherwise pin it). */
const KEEP_BYTES = 32 * 1024 * 1024;

/** A block of at least `bytes` bytes, reused across launches (kernels never overlap); hand it back with `release`. */
function scratch(raw: RawSimd, bytes: number): number {
  let arena = arenas.get(raw);
  if (arena == null || arena.bytes < bytes) {
    if (arena != null) raw.free(arena.pointer);
    const size = Math.max(bytes, Math.min(KEEP_BYTES, Math.ceil((arena?.bytes ?? 0) * 1.5)), 1 << 16);
    arena = { pointer: raw.malloc(size), bytes: size };
    if (arena.pointer === 0) {
      arenas.delete(raw);
      throw new Error(`engine/process: could not allocate ${size} bytes of scratch memory`);
    }
    arenas.set(raw, arena);
  }
  return arena.pointer;
}

function release(raw: RawSimd): void {
  const arena = arenas.get(raw);
  if (arena != null && arena.bytes > KEEP_BYTES) {
    raw.free(arena.pointer);
    arenas.delete(raw);
  }
}

/** Hand out consecutive float-sized slices of one block (byte pointers). */
function carve(base: number, sizes: Record<string, number>): Record<string, number> {
  const out: Record<string, number> = {};
  let at = base;
  for (const [name, floats] of Object.entries(sizes)) {
    out[name] = at;
    at += 4 * floats;
  }
  return out;
}

function totalFloats(sizes: Record<string, number>): number {
  return Object.values(sizes).reduce((a, b) => a + b, 0);
}

// ------------------------------------------------------ elementwise ----
// Elementwise work runs on the SIMD module (src/engine/simd/kernels.wat: relu, leaky_relu, relu_grad,
// leaky_grad, add, segment_sum, gather_rows, copy_block, neg, shift_div, mul_div_neg), each
// with the stock kernel's rule; what is left here in JavaScript is copying, transposing the weights
// once per launch, the smooth aggregators' node-sized steps, and the mean's division (one float32
// division per value either way). F is a Float32Array over the heap; indices
// are float indices (byte pointer >> 2).

function copy(F: Float32Array, out: number, x: number, n: number): void {
  F.copyWithin(out, x, x + n);
}

/** W [R, C] → Wᵀ [C, R] (a copy: the stock path transposes before every A·Bᵀ). */
function transpose(F: Float32Array, out: number, w: number, R: number, C: number): void {
  for (let r = 0; r < R; r++) for (let c = 0; c < C; c++) F[out + c * R + r] = F[w + r * C + c]!;
}

function segmentCountsOf(I: Int32Array, dst: number, E: number, N: number): Int32Array {
  const counts = new Int32Array(N);
  for (let e = 0; e < E; e++) counts[I[dst + e]!]!++;
  return counts;
}

function checkIds(I: Int32Array, ids: number, E: number, N: number, what: string): void {
  for (let e = 0; e < E; e++) {
    const v = I[ids + e]!;
    if (!(v >= 0 && v < N)) throw new Error(`engine/process: ${what} id ${v} at edge ${e} is out of range 0..${N - 1}`);
  }
}

// ------------------------------------------------- smooth aggregators ----
// smooth-max is the stock composition of src/model/aggregators.ts (smoothMaxSegments), op by op:
//   peak = segmentMax(x)   shifted = (x − peak[dst]) / τ   total = segmentSum(exp(shifted))
//   safe = total + (1 − hasIncoming)   out = (peak + log(safe)·τ) · hasIncoming
// and smooth-min is −smoothMax(−m). Each elementwise float32 operation is one rounding, as the stock
// kernel's: the edge-sized steps on the SIMD module (neg, shift_div, mul_div_neg), the node-sized
// ones here (Math.fround of a double +, −, ×, ÷ of two float32 values is exactly the float32 result).
// exp and log are the backend's own C kernels run on our buffers: their bits come from its
// implementation, which Math.exp / Math.log do not reproduce.

/** The Emscripten calls of the backend used here (cwrap and the C side's tensor registry). */
interface BackendCalls {
  cwrap(name: string, returns: null, args: string[]): (...args: number[]) => void;
  tfjs: { registerTensor(id: number, size: number, memoryOffset: number): void; disposeData(id: number): void };
}

/** CppDType.float32 of the WASM backend (dist/kernels/types.js). */
const CPP_FLOAT32 = 0;

const unaryCalls = new WeakMap<object, Map<string, (x: number, dtype: number, out: number) => void>>();

/**
 * out[0..n) = the backend's own `name` kernel ('Exp' or 'Log') of x[0..n), on byte offsets. The C
 * kernels take tensor ids, so both blocks are registered on the C side for the call only, under ids
 * drawn from the backend's own counter (it never hands one out twice, so they cannot collide with a
 * tensor's); the C side's dispose forgets the id and frees nothing (the backend's JS frees memory).
 */
export function backendUnary(backend: BackendWasm, name: 'Exp' | 'Log', x: number, out: number, n: number): void {
  if (n === 0) return;
  const calls = backend.wasm as unknown as BackendCalls;
  let cache = unaryCalls.get(calls);
  if (cache == null) unaryCalls.set(calls, (cache = new Map()));
  let call = cache.get(name);
  if (call == null) cache.set(name, (call = calls.cwrap(name, null, ['number', 'number', 'number'])));
  const counter = backend as unknown as { dataIdNextNumber: number };
  const xId = counter.dataIdNextNumber++;
  const outId = counter.dataIdNextNumber++;
  calls.tfjs.registerTensor(xId, n, x);
  calls.tfjs.registerTensor(outId, n, out);
  try {
    call(xId, CPP_FLOAT32, outId);
  } finally {
    calls.tfjs.disposeData(xId);
    calls.tfjs.disposeData(outId);
  }
}

/** 1 where a node has an incoming edge, else 0: the stock minimum(segmentCounts, 1). */
function hasIncomingOf(I: Int32Array, dst: number, E: number, N: number): Float32Array {
  const has = new Float32Array(N);
  for (let e = 0; e < E; e++) has[I[dst + e]!] = 1;
  return has;
}

// ---------------------------------------------------- semiring layers ----
// The semiring message layer m = gather(semiringDense(h, W), src) + edge term, op by op as
// src/model/semiring.ts and tfjs run it: sums[n, k, j] = h[n, k] + W[k, j] (one float32 add), then
//   hard    y = min_k / max_k sums (the stock reduction keeps the first of equal values: v < y, v > y)
//   smooth  q = sums / d (d = τ, or −τ for smooth-min-plus), peak = max_k q, b = exp(q − peak),
//           c = Σ_k b (from 0, in k order), y = (peak + log c) · d
// exp and log are the backend's own C kernels (backendUnary above). Their gradients are tfjs's: max/min
// send dy to EVERY k equal to the result (mul by a cast Equal), and the broadcasting add's gradient
// sums over j for h and over n for W, each from 0 in order. In the smooth layer two tensors get two
// shares each, added in the tape's reverse order: the peak (the final add's dRes first, then the
// shift's −Σ_k dc·b) and q (the shift's dc·b first, then max's). The stash keeps y (hard) or the
// peak, exp's output and its sums over k (smooth); q and the sums are recomputed, the same float32
// operations giving the same bits.

// The [N, H, H] steps run on the SIMD module (semiring_hard, semiring_shift, semiring_totals and their
// gradients semiring_hard_grad, semiring_smooth_grad), vectorised over j with W and the [., H] blocks
// padded to Hp = H rounded up to 4 columns; every lane is its own sequence of float32 operations, so
// the order of each sum is the stock one (over k for c, over j for dh, over n for dW).

/** H rounded up to whole 4-wide vectors. */
const padded = (H: number) => (H + 3) & ~3;

/** W [H, H] copied into [H, Hp] with zero padding columns. */
function padWeight(raw: RawSimd, F: Float32Array, w: number, out: number, H: number): void {
  const Hp = padded(H);
  raw.copyBlock(w, out, H, H, H, Hp);
  for (let k = 0; k < H; k++) F.fill(0, (out >> 2) + k * Hp + H, (out >> 2) + (k + 1) * Hp);
}

/** Smooth layer, after log: y[n, j] = (peak + log c) · d, from the padded blocks into [N, H]. */
function semiringFinish(F: Float32Array, peak: number, logs: number, y: number, N: number, H: number, d: number): void {
  const Hp = padded(H);
  for (let n = 0; n < N; n++) {
    for (let j = 0; j < H; j++) F[y + n * H + j] = Math.fround(Math.fround(F[peak + n * Hp + j]! + F[logs + n * Hp + j]!) * d);
  }
}

// ------------------------------------------------------------ kernels ----

interface Tensors {
  [name: string]: tf.TensorInfo;
}

function attrsOf(attrs: tf.NamedAttrMap | undefined): ProcessAttrs {
  const a = (attrs ?? {}) as unknown as ProcessAttrs;
  return {
    steps: a.steps,
    message: a.message,
    messageTemperature: a.messageTemperature,
    aggregator: a.aggregator,
    temperature: a.temperature,
    activation: a.activation,
    record: a.record,
    hasMessageBias: a.hasMessageBias,
    hasOutputBias: a.hasOutputBias,
  };
}

function rawOf(backend: BackendWasm): RawSimd {
  const simd = simdKernels(backend);
  if (simd == null) throw new Error('engine/process: the fused process kernel needs the SIMD module');
  return simd.raw;
}

const floatIndex = (pointer: number) => pointer >> 2;

type KernelArgs = { inputs: tf.NamedTensorInfoMap; backend: unknown; attrs?: tf.NamedAttrMap };

/** What both kernels read first: the backend, the attributes, the sizes (from the [N, H] `state` input) and the stash layout. */
function launchContext(args: KernelArgs, state: 'encoded' | 'dy') {
  const backend = args.backend as BackendWasm; // registered for 'wasm' only
  const t = args.inputs as Tensors;
  const at = attrsOf(args.attrs);
  const N = t[state]!.shape[0]!;
  const H = t[state]!.shape[1]!;
  const E = t['src']!.shape[0]!;
  const kind = kindOf(at.aggregator);
  const message = messageKindOf(at.message);
  return { backend, raw: rawOf(backend), at, t, N, H, E, T: at.steps, kind, message, layout: stepLayout(N, E, H, kind, message), NH: N * H, EH: E * H };
}

function forwardKernel(args: KernelArgs): tf.TensorInfo[] {
  const { backend, raw, at, t, N, H, E, T, kind, message, layout, NH, EH } = launchContext(args, 'encoded');
  const encoded = t['encoded']!;

  const hOut = backend.makeOutput([N, H], 'float32');
  const stash = at.record ? backend.makeOutput([T * layout.size], 'float32') : null;
  // Outside a tape nothing is kept: one step's worth of values is reused. The state lives in the output
  // and is updated in place (every read of hᵗ⁻¹ comes before the residual add that overwrites it).
  const sizes = {
    P: message === 'mlp' ? 2 * NH : 0,
    pre: message === 'mlp' ? EH : 0,
    x: NH,
    ...(message !== 'mlp' ? { senders: NH, wp: H * padded(H) } : {}),
    ...(message === 'smooth' ? { sums: N * H * padded(H), semiringLogs: N * padded(H) } : {}),
    m: EH,
    a: NH,
    out: NH,
    ...(stash == null ? { step: layout.size } : {}),
    ...(kind === 'smooth' ? { peak: NH, shifted: EH, negated: at.aggregator === 'smooth-min' ? EH : 0, total: NH, logs: NH } : {}),
  };
  const s = carve(scratch(raw, 4 * totalFloats(sizes)), sizes);
  const ptr = (name: string) => raw.offset(t[name]!);
  const src = ptr('src');
  const dst = ptr('dst');
  const bias = (has: boolean, name: string) => (has ? ptr(name) : 0);
  const b2m = message === 'mlp' ? bias(at.hasMessageBias, 'b2m') : 0;
  const b2u = bias(at.hasOutputBias, 'b2u');
  /** The smooth semiring layers' divisor and factor, as the stock float32 scalar: τ, or −τ for smooth-min-plus. */
  const semiringScale = Math.fround(at.message === 'smooth-min-plus' ? -at.messageTemperature : at.messageTemperature);

  // Views only now, after every allocation (and renewed after the backend's own kernels, which may allocate).
  let F = new Float32Array(raw.memory.buffer);
  let I = new Int32Array(raw.memory.buffer);
  const renew = () => {
    if (F.buffer !== raw.memory.buffer) {
      F = new Float32Array(raw.memory.buffer);
      I = new Int32Array(raw.memory.buffer);
    }
  };
  try {
    checkIds(I, floatIndex(src), E, N, 'source');
    checkIds(I, floatIndex(dst), E, N, 'destination');
  } catch (error) {
    backend.disposeData(hOut.dataId);
    if (stash != null) backend.disposeData(stash.dataId);
    throw error;
  }
  const counts = at.aggregator === 'mean' ? segmentCountsOf(I, floatIndex(dst), E, N) : null;
  const hasIncoming = kind === 'smooth' ? hasIncomingOf(I, floatIndex(dst), E, N) : null;
  const tau = Math.fround(at.temperature);

  const stepBase = (step: number): number => (stash != null ? raw.offset(stash) + 4 * step * layout.size : s['step']!);
  const h = raw.offset(hOut);
  const hi = floatIndex(h);
  copy(F, hi, floatIndex(raw.offset(encoded)), NH);
  const Hp = padded(H);
  if (message !== 'mlp') padWeight(raw, F, ptr('ws'), s['wp']!, H);
  for (let step = 0; step < T; step++) {
    const base = stepBase(step);
    const p = (k: keyof StepLayout) => base + 4 * layout[k];
    if (stash != null) copy(F, floatIndex(p('h')), hi, NH);
    if (message === 'mlp') {
      // message: first layer per operand, gathered per edge with the constant edge term
      matmul(raw, h, ptr('jm'), s['P']!, H, N, 2 * H, 0, false);
      raw.gatherPairAdd(s['P']!, src, dst, ptr('edgeTerm'), s['pre']!, E, H);
      if (at.activation === 'relu') raw.relu(s['pre']!, p('act'), EH);
      else raw.leakyRelu(s['pre']!, p('act'), EH, LEAKY);
      matmul(raw, p('act'), ptr('w2m'), s['m']!, H, E, H, b2m, false);
    } else {
      // message: the semiring layer on the nodes, gathered by sender, plus the edge term (two stock ops)
      const senders = s['senders']!;
      if (message === 'hard') {
        raw.semiringHard(h, s['wp']!, p('sy'), N, H, Hp, at.message === 'min-plus');
        raw.copyBlock(p('sy'), senders, N, H, Hp, H);
      } else {
        raw.semiringShift(h, s['wp']!, p('sy'), s['sums']!, N, H, Hp, semiringScale);
        backendUnary(backend, 'Exp', s['sums']!, p('sb'), N * H * Hp);
        renew();
        raw.semiringTotals(p('sb'), p('sc'), N, H, Hp);
        backendUnary(backend, 'Log', p('sc'), s['semiringLogs']!, N * Hp);
        renew();
        semiringFinish(F, floatIndex(p('sy')), floatIndex(s['semiringLogs']!), floatIndex(senders), N, H, semiringScale);
      }
      raw.gatherRows(senders, src, s['m']!, E, H);
      raw.add(s['m']!, ptr('edgeTerm'), s['m']!, EH);
    }
    // aggregate
    const a = floatIndex(s['a']!);
    if (kind === 'extreme') {
      raw.segmentExtreme(s['m']!, dst, s['a']!, p('arg'), E, H, N, at.aggregator === 'max');
    } else if (hasIncoming != null) {
      // smooth-max of x = m, or of x = −m for smooth-min (whose result is negated at the end)
      const negate = at.aggregator === 'smooth-min';
      let x = s['m']!;
      if (negate) {
        raw.neg(x, s['negated']!, EH);
        x = s['negated']!;
      }
      raw.segmentExtreme(x, dst, s['peak']!, p('arg'), E, H, N, true);
      raw.shiftDiv(x, s['peak']!, dst, s['shifted']!, E, H, tau);
      const peak = floatIndex(s['peak']!);
      backendUnary(backend, 'Exp', s['shifted']!, p('exp'), EH);
      renew();
      raw.segmentSum(p('exp'), dst, s['total']!, E, H, N);
      const total = floatIndex(s['total']!);
      const safe = floatIndex(p('safe'));
      for (let v = 0; v < N; v++) {
        const empty = 1 - hasIncoming[v]!;
        for (let c = 0; c < H; c++) F[safe + v * H + c] = F[total + v * H + c]! + empty;
      }
      backendUnary(backend, 'Log', p('safe'), s['logs']!, NH);
      renew();
      const logs = floatIndex(s['logs']!);
      for (let v = 0; v < N; v++) {
        const has = hasIncoming[v]!;
        for (let c = 0; c < H; c++) {
          const i = v * H + c;
          const value = Math.fround(Math.fround(F[peak + i]! + Math.fround(F[logs + i]! * tau)) * has);
          F[a + i] = negate ? -value : value;
        }
      }
    } else {
      raw.segmentSum(s['m']!, dst, s['a']!, E, H, N);
      if (counts != null) {
        // Views go stale only when memory grows, which no kernel call does.
        for (let v = 0; v < N; v++) {
          const k = counts[v]!;
          if (k > 1) for (let c = 0; c < H; c++) F[a + v * H + c] = F[a + v * H + c]! / k;
        }
      }
    }
    raw.copyBlock(h, p('concat'), N, H, H, 2 * H);
    raw.copyBlock(s['a']!, p('concat') + 4 * H, N, H, H, 2 * H);
    // update: hidden layer (the product, + the input term, the activation), output layer, residual
    matmul(raw, p('concat'), ptr('ju'), s['x']!, 2 * H, N, H, 0, false);
    raw.add(s['x']!, ptr('inputTerm'), s['x']!, NH);
    if (at.activation === 'relu') raw.relu(s['x']!, p('hidden'), NH);
    else raw.leakyRelu(s['x']!, p('hidden'), NH, LEAKY);
    matmul(raw, p('hidden'), ptr('w2u'), s['out']!, H, N, H, b2u, false);
    raw.add(h, s['out']!, h, NH);
  }
  release(raw);
  return stash != null ? [hOut, stash] : [hOut];
}

/** The backward kernel's outputs, in order (biases only where the network has them). */
function gradientNames(at: ProcessAttrs): string[] {
  return [
    'encoded',
    'edgeTerm',
    'inputTerm',
    ...(at.message === 'mlp' ? ['jm', 'w2m', ...(at.hasMessageBias ? ['b2m'] : [])] : ['ws']),
    'ju',
    'w2u',
    ...(at.hasOutputBias ? ['b2u'] : []),
  ];
}

function backwardKernel(args: KernelArgs): tf.TensorInfo[] {
  const { backend, raw, at, t, N, H, E, T, kind, message, layout, NH, EH } = launchContext(args, 'dy');
  const HH = H * H;

  const shapes: Record<string, number[]> = {
    encoded: [N, H],
    edgeTerm: [E, H],
    inputTerm: [N, H],
    jm: [H, 2 * H],
    w2m: [H, H],
    ws: [H, H],
    b2m: [H],
    ju: [2 * H, H],
    w2u: [H, H],
    b2u: [H],
  };
  const names = gradientNames(at);
  const outs = names.map((name) => backend.makeOutput(shapes[name]!, 'float32'));
  const out = Object.fromEntries(names.map((name, i) => [name, outs[i]!]));
  const sizes = {
    G: NH,
    dHidden: NH,
    dX: NH,
    dConcat: 2 * NH,
    dhc: NH,
    da: NH,
    dm: EH,
    dAct: EH,
    dPre: EH,
    dP: 2 * NH,
    dhp: NH,
    gW2u: HH,
    gJu: 2 * HH,
    gW2m: HH,
    gJm: 2 * HH,
    gWs: HH,
    ...(message !== 'mlp' ? { wp: H * padded(H), dyp: N * padded(H), dwp: H * padded(H), stmp: (H + 2) * padded(H) } : {}),
    gB: H,
    w2uT: HH,
    juT: 2 * HH,
    w2mT: HH,
    jmT: 2 * HH,
    block: Math.max(2 * NH, EH, 2 * HH),
    ...(kind === 'smooth' ? { dPeak: NH, dSafe: NH, dShare: NH, dExp: EH, dShifted: EH, dNeg: EH, dArg: EH } : {}),
  };
  const s = carve(scratch(raw, 4 * totalFloats(sizes)), sizes);
  const ptr = (name: string) => raw.offset(t[name]!);
  const o = (name: string) => raw.offset(out[name]!);
  const src = ptr('src');
  const dst = ptr('dst');

  const F = new Float32Array(raw.memory.buffer);
  const I = new Int32Array(raw.memory.buffer);
  const fi = floatIndex;
  const counts = at.aggregator === 'mean' ? segmentCountsOf(I, fi(dst), E, N) : null;
  const hasIncoming = kind === 'smooth' ? hasIncomingOf(I, fi(dst), E, N) : null;
  const tau = Math.fround(at.temperature);
  // The stock path transposes each weight before every A·Bᵀ; the weights do not change during a step.
  transpose(F, fi(s['w2uT']!), fi(ptr('w2u')), H, H);
  transpose(F, fi(s['juT']!), fi(ptr('ju')), 2 * H, H);
  if (message === 'mlp') {
    transpose(F, fi(s['w2mT']!), fi(ptr('w2m')), H, H);
    transpose(F, fi(s['jmT']!), fi(ptr('jm')), H, 2 * H);
  }
  const semiringScale = Math.fround(at.message === 'smooth-min-plus' ? -at.messageTemperature : at.messageTemperature);
  const Hp = padded(H);
  if (message !== 'mlp') padWeight(raw, F, ptr('ws'), s['wp']!, H);
  copy(F, fi(s['G']!), fi(ptr('dy')), NH);

  /**
   * A gradient product C[M,N] = A·B (A(i, k) at a + 4·(i·rs + k·ks), B [K,N]) summed as the stock
   * path sums it: in k order when its patched matmul runs it (SIMD), else in 48-wide blocks.
   */
  const product = (simdPath: boolean, a: number, rs: number, ks: number, b: number, c: number, K: number, M: number, N: number) => {
    matmulFlops += 2 * M * K * N;
    if (simdPath || K <= STOCK_BLOCK) {
      raw.mmStrided(a, b, c, K, M, N, rs, ks);
      return;
    }
    for (let k0 = 0; k0 < K; k0 += STOCK_BLOCK) {
      const target = k0 === 0 ? c : s['block']!;
      raw.mmStrided(a + 4 * k0 * ks, b + 4 * k0 * N, target, Math.min(STOCK_BLOCK, K - k0), M, N, rs, ks);
      if (k0 > 0) raw.add(c, target, c, M * N);
    }
  };
  /** For a layer [rows, inner]·[inner, out]: whether the stock path runs dy·Wᵀ and Aᵀ·dy on the SIMD kernel. */
  const simdPaths = (rows: number, inner: number, out: number) => ({
    dA: worthTransposing([1, rows, out], [1, inner, out], false, true),
    dB: worthTransposing([1, rows, inner], [1, rows, out], true, false),
  });
  const first = simdPaths(N, H, 2 * H);
  const second = simdPaths(E, H, H);
  const hiddenLayer = simdPaths(N, 2 * H, H);
  const outputLayer = simdPaths(N, H, H);

  /** A chain of gradients for one tensor: the first share is written, later ones added. */
  const chains = new Set<string>();
  const into = (name: string, temp: number): number => (chains.has(name) ? temp : o(name));
  const settle = (name: string, temp: number, n: number) => {
    if (chains.has(name)) raw.add(o(name), temp, o(name), n);
    else chains.add(name);
  };
  const add = (name: string, g: number, n: number) => {
    if (chains.has(name)) raw.add(o(name), g, o(name), n);
    else {
      copy(F, fi(o(name)), fi(g), n);
      chains.add(name);
    }
  };

  const stash = raw.offset(t['stash']!);
  for (let step = T - 1; step >= 0; step--) {
    const base = stash + 4 * step * layout.size;
    const p = (k: keyof StepLayout) => base + 4 * layout[k];
    const G = s['G']!;
    // output layer of the update: out = hidden·W_u2 (+ b_u2)
    product(outputLayer.dA, G, H, 1, s['w2uT']!, s['dHidden']!, H, N, H);
    let g = into('w2u', s['gW2u']!);
    product(outputLayer.dB, p('hidden'), 1, H, G, g, N, H, H);
    settle('w2u', g, HH);
    if (at.hasOutputBias) {
      g = into('b2u', s['gB']!);
      raw.colSum(G, g, N, H);
      settle('b2u', g, H);
    }
    // hidden layer: hidden = act(x), x = [h, a]·[W_h; W_a] + u (the sum's gradient goes to both addends)
    // The activation's gradient tests its input's sign and NaN-ness; its output has the same ones
    // (relu keeps x > 0 and NaN as they are and makes the rest +0; leaky relu keeps the sign, α > 0),
    // so the stash keeps only the activated values, and the test reads those.
    if (at.activation === 'relu') raw.reluGrad(s['dHidden']!, p('hidden'), s['dX']!, NH);
    else raw.leakyGrad(s['dHidden']!, p('hidden'), s['dX']!, NH, LEAKY);
    add('inputTerm', s['dX']!, NH);
    product(hiddenLayer.dA, s['dX']!, H, 1, s['juT']!, s['dConcat']!, H, N, 2 * H);
    g = into('ju', s['gJu']!);
    product(hiddenLayer.dB, p('concat'), 1, 2 * H, s['dX']!, g, N, 2 * H, H);
    settle('ju', g, 2 * HH);
    raw.copyBlock(s['dConcat']!, s['dhc']!, N, H, 2 * H, H);
    raw.copyBlock(s['dConcat']! + 4 * H, s['da']!, N, H, 2 * H, H);
    // aggregation
    const da = fi(s['da']!);
    if (kind === 'extreme') {
      raw.scatterByArg(s['da']!, p('arg'), s['dm']!, E, NH, H);
    } else if (hasIncoming != null) {
      // The stock gradients in the tape's reverse order (see the forward): × hasIncoming, + peak (whose
      // share is kept for peak's chain), × τ, log (÷ safe), + (1 − hasIncoming), segmentSum (gather),
      // exp (× its output), ÷ τ, then x − peak[dst]: x's share is the quotient itself, peak's the
      // segment sum of its negation, added after the first share of peak; then segmentMax sends peak's
      // gradient to the arg-max edges, added after x's first share. smooth-min negates on the way in and out.
      const negate = at.aggregator === 'smooth-min';
      const dPeak = fi(s['dPeak']!);
      const dSafe = fi(s['dSafe']!);
      const safe = fi(p('safe'));
      for (let v = 0; v < N; v++) {
        const has = hasIncoming[v]!;
        for (let c = 0; c < H; c++) {
          const i = v * H + c;
          const share = Math.fround((negate ? -F[da + i]! : F[da + i]!) * has);
          F[dPeak + i] = share;
          F[dSafe + i] = Math.fround(share * tau) / F[safe + i]!;
        }
      }
      raw.gatherRows(s['dSafe']!, dst, s['dExp']!, E, H);
      raw.mulDivNeg(s['dExp']!, p('exp'), s['dShifted']!, s['dNeg']!, EH, tau);
      raw.segmentSum(s['dNeg']!, dst, s['dShare']!, E, H, N);
      raw.add(s['dPeak']!, s['dShare']!, s['dPeak']!, NH);
      raw.scatterByArg(s['dPeak']!, p('arg'), s['dArg']!, E, NH, H);
      raw.add(s['dShifted']!, s['dArg']!, s['dm']!, EH);
      if (negate) raw.neg(s['dm']!, s['dm']!, EH);
    } else {
      if (counts != null) {
        for (let v = 0; v < N; v++) {
          const k = counts[v]! > 1 ? counts[v]! : 1;
          for (let c = 0; c < H; c++) F[da + v * H + c] = F[da + v * H + c]! / k;
        }
      }
      raw.gatherRows(s['da']!, dst, s['dm']!, E, H);
    }
    if (message !== 'mlp') {
      // semiring layer: m = gather(y, src) + edge term; y's gradient is the gather's (a segment sum by sender)
      add('edgeTerm', s['dm']!, EH);
      raw.segmentSum(s['dm']!, src, s['dP']!, E, H, N);
      raw.copyBlock(s['dP']!, s['dyp']!, N, H, H, Hp);
      if (message === 'hard') raw.semiringHardGrad(p('h'), s['wp']!, p('sy'), s['dyp']!, s['dhp']!, s['dwp']!, s['stmp']!, N, H, Hp);
      else raw.semiringSmoothGrad(p('h'), s['wp']!, p('sy'), p('sb'), p('sc'), s['dyp']!, s['dhp']!, s['dwp']!, s['stmp']!, N, H, Hp, semiringScale);
      g = into('ws', s['gWs']!);
      raw.copyBlock(s['dwp']!, g, H, H, Hp, H);
      settle('ws', g, HH);
    } else {
      // message second layer: m = act(pre)·W₂ (+ b₂)
      product(second.dA, s['dm']!, H, 1, s['w2mT']!, s['dAct']!, H, E, H);
      g = into('w2m', s['gW2m']!);
      product(second.dB, p('act'), 1, H, s['dm']!, g, E, H, H);
      settle('w2m', g, HH);
      if (at.hasMessageBias) {
        g = into('b2m', s['gB']!);
        raw.colSum(s['dm']!, g, E, H);
        settle('b2m', g, H);
      }
      if (at.activation === 'relu') raw.reluGrad(s['dAct']!, p('act'), s['dPre']!, EH);
      else raw.leakyGrad(s['dAct']!, p('act'), s['dPre']!, EH, LEAKY);
      // first layer: pre = P[src, :H] + P[dst, H:] + edge term, P = h·[W_s | W_d]
      raw.scatterPair(s['dPre']!, src, dst, s['dP']!, N, E, H);
      add('edgeTerm', s['dPre']!, EH);
      product(first.dA, s['dP']!, 2 * H, 1, s['jmT']!, s['dhp']!, 2 * H, N, H);
      g = into('jm', s['gJm']!);
      product(first.dB, p('h'), 1, H, s['dP']!, g, N, H, 2 * H);
      settle('jm', g, 2 * HH);
    }
    // hᵗ's own uses, in the tape's order: the residual, then the concat, then the first layer
    if (step > 0) {
      raw.add(G, s['dhc']!, G, NH);
      raw.add(G, s['dhp']!, G, NH);
    } else {
      // h⁰ is x̂ itself: its residual, concat and first-layer shares (tfjs then adds u's product's share)
      add('encoded', G, NH);
      add('encoded', s['dhc']!, NH);
      add('encoded', s['dhp']!, NH);
    }
  }
  for (const name of names) if (!chains.has(name)) F.fill(0, fi(o(name)), fi(o(name)) + shapes[name]!.reduce((a, b) => a * b, 1));
  release(raw);
  return outs;
}

// ------------------------------------------------------- registration ----

let enabled = true;

/** Turn the fused process kernel off (benchmarks and tests compare it with the stock composition). */
export function setFusedProcessEnabled(on: boolean): void {
  enabled = on;
}

export function fusedProcessEnabled(): boolean {
  return enabled;
}

export function registerProcessKernels(): void {
  if (tf.getKernel(PROCESS_KERNELS.forward, 'wasm') == null) {
    tf.registerKernel({ kernelName: PROCESS_KERNELS.forward, backendName: 'wasm', kernelFunc: forwardKernel as unknown as tf.KernelFunc });
  }
  if (tf.getKernel(PROCESS_KERNELS.backward, 'wasm') == null) {
    tf.registerKernel({ kernelName: PROCESS_KERNELS.backward, backendName: 'wasm', kernelFunc: backwardKernel as unknown as tf.KernelFunc });
  }
}

/** The process phase's tensors: the encoded inputs, the edge term, the edges and the weights it reads. */
export interface ProcessInputs {
  encoded: tf.Tensor2D;
  edgeTerm: tf.Tensor2D;
  src: tf.Tensor1D;
  dst: tf.Tensor1D;
  /** The mlp message: [W_s | W_d], [H, 2H], its second layer and bias. */
  jm?: tf.Tensor2D;
  w2m?: tf.Tensor2D;
  b2m?: tf.Tensor;
  /** A semiring message layer's weight W, [H, H]. */
  ws?: tf.Tensor2D;
  /** The update's input term x̂·W_x (+ b_u), [N, H], computed once per forward pass. */
  inputTerm: tf.Tensor2D;
  /** [W_h; W_a], [2H, H] */
  ju: tf.Tensor2D;
  w2u: tf.Tensor2D;
  b2u?: tf.Tensor;
}

/**
 * h after T steps, through the fused kernels. Under a gradient tape the pair
 * is one custom-gradient node whose backward is the fused backward kernel.
 */
export function processSteps(inputs: ProcessInputs, options: Omit<ProcessAttrs, 'record' | 'hasMessageBias' | 'hasOutputBias'>): tf.Tensor2D {
  registerProcessKernels();
  const weights = options.message === 'mlp' ? [inputs.jm, inputs.w2m] : [inputs.ws];
  if (weights.some((w) => w == null)) throw new Error(`engine/process: the ${options.message} message needs its weights`);
  const attrs: ProcessAttrs = {
    ...options,
    record: false,
    hasMessageBias: inputs.b2m != null,
    hasOutputBias: inputs.b2u != null,
  };
  const engine = tf.engine();
  const kernelInputs = (): tf.NamedTensorMap => {
    const map: tf.NamedTensorMap = {
      encoded: inputs.encoded,
      edgeTerm: inputs.edgeTerm,
      inputTerm: inputs.inputTerm,
      src: inputs.src,
      dst: inputs.dst,
      ju: inputs.ju,
      w2u: inputs.w2u,
    };
    if (inputs.jm) map['jm'] = inputs.jm;
    if (inputs.w2m) map['w2m'] = inputs.w2m;
    if (inputs.ws) map['ws'] = inputs.ws;
    if (inputs.b2m) map['b2m'] = inputs.b2m;
    if (inputs.b2u) map['b2u'] = inputs.b2u;
    return map;
  };
  // tfjs's own rule for "under a tape" (it decides whether a relu may fuse into its matmul the same way).
  if (engine.state.gradientDepth === 0) {
    return (engine.runKernel(PROCESS_KERNELS.forward, kernelInputs(), attrs as unknown as tf.NamedAttrMap) as tf.Tensor[])[0] as tf.Tensor2D;
  }
  const recordAttrs = { ...attrs, record: true } as unknown as tf.NamedAttrMap;
  const names = gradientNames(attrs);
  const differentiable = names.map((name) => kernelInputs()[name]!);
  const node = tf.customGrad((...args: (tf.Tensor | tf.GradSaveFunc)[]) => {
    const save = args[args.length - 1] as tf.GradSaveFunc;
    const [hT, stash] = engine.runKernel(PROCESS_KERNELS.forward, kernelInputs(), recordAttrs) as tf.Tensor[];
    // The message weights last: the mlp's two, or the semiring layer's one.
    save([stash!, inputs.src, inputs.dst, inputs.ju, inputs.w2u, ...(weights as tf.Tensor[])]);
    return {
      value: hT!,
      gradFunc: (dy: tf.Tensor | tf.Tensor[], saved: tf.Tensor[]) => {
        const [kept, src, dst, ju, w2u, ...messageWeights] = saved;
        const named: tf.NamedTensorMap =
          options.message === 'mlp' ? { jm: messageWeights[0]!, w2m: messageWeights[1]! } : { ws: messageWeights[0]! };
        return engine.runKernel(
          PROCESS_KERNELS.backward,
          { dy: dy as tf.Tensor, stash: kept!, src: src!, dst: dst!, ju: ju!, w2u: w2u!, ...named },
          recordAttrs,
        ) as tf.Tensor[];
      },
    };
  });
  return node(...differentiable) as tf.Tensor2D;
}
