/**
 * Adam with global-norm clipping in two kernel launches per variable fewer
 * than a dozen: the same arithmetic as tfjs's `tf.train.adam` (tfjs-core
 * 4.22, optimizers/adam_optimizer.js), op for op in float32, so weights are
 * bit-identical to the stock optimizer (test/train/adam.test.ts) while a
 * training step of a small model launches ~250 fewer kernels.
 *
 * Per element, with scalars rounded to float32 exactly as tfjs makes them
 * (b1 = 0.9, c1 = 1 − 0.9 computed in float64 then rounded, …):
 *   g  = gRaw·scale                    (the clipping multiply; scale = 1 leaves g as is)
 *   m' = m·b1 + g·c1                    v' = v·b2 + (g·g)·c2
 *   value' = ((m'/o1) / (sqrt(v'/o2) + ε))·(−lr) + value,  o_k = 1 − b_k^t
 * The global norm is sqrt(Σ_var Σ_i g_i²) summed in order as
 * sqrt(addN(grads.map(g => sum(square(g))))) does on each backend.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { BackendWasm } from '@tensorflow/tfjs-backend-wasm';
import type { MathBackendCPU } from '@tensorflow/tfjs-backend-cpu';
import { simdKernels, type AdamConstants } from '../engine/simd/simd-kernels.ts';

const ADAM_STEP = 'FarfieldAdamStep';
const GLOBAL_NORM = 'FarfieldGlobalNorm';
const f32 = Math.fround;

/** The same update in plain float32 steps (CPU backend, and WASM without the SIMD module). */
function adamLoop(out: Float32Array[], value: Float32Array, grad: Float32Array, m: Float32Array, v: Float32Array, k: AdamConstants): void {
  const [outValue, outM, outV] = out as [Float32Array, Float32Array, Float32Array];
  for (let i = 0; i < value.length; i++) {
    const g = f32(grad[i]! * k.scale);
    const m2 = f32(f32(m[i]! * k.b1) + f32(g * k.c1));
    const v2 = f32(f32(v[i]! * k.b2) + f32(f32(g * g) * k.c2));
    outM[i] = m2;
    outV[i] = v2;
    const denominator = f32(f32(Math.sqrt(f32(v2 / k.o2))) + k.eps);
    outValue[i] = f32(f32(f32(f32(m2 / k.o1) / denominator) * k.nlr) + value[i]!);
  }
}

/**
 * Σ x², each square rounded to float32. The backends' Sum kernels accumulate
 * differently: WASM in float32, the CPU backend in float64 rounded at the end.
 */
function sumSquaresLoop(x: Float32Array, accumulate: 'float32' | 'float64'): number {
  let acc = 0;
  if (accumulate === 'float32') for (let i = 0; i < x.length; i++) acc = f32(acc + f32(x[i]! * x[i]!));
  else for (let i = 0; i < x.length; i++) acc += f32(x[i]! * x[i]!);
  return f32(acc);
}

function registerFor(backendName: 'wasm' | 'cpu'): void {
  if (tf.getKernel(ADAM_STEP, backendName) == null) {
    tf.registerKernel({
      kernelName: ADAM_STEP,
      backendName,
      kernelFunc: ({ inputs, backend, attrs }) => {
        const { value, grad, m, v } = inputs as Record<'value' | 'grad' | 'm' | 'v', tf.TensorInfo>;
        const k = attrs as unknown as AdamConstants;
        if (backendName === 'wasm') {
          const wasm = backend as BackendWasm;
          const outs = [0, 1, 2].map(() => wasm.makeOutput([...value.shape], 'float32')) as [tf.TensorInfo, tf.TensorInfo, tf.TensorInfo];
          const simd = simdKernels(wasm);
          if (simd != null) simd.adamStep(value, grad, m, v, outs, k);
          else {
            const view = (t: tf.TensorInfo) => wasm.typedArrayFromHeap(t) as Float32Array;
            adamLoop(outs.map(view), view(value), view(grad), view(m), view(v), k);
          }
          return outs;
        }
        const cpu = backend as MathBackendCPU;
        const read = (t: tf.TensorInfo) => cpu.data.get(t.dataId).values as Float32Array;
        const out = [0, 1, 2].map(() => new Float32Array(read(value).length));
        adamLoop(out, read(value), read(grad), read(m), read(v), k);
        return out.map((o) => cpu.makeTensorInfo([...value.shape], 'float32', o));
      },
    });
  }
  if (tf.getKernel(GLOBAL_NORM, backendName) == null) {
    tf.registerKernel({
      kernelName: GLOBAL_NORM,
      backendName,
      kernelFunc: ({ inputs, backend }) => {
        const grads = Object.values(inputs) as tf.TensorInfo[];
        let total = 0;
        if (backendName === 'wasm') {
          const wasm = backend as BackendWasm;
          const simd = simdKernels(wasm);
          grads.forEach((g, i) => {
            const s = simd != null ? simd.sumSquares(g, tf.util.sizeFromShape(g.shape)) : sumSquaresLoop(wasm.typedArrayFromHeap(g) as Float32Array, 'float32');
            total = i === 0 ? s : f32(total + s);
          });
          const out = wasm.makeOutput([], 'float32');
          (wasm.typedArrayFromHeap(out) as Float32Array)[0] = Math.sqrt(total);
          return out;
        }
        const cpu = backend as MathBackendCPU;
        grads.forEach((g, i) => {
          const s = sumSquaresLoop(cpu.data.get(g.dataId).values as Float32Array, 'float64');
          total = i === 0 ? s : f32(total + s);
        });
        return cpu.makeTensorInfo([], 'float32', new Float32Array([Math.sqrt(total)]));
      },
    });
  }
}

