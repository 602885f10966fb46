/**
 * The encode–process–decode message-passing network.
 *
 *   encode   x̂_v = Dense(x_v)                     h⁰_v = x̂_v
 *   process  T steps with shared weights:
 *            message    m_e = message(h_src(e), h_dst(e), ê_e)
 *            aggregate  a_v = ⊕_{e: dst(e)=v} m_e
 *            update     h_v ← update(h_v, a_v, x̂_v)
 *   decode   y_v = Dense(h_v) → one number per node
 *
 * Message functions: "mlp"  m = Dense₂(act(W_s h_src + W_d h_dst + W_e ê + b))
 *   (the first layer is split per operand so node projections happen before the
 *   per-edge gather, which is cheaper than concatenating per edge);
 *   semiring kinds  m = gather(semiringDense(h, W), src) + W_e ê (+ b).
 * Updates: "mlp"  h + Dense₂(act([h, a]·[W_h; W_a] + u)), u = x̂·W_x + b computed once
 *   per forward pass like the edge term (it does not change across steps), with Dense₂
 *   starting at zero so every step starts as the identity (keeps untrained deep unrolls stable);
 *   "gated" a GRU cell with input [a, x̂]; "aggregate" h ⊕ a with the arm's aggregator.
 * With bias off every layer is bias-free and (with relu / leaky-relu, sum/mean/
 * max/min, hard semirings absent) the whole map is positively homogeneous.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { ModelOptions } from './options.ts';
import type { Rng } from '../util/rng.ts';
import { ParamStore } from './params.ts';
import { getAggregator, type Aggregator } from './aggregators.ts';
import { semiringDense, type SemiringKind } from './semiring.ts';
import { gatherPairAdd, gatherRows, segmentCounts } from './ops.ts';
import { fusedProcessApplies, runFusedProcess } from './fused-process.ts';

export interface NetworkInputs {
  nodeX: tf.Tensor2D;
  edgeX: tf.Tensor2D;
  src: tf.Tensor1D;
  dst: tf.Tensor1D;
  nodes: number;
}

export interface ForwardOptions {
  steps: number;
  /** Keep the decoded output after every step (alignment trace). */
  trace?: boolean;
  /** For until-stable: stop when max |Δh| < tolerance · (1 + max |h|). */
  stopTolerance?: number;
  /**
   * Forward-only use (no gradient): free each step's intermediates as soon as
   * the next state exists, so memory does not grow with the step count. The
   * same ops run, so results are unchanged.
   */
  releaseSteps?: boolean;
  /**
   * Called after every step t = 1..stepsRun with the new state hᵗ ([nodes, hidden]),
   * before the until-stable test and before any release. Inspection (probes, the
   * audit, the alignment trace) reads the hidden states through this, so they are
   * the states of this very loop. Ownership: the tensor belongs to `forward`; with
   * `releaseSteps` it is disposed during the next step. Read it, or compute from it,
   * during the call; to keep it longer, `tf.clone` it (the clone belongs to the
   * caller's tidy scope). Tensors the callback creates are tracked by the enclosing
   * scope, not released by `releaseSteps`. The callback must not dispose the state.
   */
  onStep?: (step: number, state: tf.Tensor2D) => void;
}

/** Per-node terms that do not change across message-passing steps (see `stepConstants`). */
export interface StepConstants {
  encoded: tf.Tensor2D;
  /** x̂·W_x (+ b) for the mlp update; null for the others. */
  inputTerm: tf.Tensor2D | null;
}

export interface ForwardResult {
  prediction: tf.Tensor2D;
  stepsRun: number;
  /** Decoded outputs after step 1..T (only with trace). */
  trace: tf.Tensor2D[];
}

const LEAKY_ALPHA = 0.01;

export class MessagePassingNetwork {
  readonly params: ParamStore;
  private readonly aggregator: Aggregator;

