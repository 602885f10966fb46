import * as tf from '@tensorflow/tfjs-core';

export type LossName = 'huber' | 'mse';

/** The loss of each entry of prediction − target. */
function entryLoss(diff: tf.Tensor, kind: LossName): tf.Tensor {
  if (kind === 'mse') return tf.square(diff);
  // Huber with δ = 1: ½d² inside, |d| − ½ outside; written with min so it stays smooth and branch-free.
  const absDiff = tf.abs(diff);
  const quadratic = tf.minimum(absDiff, 1);
  return tf.add(tf.mul(tf.square(quadratic), 0.5), tf.sub(absDiff, quadratic));
}

/** Masked mean loss over nodes; excluded nodes (mask 0) contribute nothing. */
export function maskedLoss(prediction: tf.Tensor2D, target: tf.Tensor2D, mask: tf.Tensor2D, kind: LossName): tf.Scalar {
  const perNode = entryLoss(tf.sub(prediction, target), kind);
  const total = tf.sum(tf.mul(perNode, mask));
  return tf.div(total, tf.maximum(tf.sum(mask), 1)) as tf.Scalar;
}

/**
 * Step-wise supervision: the mean over steps k = 1..K of the masked mean loss
 * between `trace[k − 1]` (the decoded state after step k, [nodes, 1]) and column
 * k − 1 of `target` / `mask` ([nodes, ≥ K]; extra columns, for steps a stopping
 * rule skipped, are ignored). A step whose mask is all 0 contributes 0 to the mean.
 */
export function stepwiseLoss(trace: readonly tf.Tensor2D[], target: tf.Tensor2D, mask: tf.Tensor2D, kind: LossName): tf.Scalar {
  const steps = trace.length;
  if (steps === 0) return tf.scalar(0);
  const columns = target.shape[1];
  if (columns < steps || mask.shape[1] !== columns) {
    throw new Error(`train/loss: step targets cover ${columns} step(s) (mask ${mask.shape[1]}), the trace has ${steps}`);
  }
  const prediction = steps === 1 ? trace[0]! : tf.concat(trace as tf.Tensor2D[], 1);
  const t = columns === steps ? target : tf.slice(target, [0, 0], [-1, steps]);
  const m = columns === steps ? mask : tf.slice(mask, [0, 0], [-1, steps]);
  const perEntry = entryLoss(tf.sub(prediction, t), kind);
  const perStep = tf.div(tf.sum(tf.mul(perEntry, m), 0), tf.maximum(tf.sum(m, 0), 1));
  return tf.mean(perStep) as tf.Scalar;
}
