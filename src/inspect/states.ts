/**
 * The hidden states inspection reads, and the step plan it reads them at. Every
 * state comes from `MessagePassingNetwork.forward` itself, through its `onStep`
 * callback: there is one forward loop, and probes, the audit and the alignment
 * trace look at its states, never at a copy of it. Host-agnostic: no node: imports.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { MessagePassingNetwork, NetworkInputs } from '../model/network.ts';
import { stepsFor } from '../model/steps.ts';

// A type alias, not an interface, so tf.tidy accepts it as a tensor container.
export type ForwardStates = {
  /** x̂ = encode(nodeX): the encoded inputs, also the state h⁰ before step 1. */
  encoded: tf.Tensor2D;
  /** W_e ê (+ b) per edge, as the message function receives it. */
  edgeTerm: tf.Tensor2D;
  /** The mlp update's input term x̂·W_x (+ b), as every step receives it; absent for the other updates. */
  inputTerm?: tf.Tensor2D;
  /** Hidden states h⁰ (= encoded), h¹, …, hᵀ of the pass (T = stepsRun). */
  states: tf.Tensor2D[];
  /** The pass's own output, decode(hᵀ). */
  prediction: tf.Tensor2D;
  stepsRun: number;
};

/**
 * One `network.forward` pass with every hidden state recorded through its
 * `onStep` callback (each cloned, so it outlives the step). `encoded`,
 * `edgeTerm` and `inputTerm` are recomputed with the network's own methods
 * (the same ops on the same inputs as inside `forward`, so the same values).
 * Call inside `tf.tidy`; the returned tensors belong to the caller's scope.
 */
export function forwardStates(network: MessagePassingNetwork, inputs: NetworkInputs, steps: number, stopTolerance?: number): ForwardStates {
  const encoded = network.encode(inputs.nodeX);
  const edgeTerm = network.edgeTerm(inputs.edgeX);
  const inputTerm = network.stepConstants(encoded).inputTerm ?? undefined;
  const states: tf.Tensor2D[] = [encoded];
  const run = network.forward(inputs, { steps, stopTolerance, onStep: (_step, state) => states.push(tf.clone(state)) });
  return { encoded, edgeTerm, inputTerm, states, prediction: run.prediction, stepsRun: run.stepsRun };
}

/** The step count and stop tolerance `predict` would use for a graph of `maxNodes` nodes. */
export function stepPlan(network: MessagePassingNetwork, maxNodes: number): { steps: number; stopTolerance?: number } {
  const rule = network.options.steps;
  return { steps: stepsFor(rule, maxNodes), stopTolerance: rule.rule === 'until-stable' ? rule.tolerance : undefined };
}