registerFor('wasm');
registerFor('cpu');

/** sqrt(Σ over tensors of Σ g²) as tfjs's sqrt(addN(grads.map(g => sum(square(g))))) computes it. */
export function globalNorm(grads: readonly tf.Tensor[]): number {
  if (grads.length === 0) return 0;
  for (const g of grads) {
    if (g.dtype !== 'float32') throw new Error(`train/adam globalNorm: gradients must be float32, got ${g.dtype}`);
  }
  const norm = tf.engine().runKernel(GLOBAL_NORM, { ...grads } as unknown as tf.NamedTensorMap) as tf.Tensor;
  try {
    return norm.dataSync()[0]!;
  } finally {
    norm.dispose();
  }
}

export class FusedAdam {
  private readonly b1: number;
  private readonly b2: number;
  private readonly c1: number;
  private readonly c2: number;
  private readonly eps: number;
  private nlr: number;
  /** b1^t and b2^t in float32, as tfjs's accBeta1/accBeta2 variables. */
  private acc1: number;
  private acc2: number;
  private readonly moments = new Map<tf.Variable, { m: tf.Tensor; v: tf.Tensor }>();

  constructor(learningRate: number, beta1 = 0.9, beta2 = 0.999) {
    this.b1 = f32(beta1);
    this.b2 = f32(beta2);
    this.c1 = f32(1 - beta1);
    this.c2 = f32(1 - beta2);
    this.eps = f32(tf.backend().epsilon());
    this.nlr = f32(-learningRate);
    this.acc1 = this.b1;
    this.acc2 = this.b2;
  }

  /** Change the rate for the following steps (schedules); a constant rate never calls this, so it stays bit-identical to tf.train.adam. */
  setLearningRate(learningRate: number): void {
    this.nlr = f32(-learningRate);
  }

  /** One step for every variable with its gradient, each gradient first multiplied by `scale`. */
  apply(updates: ReadonlyArray<{ variable: tf.Variable; grad: tf.Tensor }>, scale: number): void {
    const constants: AdamConstants = {
      scale: f32(scale),
      b1: this.b1,
      c1: this.c1,
      b2: this.b2,
      c2: this.c2,
      o1: f32(1 - this.acc1),
      o2: f32(1 - this.acc2),
      eps: this.eps,
      nlr: this.nlr,
    };
    for (const { variable, grad } of updates) {
      let moment = this.moments.get(variable);
      if (moment == null) {
        moment = { m: tf.keep(tf.zerosLike(variable)), v: tf.keep(tf.zerosLike(variable)) };
        this.moments.set(variable, moment);
      }
      const [value, m, v] = tf.engine().runKernel(ADAM_STEP, { value: variable, grad, m: moment.m, v: moment.v }, constants as unknown as tf.NamedAttrMap) as tf.Tensor[];
      moment.m.dispose();
      moment.v.dispose();
      moment.m = tf.keep(m!);
      moment.v = tf.keep(v!);
      variable.assign(value!);
      value!.dispose();
    }
    this.acc1 = f32(this.acc1 * this.b1);
    this.acc2 = f32(this.acc2 * this.b2);
  }

  dispose(): void {
    for (const { m, v } of this.moments.values()) {
      m.dispose();
      v.dispose();
    }
    this.moments.clear();
  }
}
