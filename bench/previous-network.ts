/**
 * The network as engine 0.2.0 composed it, for the bench's "previous path":
 * the mlp update's input term inside every step's product,
 * act([h, a, x̂]·[W_h; W_a; W_x] + b) with the bias (and a relu) fused into
 * that one matmul, the stock tfjs composition that the fused process kernels
 * and the once-per-pass input term (engine 0.3.0) replaced. Timing only: its
 * float32 rounding is engine 0.2.0's, not this engine's, so it trains a
 * network that differs in the last bits; the batches, step counts and shapes
 * are the same. Run it with the fused kernels off (it has no input term to
 * hand them).
 */
import * as tf from '@tensorflow/tfjs-core';
import { MessagePassingNetwork, type StepConstants } from '../src/model/network.ts';

const LEAKY_ALPHA = 0.01;

export class PreviousEngineNetwork extends MessagePassingNetwork {
  /** [W_h; W_a; W_x] per forward pass, keyed by that pass's [W_h; W_a] (built once per pass, as engine 0.2.0 built its concat). */
  private readonly joinedWithInput = new WeakMap<tf.Tensor, tf.Tensor2D>();

  override stepConstants(encoded: tf.Tensor2D): StepConstants {
    return { encoded, inputTerm: null };
  }

  override update(h: tf.Tensor2D, a: tf.Tensor2D, constants: StepConstants, hasIncoming: tf.Tensor2D, joinedWeight?: tf.Tensor2D | null): tf.Tensor2D {
    if (this.options.update !== 'mlp' || joinedWeight == null) return super.update(h, a, constants, hasIncoming, joinedWeight);
    const p = this.params;
    let w = this.joinedWithInput.get(joinedWeight);
    if (w == null || w.isDisposed) {
      w = tf.concat([joinedWeight, p.get('update.wx')], 0) as tf.Tensor2D;
      this.joinedWithInput.set(joinedWeight, w);
    }
    const fuseRelu = this.options.activation === 'relu';
    const bias = p.has('update.b') ? p.get('update.b') : undefined;
    let hidden = tf.fused.matMul({ a: tf.concat([h, a, constants.encoded], 1) as tf.Tensor2D, b: w, bias, activation: fuseRelu ? 'relu' : 'linear' }) as tf.Tensor2D;
    if (!fuseRelu) hidden = tf.leakyRelu(hidden, LEAKY_ALPHA) as tf.Tensor2D;
    const out = tf.fused.matMul({ a: hidden, b: p.get('update.w2') as tf.Tensor2D, bias: p.has('update.b2') ? p.get('update.b2') : undefined }) as tf.Tensor2D;
    return tf.add(h, out) as tf.Tensor2D;
  }
}
