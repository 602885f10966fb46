/**
 * Forward-only scoring of a trained network on a set of graphs. Graphs are
 * batched by disjoint union in chunks; each chunk gets the step count the rule
 * gives for its largest graph (sets on a ladder rung share one size).
 */
import * as tf from '@tensorflow/tfjs-core';
import type { TaskInstance } from '../tasks/types.ts';
import type { MessagePassingNetwork } from '../model/network.ts';
import { stepsFor } from '../model/steps.ts';
import { makeBatch, type FeatureTransforms } from './batch.ts';
import { uploadBatch } from './tensors.ts';
import { MetricAccumulator, type Metrics } from './metrics.ts';

export interface EvaluateOptions {
  /** Multiply every raw input by this before transforms (scale probes, homogeneity audit). */
  inputScale?: number;
  /** Graphs per forward pass. */
  chunk?: number;
  /** Override the step rule. */
  steps?: number;
}

export interface SetEvaluation {
  metrics: Metrics;
  /** Per instance, per node prediction. */
  predictions: Float32Array[];
}

export function predict(network: MessagePassingNetwork, instances: readonly TaskInstance[], transforms: FeatureTransforms, options: EvaluateOptions = {}): Float32Array[] {
  const chunk = options.chunk ?? 16;
  const out: Float32Array[] = [];
  for (let start = 0; start < instances.length; start += chunk) {
    const part = instances.slice(start, start + chunk);
    const batch = makeBatch(part, transforms, { inputScale: options.inputScale });
    const rule = network.options.steps;
    const steps = options.steps ?? stepsFor(rule, batch.maxNodes);
    const tensors = uploadBatch(batch);
    let values: Float32Array;
    try {
      // Return the tensor, not its TypedArray: tidy walks returned containers element by element.
      const prediction = tf.tidy(
        () =>
          network.forward(tensors, {
            steps,
            stopTolerance: rule.rule === 'until-stable' && options.steps === undefined ? rule.tolerance : undefined,
            releaseSteps: true,
          }).prediction,
      );
      values = prediction.dataSync() as Float32Array;
      prediction.dispose();
    } finally {
      tensors.dispose();
    }
    let offset = 0;
    for (const inst of part) {
      out.push(values.slice(offset, offset + inst.nodes));
      offset += inst.nodes;
    }
  }
  return out;
}

export function scorePredictions(instances: readonly TaskInstance[], predictions: readonly Float32Array[], targetScale = 1): Metrics {
  const acc = new MetricAccumulator();
  instances.forEach((inst, g) => {
    const pred = predictions[g]!;
    for (let i = 0; i < inst.nodes; i++) {
      if (inst.mask[i]) acc.add(pred[i]!, inst.target[i]! * targetScale);
    }
  });
  return acc.result();
}

export function evaluateSet(network: MessagePassingNetwork, instances: readonly TaskInstance[], transforms: FeatureTransforms, options: EvaluateOptions = {}): SetEvaluation {
  const predictions = predict(network, instances, transforms, options);
  return { metrics: scorePredictions(instances, predictions), predictions };
}