  constructor(
    readonly options: ModelOptions,
    readonly nodeFeatures: number,
    readonly edgeFeatures: number,
    rng: Rng,
  ) {
    this.params = new ParamStore(rng);
    this.aggregator = getAggregator(options.aggregator);
    const H = options.hidden;
    const p = this.params;
    const bias = options.bias;
    p.add('encode.w', [nodeFeatures, H], 'glorot');
    if (bias) p.add('encode.b', [H], 'zeros');
    if (options.message === 'mlp') {
      p.add('message.ws', [H, H], 'glorot');
      p.add('message.wd', [H, H], 'glorot');
      p.add('message.we', [edgeFeatures, H], 'glorot');
      if (bias) p.add('message.b', [H], 'zeros');
      p.add('message.w2', [H, H], 'glorot');
      if (bias) p.add('message.b2', [H], 'zeros');
    } else {
      p.add('message.semiring', [H, H], { uniform: [-0.5, 0.5] });
      p.add('message.we', [edgeFeatures, H], 'glorot');
      if (bias) p.add('message.b', [H], 'zeros');
    }
    if (options.update === 'mlp') {
      p.add('update.wh', [H, H], 'glorot');
      p.add('update.wa', [H, H], 'glorot');
      p.add('update.wx', [H, H], 'glorot');
      if (bias) p.add('update.b', [H], 'zeros');
      p.add('update.w2', [H, H], 'zeros');
      if (bias) p.add('update.b2', [H], 'zeros');
    } else if (options.update === 'gated') {
      p.add('update.wzr', [2 * H, 2 * H], 'glorot');
      p.add('update.uzr', [H, 2 * H], 'glorot');
      p.add('update.wc', [2 * H, H], 'glorot');
      p.add('update.uc', [H, H], 'glorot');
      if (bias) {
        p.add('update.bzr', [2 * H], 'zeros');
        p.add('update.bc', [H], 'zeros');
      }
    }
    p.add('decode.w', [H, 1], 'glorot');
    if (bias) p.add('decode.b', [1], 'zeros');
  }

  /** x·W (+ b) as one fused matmul (the bias rides in; the kernel sums each output from it). */
  private dense(x: tf.Tensor2D, w: string, b: string | null): tf.Tensor2D {
    const bias = b && this.params.has(b) ? this.params.get(b) : undefined;
    return tf.fused.matMul({ a: x, b: this.params.get(w) as tf.Tensor2D, bias }) as tf.Tensor2D;
  }

  private activate(x: tf.Tensor2D): tf.Tensor2D {
    return this.options.activation === 'relu' ? tf.relu(x) : tf.leakyRelu(x, LEAKY_ALPHA);
  }

  encode(nodeX: tf.Tensor2D): tf.Tensor2D {
    return this.dense(nodeX, 'encode.w', 'encode.b');
  }

  decode(h: tf.Tensor2D): tf.Tensor2D {
    return this.dense(h, 'decode.w', 'decode.b');
  }

  /** Weight concatenations used every step, built once per forward pass. */
  private joinedWeights(): { message: tf.Tensor2D | null; update: tf.Tensor2D | null } {
    const p = this.params;
    return {
      message: this.options.message === 'mlp' ? (tf.concat([p.get('message.ws'), p.get('message.wd')], 1) as tf.Tensor2D) : null,
      update: this.options.update === 'mlp' ? (tf.concat([p.get('update.wh'), p.get('update.wa')], 0) as tf.Tensor2D) : null,
    };
  }

  /** Messages for every edge given node states; `edgeTerm` is W_e ê (+ b), constant across steps. */
  message(h: tf.Tensor2D, edgeTerm: tf.Tensor2D, inputs: NetworkInputs, joined = this.joinedWeights().message): tf.Tensor2D {
    if (this.options.message === 'mlp') {
      const projected = tf.matMul(h, joined!) as tf.Tensor2D;
      const pre = gatherPairAdd(projected, inputs.src, inputs.dst, edgeTerm);
      return this.dense(this.activate(pre), 'message.w2', 'message.b2');
    }
    const senders = semiringDense(h, this.params.get('message.semiring') as tf.Tensor2D, this.options.message as SemiringKind, this.options.messageTemperature);
    return tf.add(gatherRows(senders, inputs.src), edgeTerm) as tf.Tensor2D;
  }

  edgeTerm(edgeX: tf.Tensor2D): tf.Tensor2D {
    return this.dense(edgeX, 'message.we', 'message.b');
  }

  /**
   * The node terms every step reads unchanged: x̂ and, for the mlp update, its input term
   * u = x̂·W_x (+ b). Computing u once per forward pass (its gradient then flows back once)
   * saves a third of the update's first-layer products at every step.
   */
  stepConstants(encoded: tf.Tensor2D): StepConstants {
    return { encoded, inputTerm: this.options.update === 'mlp' ? this.dense(encoded, 'update.wx', 'update.b') : null };
  }

