/**
 * Scoring a trained network on one large graph (a graph-file rung): the same
 * inputs, step rule and metrics as `evaluateSet`, with the forward pass run in
 * edge chunks (src/model/chunked-forward.ts) so memory stays bounded at up to
 * 100,000 nodes and 1,000,000 edges.
 */
import type { TaskInstance } from '../tasks/types.ts';
import type { MessagePassingNetwork } from '../model/network.ts';
import { chunkedPredict } from '../model/chunked-forward.ts';
import { stepsFor } from '../model/steps.ts';
import { makeBatch, type FeatureTransforms } from './batch.ts';
import { scorePredictions, type SetEvaluation } from './evaluate.ts';

export function evaluateLarge(network: MessagePassingNetwork, instance: TaskInstance, transforms: FeatureTransforms, edgesPerChunk?: number): SetEvaluation {
  const batch = makeBatch([instance], transforms);
  const rule = network.options.steps;
  const prediction = chunkedPredict(network, batch, {
    steps: stepsFor(rule, batch.maxNodes),
    stopTolerance: rule.rule === 'until-stable' ? rule.tolerance : undefined,
    edgesPerChunk,
  });
  return { metrics: scorePredictions([instance], [prediction]), predictions: [prediction] };
}
