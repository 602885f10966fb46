/**
 * Message probe: a leaf fed by one settled sender, sweeping the edge weight far
 * past training (tasks whose edge input is a weight: shortest-path,
 * widest-path). See `messageProbe`. The sender's state comes from the
 * network's own forward pass (`forwardStates`). Host-agnostic: no node: imports.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { ExperimentSpec } from '../experiment/spec.ts';
import type { MessagePassingNetwork, NetworkInputs } from '../model/network.ts';
import { getAggregator } from '../model/aggregators.ts';
import { applyTransform } from '../model/transforms.ts';
import { makeBatch, type FeatureTransforms } from '../train/batch.ts';
import { uploadBatch } from '../train/tensors.ts';
import { getTask } from '../tasks/registry.ts';
import type { TaskInstance } from '../tasks/types.ts';
import type { Probe } from './probe.ts';
import { forwardStates, stepPlan } from './states.ts';

const WHERE = 'inspect/message-probe';

/** The relation the aligned algorithm uses when one sender relaxes an unreached receiver. */
const MESSAGE_RELATIONS: Record<string, { relation: string; truth: (sender: number, weight: number) => number }> = {
  'shortest-path': { relation: 'd_s + w (Bellman-Ford: min(∞, d_s + w))', truth: (d, w) => d + w },
  'widest-path': { relation: 'min(b_s, w) (max-min relaxation: max(−∞, min(b_s, w)))', truth: (b, w) => Math.min(b, w) },
};

export interface MessageProbeOptions {
  /** Graphs whose states give the typical sender and receiver (validation graphs). */
  validation: readonly TaskInstance[];
  /** Number of weights from 0 to `reach` × the largest training weight. */
  points?: number;
  reach?: number;
  /**
   * How many steps the receiver gets the message: default the network's own
   * step count on the validation graphs (its readout at the end of a run);
   * 1 gives a single incremental step.
   */
  deliveries?: number;
}

/**
 * Message-function probe: what one message does, far outside the trained
 * weights. What is plotted, exactly:
 *
 *   sender state    h_s = mean, over the counted nodes of the validation
 *                   graphs, of the network's final state (after its own step
 *                   count): a typical *reached* node, held fixed. Its value in
 *                   the network's own reading is d_s = decode(h_s) (= the
 *                   mean prediction, since decode is affine).
 *   receiver state  starts at h⁰_r = mean encoded state encode(x) over
 *                   counted non-source nodes: a typical node *not reached
 *                   yet*; x̂_r = that same encoding is its encoded input.
 *   readout         the receiver's only incoming message comes from the
 *                   sender over an edge of raw weight w (ê(w) = the arm's
 *                   edge transform); for T steps (`deliveries`, default the
 *                   step count the network uses on the validation graphs)
 *                   h_r ← update(h_r, m(h_s, h_r, ê(w)), x̂_r); the aggregate
 *                   of one message is that message for every aggregator.
 *                   y(w) = decode(h_r) after the T steps: the value the network
 *                   settles on for a leaf hanging off a settled node.
 *   truth           the aligned algorithm's answer for the same leaf: d_s + w
 *                   for shortest paths (Bellman-Ford relaxes once and keeps
 *                   it), min(d_s, w) for widest paths.
 *
 * Using the network's own d_s isolates the message and update functions from
 * how accurate the states are. Repeating the delivery lets a network that
 * moves its states a little per step (a residual MLP update) arrive where it
 * would in a real run; an aligned network gets there in one step and stays.
 * The sweep runs w from 0 to `reach` (10) × the largest training weight; a
 * ReLU MLP is piecewise linear, so past its last kink it continues on a
 * straight line with whatever slope it ended on.
 */