  update(
    h: tf.Tensor2D,
    a: tf.Tensor2D,
    constants: StepConstants,
    hasIncoming: tf.Tensor2D,
    joinedWeight = this.joinedWeights().update,
  ): tf.Tensor2D {
    const H = this.options.hidden;
    switch (this.options.update) {
      case 'mlp': {
        // One concat and one matmul for the state and the aggregate: fewer, larger ops beat
        // per-operand matmuls here. The input term is an [N, H] addend (WASM's fused matmul
        // takes only a rank-1 bias), so the product, + u and the activation are three ops.
        if (constants.inputTerm == null) throw new Error('model/network: the mlp update needs its input term (stepConstants)');
        const pre = tf.add(tf.matMul(tf.concat([h, a], 1) as tf.Tensor2D, joinedWeight!), constants.inputTerm) as tf.Tensor2D;
        return tf.add(h, this.dense(this.activate(pre), 'update.w2', 'update.b2')) as tf.Tensor2D;
      }
      case 'gated': {
        const input = tf.concat([a, constants.encoded], 1) as tf.Tensor2D;
        let zr = tf.add(tf.matMul(input, this.params.get('update.wzr') as tf.Tensor2D), tf.matMul(h, this.params.get('update.uzr') as tf.Tensor2D));
        if (this.params.has('update.bzr')) zr = tf.add(zr, this.params.get('update.bzr'));
        const gates = tf.sigmoid(zr) as tf.Tensor2D;
        const [z, r] = tf.split(gates, [H, H], 1) as [tf.Tensor2D, tf.Tensor2D];
        let c = tf.add(tf.matMul(input, this.params.get('update.wc') as tf.Tensor2D), tf.matMul(tf.mul(r, h) as tf.Tensor2D, this.params.get('update.uc') as tf.Tensor2D));
        if (this.params.has('update.bc')) c = tf.add(c, this.params.get('update.bc'));
        const candidate = tf.tanh(c);
        return tf.add(tf.mul(tf.sub(1, z), h), tf.mul(z, candidate)) as tf.Tensor2D;
      }
      case 'aggregate': {
        const combined = this.aggregator.combine(h, a, this.options.aggregatorTemperature);
        // Nodes without incoming messages keep their state rather than combining with the empty-result 0.
        return tf.add(tf.mul(combined, hasIncoming), tf.mul(h, tf.sub(1, hasIncoming))) as tf.Tensor2D;
      }
    }
  }

  /** Run the network. Call inside tf.tidy (or a gradient function); returned tensors are not kept. */
  forward(inputs: NetworkInputs, options: ForwardOptions): ForwardResult {
    if (fusedProcessApplies(this.options, options, inputs.nodes, inputs.src.shape[0], options.steps)) return this.forwardFused(inputs, options.steps);
    const counts = segmentCounts(inputs.dst, inputs.nodes);
    const hasIncoming = tf.minimum(counts, 1) as tf.Tensor2D;
    const encoded = this.encode(inputs.nodeX);
    const edgeTerm = this.edgeTerm(inputs.edgeX);
    const constants = this.stepConstants(encoded);
    let h = encoded;
    const trace: tf.Tensor2D[] = [];
    let stepsRun = 0;
    const joined = this.joinedWeights();
    const step = (state: tf.Tensor2D): tf.Tensor2D => {
      const m = this.message(state, edgeTerm, inputs, joined.message);
      const a = this.aggregator.aggregate({ messages: m, dst: inputs.dst, nodes: inputs.nodes, hasIncoming, temperature: this.options.aggregatorTemperature });
      return this.update(state, a, constants, hasIncoming, joined.update);
    };
    for (let t = 0; t < options.steps; t++) {
      const previous = h;
      const next = options.releaseSteps ? tf.tidy(() => step(previous)) : step(previous);
      stepsRun++;
      if (options.trace) trace.push(this.decode(next));
      options.onStep?.(stepsRun, next);
      let stable = false;
      if (options.stopTolerance !== undefined) {
        const [change, size] = tf.tidy(() => [tf.max(tf.abs(tf.sub(next, previous))).dataSync()[0]!, tf.max(tf.abs(next)).dataSync()[0]!]);
        stable = change! < options.stopTolerance * (1 + size!);
      }
      // The previous state is no longer needed (the trace keeps decoded copies, not states).
      if (options.releaseSteps && previous !== encoded) previous.dispose();
      h = next;
      if (stable) break;
    }
    return { prediction: this.decode(h), stepsRun, trace };
  }

  /** The same map as `forward`'s loop, bit for bit, as one fused kernel each way (src/engine/kernels-process.ts). */
  private forwardFused(inputs: NetworkInputs, steps: number): ForwardResult {
    const p = this.params;
    const optional = (name: string) => (p.has(name) ? p.get(name) : undefined);
    const joined = this.joinedWeights();
    const encoded = this.encode(inputs.nodeX);
    const edgeTerm = this.edgeTerm(inputs.edgeX);
    const h = runFusedProcess(this.options, {
      encoded,
      edgeTerm,
      inputTerm: this.stepConstants(encoded).inputTerm!,
      src: inputs.src,
      dst: inputs.dst,
      jm: joined.message ?? undefined,
      w2m: optional('message.w2') as tf.Tensor2D | undefined,
      b2m: optional('message.b2'),
      ws: optional('message.semiring') as tf.Tensor2D | undefined,
      ju: joined.update!,
      w2u: p.get('update.w2') as tf.Tensor2D,
      b2u: optional('update.b2'),
    }, steps);
    return { prediction: this.decode(h), stepsRun: steps, trace: [] };
  }

  dispose(): void {
    this.params.dispose();
  }
}
