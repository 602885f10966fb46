import * as tf from '@tensorflow/tfjs-core';

export type LossName = 'huber' | 'mse';

/** Masked mean loss over nodes; excluded nodes (mask 0) contribute nothing. */
export function maskedLoss(prediction: tf.Tensor2D, target: tf.Tensor2D, mask: tf.Tensor2D, kind: LossName): tf.Scalar {
  const diff = tf.sub(prediction, target);
  let perNode: tf.Tensor;
  if (kind === 'mse') {
    perNode = tf.square(diff);
  } else {
    // Huber with δ = 1: ½d² inside, |d| − ½ outside; written with min so it stays smooth and branch-free.
    const absDiff = tf.abs(diff);
    const quadratic = tf.minimum(absDiff, 1);
    perNode = tf.add(tf.mul(tf.square(quadratic), 0.5), tf.sub(absDiff, quadratic));
  }
  const total = tf.sum(tf.mul(perNode, mask));
  return tf.div(total, tf.maximum(tf.sum(mask), 1)) as tf.Scalar;
}
