/**
 * A trained network's weights as a worker hands them back: encoded with
 * TensorFlow.js's `tf.io.encodeWeights` (one flat float32 buffer and its
 * manifest entries, named by parameter). Kept apart from the saved-network
 * file format (saved-network.ts) so the workers load only tfjs for it.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { MessagePassingNetwork } from '../model/network.ts';
import type { FeatureTransforms } from '../train/batch.ts';

/** What a worker hands back when asked to keep a run's trained weights. */
export interface TrainedWeights {
  specs: tf.io.WeightsManifestEntry[];
  data: ArrayBuffer;
  transforms: FeatureTransforms;
}

/** Encode every parameter of a trained network (the caller still owns and disposes it). */
export async function encodeNetworkWeights(network: MessagePassingNetwork, transforms: FeatureTransforms): Promise<TrainedWeights> {
  const named: tf.NamedTensorMap = {};
  for (const [name, variable] of network.params.vars) named[name] = variable;
  const { data, specs } = await tf.io.encodeWeights(named);
  return { data, specs, transforms };
}
