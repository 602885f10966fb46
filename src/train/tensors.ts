import * as tf from '@tensorflow/tfjs-core';
import type { GraphBatch } from './batch.ts';
import type { NetworkInputs } from '../model/network.ts';

export interface BatchTensors extends NetworkInputs {
  target: tf.Tensor2D;
  mask: tf.Tensor2D;
  /** [nodes, steps] step-wise supervision targets and masks, when the batch carries them. */
  stepTarget?: tf.Tensor2D;
  stepMask?: tf.Tensor2D;
  dispose(): void;
}

/** Upload a batch; the caller disposes it. */
export function uploadBatch(batch: GraphBatch): BatchTensors {
  const nodeX = tf.tensor2d(batch.nodeX, [batch.nodes, batch.nodeFeatures], 'float32');
  const edgeX = tf.tensor2d(batch.edgeX, [batch.edges, batch.edgeFeatures], 'float32');
  const src = tf.tensor1d(batch.src, 'int32');
  const dst = tf.tensor1d(batch.dst, 'int32');
  const target = tf.tensor2d(batch.target, [batch.nodes, 1], 'float32');
  const mask = tf.tensor2d(batch.mask, [batch.nodes, 1], 'float32');
  const owned: tf.Tensor[] = [nodeX, edgeX, src, dst, target, mask];
  const tensors: BatchTensors = {
    nodeX,
    edgeX,
    src,
    dst,
    nodes: batch.nodes,
    target,
    mask,
    dispose() {
      for (const t of owned) t.dispose();
    },
  };
  const step = batch.stepTargets;
  if (step) {
    tensors.stepTarget = tf.tensor2d(step.target, [batch.nodes, step.steps], 'float32');
    tensors.stepMask = tf.tensor2d(step.mask, [batch.nodes, step.steps], 'float32');
    owned.push(tensors.stepTarget, tensors.stepMask);
  }
  return tensors;
}
