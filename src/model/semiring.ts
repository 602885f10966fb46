/**
 * Dense layers over tropical semirings, y_j = ⊕_k (x_k ⊗ W_kj) with ⊗ = +:
 *   min-plus         y_j = min_k (x_k + W_kj)
 *   max-plus         y_j = max_k (x_k + W_kj)
 *   smooth-min-plus  y_j = −τ · log Σ_k exp(−(x_k + W_kj) / τ)
 *   smooth-max-plus  y_j =  τ · log Σ_k exp( (x_k + W_kj) / τ)
 * The hard versions pass gradient only to the winning k of each output (a
 * sub-gradient of min/max), so most weights get no signal on a given input; the
 * smooth versions spread it by softmax weights at the cost of a bias of at most
 * τ·log K away from the hard value.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { MessageName } from './catalogue.ts';

/** The semiring message kinds (every message kind in the catalogue but the MLP). */
export type SemiringKind = Exclude<MessageName, 'mlp'>;

/** x: [n, K], w: [K, J] -> [n, J]. */
export function semiringDense(x: tf.Tensor2D, w: tf.Tensor2D, kind: SemiringKind, temperature = 1): tf.Tensor2D {
  const [n, k] = x.shape;
  const j = w.shape[1];
  if (w.shape[0] !== k) throw new Error(`model/semiring: input width ${k} does not match weight rows ${w.shape[0]}`);
  // [n, K, 1] + [1, K, J] -> [n, K, J]
  const sums = tf.add(tf.reshape(x, [n, k, 1]), tf.reshape(w, [1, k, j])) as tf.Tensor3D;
  switch (kind) {
    case 'min-plus':
      return tf.min(sums, 1) as tf.Tensor2D;
    case 'max-plus':
      return tf.max(sums, 1) as tf.Tensor2D;
    case 'smooth-max-plus':
      return tf.mul(tf.logSumExp(tf.div(sums, temperature), 1), temperature) as tf.Tensor2D;
    case 'smooth-min-plus':
      return tf.mul(tf.logSumExp(tf.div(sums, -temperature), 1), -temperature) as tf.Tensor2D;
  }
}
