/**
 * Aggregators: how a node combines its incoming messages. Each is a small named
 * unit in one registry; its facts (hint, temperature, neutral element,
 * idempotence, homogeneity) are its record in catalogue.ts, read here, so adding
 * one is its implementation here, one catalogue record and its test.
 *
 * Equations (m_e: message on edge e, N(v): edges arriving at v, τ: temperature):
 *   sum         Σ_{e∈N(v)} m_e
 *   mean        (1/|N(v)|) Σ m_e
 *   max         max_e m_e                      (gradient to the single arg-max edge)
 *   min         min_e m_e
 *   smooth-max  τ · log Σ exp(m_e / τ)         (≥ max, ≤ max + τ·log|N(v)|)
 *   smooth-min  −τ · log Σ exp(−m_e / τ)
 * A node with no incoming messages receives 0 from every aggregator.
 *
 * `combine` is the same operation on two operands (state ⊕ message), used by
 * the "aggregate" update; there a node with no incoming messages keeps its state.
 */
import * as tf from '@tensorflow/tfjs-core';
import { aggregatorRecord, type AggregatorName } from './catalogue.ts';
import { gatherRows, segmentMax, segmentMean, segmentMin, segmentSum } from './ops.ts';

export interface AggregateInput {
  messages: tf.Tensor2D;
  dst: tf.Tensor1D;
  nodes: number;
  /** [nodes, 1] float: 1 where the node has at least one incoming message. */
  hasIncoming: tf.Tensor2D;
  temperature: number;
}

export interface Aggregator {
  name: AggregatorName;
  /** Whether a ⊕ a = a holds exactly (an audit expectation); from the catalogue record. */
  idempotent: boolean;
  /** Whether f(λx) = λ f(x) for λ > 0; from the catalogue record. */
  homogeneous: boolean;
  aggregate(input: AggregateInput): tf.Tensor2D;
  combine(a: tf.Tensor2D, b: tf.Tensor2D, temperature: number): tf.Tensor2D;
}

/**
 * τ·log Σ exp(x/τ) per segment, shifted by the segment max for stability. tfjs
 * has no stop-gradient, but none is needed: the result does not depend on the
 * shift, so the gradient through it cancels exactly (1 − Σ softmax = 0).
 */
function smoothMaxSegments(x: tf.Tensor2D, dst: tf.Tensor1D, nodes: number, hasIncoming: tf.Tensor2D, tau: number): tf.Tensor2D {
  const peak = segmentMax(x, dst, nodes);
  const shifted = tf.div(tf.sub(x, gatherRows(peak, dst)), tau);
  const total = segmentSum(tf.exp(shifted) as tf.Tensor2D, dst, nodes);
  // Empty segments sum to 0; log(0 + (1 - hasIncoming)) = 0 keeps them at 0 without a NaN.
  const safe = tf.add(total, tf.sub(1, hasIncoming));
  return tf.mul(tf.add(peak, tf.mul(tf.log(safe), tau)), hasIncoming) as tf.Tensor2D;
}

function smoothMaxPair(a: tf.Tensor2D, b: tf.Tensor2D, tau: number): tf.Tensor2D {
  const peak = tf.maximum(a, b);
  const s = tf.add(tf.exp(tf.div(tf.sub(a, peak), tau)), tf.exp(tf.div(tf.sub(b, peak), tau)));
  return tf.add(peak, tf.mul(tf.log(s), tau)) as tf.Tensor2D;
}

type Implementation = Pick<Aggregator, 'aggregate' | 'combine'>;

/** One registry entry: the implementation, with the facts read from the aggregator's catalogue record. */
function entry(name: AggregatorName, implementation: Implementation): Aggregator {
  const { idempotent, homogeneous } = aggregatorRecord(name);
  return { name, idempotent, homogeneous, ...implementation };
}

export const AGGREGATOR_REGISTRY: Record<AggregatorName, Aggregator> = {
  sum: entry('sum', {
    aggregate: ({ messages, dst, nodes }) => segmentSum(messages, dst, nodes),
    combine: (a, b) => tf.add(a, b),
  }),
  mean: entry('mean', {
    aggregate: ({ messages, dst, nodes }) => segmentMean(messages, dst, nodes),
    combine: (a, b) => tf.mul(tf.add(a, b), 0.5),
  }),
  max: entry('max', {
    aggregate: ({ messages, dst, nodes }) => segmentMax(messages, dst, nodes),
    combine: (a, b) => tf.maximum(a, b),
  }),
  min: entry('min', {
    aggregate: ({ messages, dst, nodes }) => segmentMin(messages, dst, nodes),
    combine: (a, b) => tf.minimum(a, b),
  }),
  'smooth-max': entry('smooth-max', {
    aggregate: ({ messages, dst, nodes, hasIncoming, temperature }) => smoothMaxSegments(messages, dst, nodes, hasIncoming, temperature),
    combine: (a, b, tau) => smoothMaxPair(a, b, tau),
  }),
  'smooth-min': entry('smooth-min', {
    aggregate: ({ messages, dst, nodes, hasIncoming, temperature }) =>
      tf.neg(smoothMaxSegments(tf.neg(messages), dst, nodes, hasIncoming, temperature)),
    combine: (a, b, tau) => tf.neg(smoothMaxPair(tf.neg(a), tf.neg(b), tau)),
  }),
};

export function getAggregator(name: AggregatorName): Aggregator {
  const found = AGGREGATOR_REGISTRY[name];
  if (!found) throw new Error(`model/aggregators: unknown aggregator "${String(name)}"; known: ${Object.keys(AGGREGATOR_REGISTRY).join(', ')}`);
  return found;
}