export function messageProbe(network: MessagePassingNetwork, transforms: FeatureTransforms, spec: ExperimentSpec, options: MessageProbeOptions): Probe {
  const { validation, points: count = 21, reach = 10 } = options;
  const task = getTask(spec.task);
  const [wLo, wHi] = spec.train.weightRange;
  const relation = MESSAGE_RELATIONS[task.id];
  const insts = validation.slice(0, 16);
  const batch = insts.length ? makeBatch(insts, transforms) : null;
  const plan = stepPlan(network, batch?.maxNodes ?? spec.train.sizes[1]);
  const deliveries = options.deliveries ?? plan.steps;
  const probe: Probe = {
    kind: 'message',
    title: 'Message function (a leaf fed by a settled sender)',
    xLabel: 'edge weight w (raw, before the edge transform)',
    yLabel: `receiver readout after ${deliveries} step(s) of the one message`,
    xScale: 'linear',
    trainingRange: [wLo, wHi],
    points: [],
    note:
      `y(w) = decode(h_r) after ${deliveries} step(s) of h_r ← update(h_r, m(h_s, h_r, ê(w)), x̂_r): a typical reached sender ` +
      '(mean final state over counted validation nodes, held fixed; value d_s = decode(h_s)) feeds a receiver that starts as a typical unreached node ' +
      `(mean encoded state of counted non-source nodes) over one edge of weight w; truth = ${relation?.relation ?? 'n/a'}, with the network's own d_s.`,
  };
  if (!relation) {
    probe.unavailable = `task '${task.id}' has no edge weight to sweep with a one-message relation (probe defined for ${Object.keys(MESSAGE_RELATIONS).join(', ')})`;
    return probe;
  }
  if (!batch) throw new Error(`${WHERE}: messageProbe needs validation graphs`);
  const H = network.options.hidden;
  const weights = Array.from({ length: count }, (_, i) => (reach * wHi * i) / (count - 1));
  const tensors = uploadBatch(batch);
  const counted = Float32Array.from(batch.mask);
  // Receivers: counted nodes other than each graph's source (not reached at round 0).
  const receivers = new Float32Array(batch.nodes);
  let offset = 0;
  for (const inst of insts) {
    for (let i = 0; i < inst.nodes; i++) receivers[offset + i] = inst.mask[i] && i !== inst.source ? 1 : 0;
    offset += inst.nodes;
  }
  let senderValue: number;
  let readout: number[];
  try {
    const out = tf.tidy(() => {
      const run = forwardStates(network, tensors, plan.steps, plan.stopTolerance);
      const hT = run.states[run.states.length - 1]!;
      const meanRows = (x: tf.Tensor2D, weight: Float32Array) => {
        const w = tf.tensor2d(weight, [weight.length, 1]);
        return tf.div(tf.sum(tf.mul(x, w), 0, true), Math.max(weight.reduce((a, b) => a + b, 0), 1)) as tf.Tensor2D;
      };
      const hs = meanRows(hT, counted);
      const hr0 = meanRows(run.encoded, receivers.some((x) => x) ? receivers : counted);
      const K = weights.length;
      // K disjoint pairs: node 2k is the sender, node 2k+1 the receiver, edge 2k -> 2k+1 carries weight w_k.
      const senders = tf.tile(hs, [K, 1]) as tf.Tensor2D;
      const interleave = (a: tf.Tensor2D, b: tf.Tensor2D) => tf.reshape(tf.concat([a, b], 1), [2 * K, H]) as tf.Tensor2D;
      const edgeRows = weights.map((w) => transforms.edge.map((name, j) => applyTransform(name, w, transforms.edgeStats[j])));
      const edgeX = tf.tensor2d(edgeRows.flat(), [K, transforms.edge.length]);
      const src = tf.tensor1d(Int32Array.from({ length: K }, (_, k) => 2 * k), 'int32');
      const dst = tf.tensor1d(Int32Array.from({ length: K }, (_, k) => 2 * k + 1), 'int32');
      const inputs: NetworkInputs = { nodeX: tf.zeros([2 * K, batch.nodeFeatures]) as tf.Tensor2D, edgeX, src, dst, nodes: 2 * K };
      const hasIncoming = tf.tensor2d(Float32Array.from({ length: 2 * K }, (_, v) => v % 2), [2 * K, 1]);
      const edgeTerm = network.edgeTerm(edgeX);
      const agg = getAggregator(network.options.aggregator);
      const receiverStart = tf.tile(hr0, [K, 1]) as tf.Tensor2D;
      // The encoded input x̂ of each receiver is its starting encoding; the sender rows' x̂ is never read.
      const constants = network.stepConstants(interleave(senders, receiverStart));
      let receiver = receiverStart;
      for (let t = 0; t < deliveries; t++) {
        const h = interleave(senders, receiver);
        const m = network.message(h, edgeTerm, inputs);
        const a = agg.aggregate({ messages: m, dst, nodes: 2 * K, hasIncoming, temperature: network.options.aggregatorTemperature });
        const next = network.update(h, a, constants, hasIncoming);
        receiver = tf.slice(tf.reshape(next, [K, 2 * H]), [0, H], [K, H]) as tf.Tensor2D;
      }
      return { sender: network.decode(hs).dataSync()[0]!, y: Array.from(network.decode(receiver).dataSync()) };
    });
    senderValue = out.sender;
    readout = out.y;
  } finally {
    tensors.dispose();
  }
  probe.points = weights.map((w, k) => {
    const truth = relation.truth(senderValue, w);
    return { x: w, predicted: readout[k]!, truth, mae: Math.abs(readout[k]! - truth) };
  });
  let exactSum = 0;
  let exactCount = 0;
  insts.forEach((inst) => inst.target.forEach((t, i) => inst.mask[i] && ((exactSum += t), exactCount++)));
  probe.details = { senderDecoded: senderValue, senderExactMean: exactCount ? exactSum / exactCount : NaN, deliveries, weightMax: reach * wHi };
  return probe;
}
