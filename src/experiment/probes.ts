/**
 * Probes: the learned function against exact truth, as curves a plot can draw,
 * each with the range seen in training so the plot can shade it.
 *
 *   scale    every value-carrying input (edge weights, durations, distances:
 *            whatever `buildInstance`'s weightScale scales for the task) × λ on
 *            fixed graphs, λ from 0.01 to 100; mean prediction and mean truth
 *            over counted nodes, plus the MAE.
 *   length   path graphs of growing length with unit weights, source at one
 *            end; prediction and truth at the far end (tasks that accept 'path').
 *   message  a leaf fed by one settled sender, sweeping the edge weight far
 *            past training (tasks whose edge input is a weight:
 *            shortest-path, widest-path). See `messageProbe`.
 *
 * `probeRun` bundles the probes, the algebraic audit and the alignment trace
 * for one trained network; `probeDocument` trains the arms in-process and
 * returns everything as plain JSON (non-finite numbers become null in JSON).
 * Host-agnostic: no node: imports; the caller initialises the tfjs backend.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { ExperimentSpec, ModelOptions } from './spec.ts';
import { armModel } from './spec.ts';
import type { MessagePassingNetwork, NetworkInputs } from '../model/network.ts';
import { getAggregator } from '../model/aggregators.ts';
import { applyTransform } from '../model/transforms.ts';
import { makeBatch, type FeatureTransforms } from '../train/batch.ts';
import { uploadBatch } from '../train/tensors.ts';
import { predict, scorePredictions } from '../train/evaluate.ts';
import type { Metrics } from '../train/metrics.ts';
import type { TrainProgress } from '../train/trainer.ts';
import { buildInstance } from '../tasks/sample.ts';
import { getTask } from '../tasks/registry.ts';
import type { TaskInstance } from '../tasks/types.ts';
import { Rng } from '../util/rng.ts';
import { executeRun, type RunStatus } from './run.ts';
import type { SeedData } from './datasets.ts';
import { specHash } from './results.ts';
import { auditAggregator, auditNetwork, type AuditRow } from './audit.ts';
import { alignmentTrace, forwardStates, stepPlan, traceGraph, type AlignmentTrace } from './trace.ts';

const WHERE = 'experiment/probes';

export type ProbeKind = 'scale' | 'length' | 'message';

export interface ProbePoint {
  x: number;
  predicted: number;
  truth: number;
  /** Mean absolute error over the counted nodes behind this point (scale probe), else |predicted − truth|. */
  mae: number;
}

export interface Probe {
  kind: ProbeKind;
  title: string;
  xLabel: string;
  yLabel: string;
  /** How to draw x. */
  xScale: 'log' | 'linear';
  /** The x interval seen in training (shade it); a zero-width interval is a single trained value. */
  trainingRange: [number, number];
  points: ProbePoint[];
  /** Exactly what is plotted, and against which relation. */
  note: string;
  /** Set (with no points) when the probe does not apply to this task. */
  unavailable?: string;
  /** Extra numbers behind the curve (e.g. the typical sender value of the message probe). */
  details?: Record<string, number | string>;
}

function meanOf(values: readonly number[]): number {
  return values.length ? values.reduce((a, b) => a + b, 0) / values.length : NaN;
}

/** 13 log-spaced scales from 0.01 to 100 (λ = 1 included exactly). */
export const DEFAULT_SCALES: readonly number[] = Array.from({ length: 13 }, (_, i) => Number((10 ** (-2 + i / 3)).toPrecision(6)));
export const DEFAULT_LENGTHS: readonly number[] = [4, 6, 8, 12, 16, 24, 32, 48, 64];

export interface ScaleProbeOptions {
  /** Seed of the probe's own graph stream (the run's seed). */
  seed?: number;
  graphs?: number;
  scales?: readonly number[];
}

/**
 * Scale sweep. Fixed graphs (training family and sizes, drawn from the seed's
 * `probe:scale` stream) are rebuilt with `buildInstance(..., { weightScale: λ })`
 * for each λ, so only the values change; the task decides who scales (graph
 * weights or its own draws). Per λ: mean prediction and mean exact target over
 * counted nodes, and the MAE. Training saw λ = 1 only; for homogeneous tasks
 * (shortest path, widest path, earliest finish) the truth grows linearly in λ.
 */
export function scaleProbe(network: MessagePassingNetwork, transforms: FeatureTransforms, spec: ExperimentSpec, options: ScaleProbeOptions = {}): Probe {
  const { seed = spec.seeds.base, graphs = 8, scales = DEFAULT_SCALES } = options;
  const base = new Rng(seed).fork('probe:scale');
  const [lo, hi] = spec.train.sizes;
  const sizes = Array.from({ length: graphs }, (_, i) => base.fork(`size:${i}`).int(lo, hi));
  const points: ProbePoint[] = [];
  for (const lambda of scales) {
    const instances = sizes.map(
      (n, i) => buildInstance(spec.task, spec.train.family, n, base.fork(i), { weightRange: spec.train.weightRange, weightScale: lambda, params: spec.train.familyParams }).instance,
    );
    const predictions = predict(network, instances, transforms, { chunk: graphs });
    const pred: number[] = [];
    const truth: number[] = [];
    instances.forEach((inst, g) => {
      for (let i = 0; i < inst.nodes; i++) {
        if (!inst.mask[i]) continue;
        pred.push(predictions[g]![i]!);
        truth.push(inst.target[i]!);
      }
    });
    points.push({ x: lambda, predicted: meanOf(pred), truth: meanOf(truth), mae: scorePredictions(instances, predictions).mae });
  }
  const task = getTask(spec.task);
  return {
    kind: 'scale',
    title: 'Scale sweep',
    xLabel: 'scale λ applied to the value-carrying inputs',
    yLabel: 'mean over counted nodes',
    xScale: 'log',
    trainingRange: [1, 1],
    points,
    note:
      `${graphs} fixed ${spec.train.family} graphs of ${lo}–${hi} nodes rebuilt at each λ (task '${task.id}' scales ${task.scaleShift === 'task' ? 'the values it draws itself' : 'the graph weights'}); ` +
      'predicted = mean prediction over counted nodes, truth = mean exact target over the same nodes, mae = mean |prediction − target|. Training saw λ = 1 only.',
  };
}

export interface LengthProbeOptions {
  lengths?: readonly number[];
  /** Training instances: their `depth` (rounds the exact algorithm needs) gives the trained hop range. */
  train?: readonly TaskInstance[];
}

/** Breadth-first hop counts from `source` over the instance's message edges (Infinity when unreachable). */
function hopsFrom(inst: TaskInstance, source: number): number[] {
  const hops = new Array<number>(inst.nodes).fill(Infinity);
  const out: number[][] = Array.from({ length: inst.nodes }, () => []);
  inst.messageSrc.forEach((u, e) => out[u]!.push(inst.messageDst[e]!));
  hops[source] = 0;
  let frontier = [source];
  while (frontier.length) {
    const next: number[] = [];
    for (const u of frontier) for (const v of out[u]!) if (hops[v] === Infinity) (hops[v] = hops[u]! + 1), next.push(v);
    frontier = next;
  }
  return hops;
}

/**
 * Length sweep. Path graphs 0-1-…-(n−1) with unit weights (weightRange [1, 1])
 * and the source fixed at node 0; the point is the node farthest from the
 * source (by hops, counted nodes only): prediction vs exact target there. x is
 * that hop distance (n − 1); the trained range is the span of `depth` (rounds
 * the exact algorithm needs) over the training graphs, which is what "size"
 * really shifted. The network gets its own step rule for each path length.
 */
export function lengthProbe(network: MessagePassingNetwork, transforms: FeatureTransforms, spec: ExperimentSpec, options: LengthProbeOptions = {}): Probe {
  const { lengths = DEFAULT_LENGTHS, train } = options;
  const task = getTask(spec.task);
  let trainingRange: [number, number];
  let rangeNote: string;
  if (train && train.length) {
    const depths = train.map((t) => t.depth);
    trainingRange = [Math.min(...depths), Math.max(...depths)];
    rangeNote = `trained range = min..max depth (rounds the exact algorithm needs) over the ${train.length} training graphs`;
  } else {
    trainingRange = [1, Math.max(1, spec.train.sizes[1] - 1)];
    rangeNote = 'trained range = the largest hop depth a training graph could have (n_max − 1); training graphs not given';
  }
  const probe: Probe = {
    kind: 'length',
    title: 'Length sweep (path graphs)',
    xLabel: 'hops from the source to the far end (path of hops + 1 nodes)',
    yLabel: 'value at the far end',
    xScale: 'linear',
    trainingRange,
    points: [],
    note: `path graphs with unit weights, source at node 0; predicted and exact target at the counted node farthest from the source; ${rangeNote}.`,
  };
  if (!task.families.includes('path')) {
    probe.unavailable = `task '${task.id}' does not accept the 'path' family (allowed: ${task.families.join(', ')})`;
    return probe;
  }
  const rng = new Rng(spec.seeds.base).fork('probe:length');
  for (const n of lengths) {
    const { instance } = buildInstance(task.id, 'path', n, rng.fork(n), { weightRange: [1, 1], source: 0 });
    const source = instance.source ?? 0;
    const hops = hopsFrom(instance, source);
    let far = -1;
    for (let i = 0; i < instance.nodes; i++) {
      if (!instance.mask[i] || !Number.isFinite(hops[i]!)) continue;
      if (far < 0 || hops[i]! >= hops[far]!) far = i;
    }
    if (far < 0) continue;
    const [prediction] = predict(network, [instance], transforms);
    const predicted = prediction![far]!;
    const truth = instance.target[far]!;
    probe.points.push({ x: hops[far]!, predicted, truth, mae: Math.abs(predicted - truth) });
  }
  return probe;
}

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
      const encoded = interleave(senders, receiverStart);
      let receiver = receiverStart;
      for (let t = 0; t < deliveries; t++) {
        const h = interleave(senders, receiver);
        const m = network.message(h, edgeTerm, inputs);
        const a = agg.aggregate({ messages: m, dst, nodes: 2 * K, hasIncoming, temperature: network.options.aggregatorTemperature });
        const next = network.update(h, a, encoded, hasIncoming);
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

export interface ProbeSummary {
  kind: ProbeKind;
  /**
   * Largest relative deviation mae / |truth| among points inside / outside the
   * training range (null: no such point). A truth of 0 is floored at
   * `floor` × the largest |truth| on the curve.
   */
  worstInside: { x: number; relative: number } | null;
  worstOutside: { x: number; relative: number } | null;
}

/** Worst relative deviation mae / |truth| inside and outside the trained range. */
export function probeSummary(probe: Probe, floor = 1e-6): ProbeSummary {
  let inside: ProbeSummary['worstInside'] = null;
  let outside: ProbeSummary['worstOutside'] = null;
  const largest = Math.max(0, ...probe.points.map((p) => (Number.isFinite(p.truth) ? Math.abs(p.truth) : 0)));
  const least = Math.max(floor * largest, 1e-12);
  for (const p of probe.points) {
    const rel = Number.isFinite(p.mae) ? p.mae / Math.max(Math.abs(p.truth), least) : Infinity;
    const inRange = p.x >= probe.trainingRange[0] && p.x <= probe.trainingRange[1];
    const slot = inRange ? inside : outside;
    if (!slot || rel > slot.relative || Number.isNaN(slot.relative)) {
      if (inRange) inside = { x: p.x, relative: rel };
      else outside = { x: p.x, relative: rel };
    }
  }
  return { kind: probe.kind, worstInside: inside, worstOutside: outside };
}

export interface RunProbes {
  arm: string;
  armIndex: number;
  seed: number;
  status: RunStatus;
  reason?: string;
  inDistribution: Metrics | null;
  audit: AuditRow[];
  probes: Probe[];
  trace: AlignmentTrace | null;
}

export interface ProbeRunOptions {
  /** Graphs for the scale probe (default 8); the network audit uses this many validation graphs, at least 8. */
  graphs?: number;
}

/** Probes, audit and trace of one trained network (the network is not disposed). */
export function probeRun(
  spec: ExperimentSpec,
  armIndex: number,
  seed: number,
  network: MessagePassingNetwork,
  transforms: FeatureTransforms,
  data: Pick<SeedData, 'train' | 'validation'>,
  options: ProbeRunOptions = {},
): Omit<RunProbes, 'status' | 'inDistribution' | 'reason'> {
  const { graphs = 8 } = options;
  const model = network.options;
  const task = getTask(spec.task);
  const audit = [
    ...auditAggregator(model.aggregator, model.aggregatorTemperature, { channels: model.hidden, seed }),
    ...auditNetwork(network, transforms, data.validation, { graphs: Math.max(graphs, 8), seed, task: spec.task }),
  ];
  const probes = [
    scaleProbe(network, transforms, spec, { seed, graphs }),
    lengthProbe(network, transforms, spec, { train: data.train }),
    messageProbe(network, transforms, spec, { validation: data.validation }),
  ];
  const trace = task.iterate ? alignmentTrace(network, transforms, traceGraph(spec, seed)) : null;
  return { arm: spec.arms[armIndex]!.name, armIndex, seed, audit, probes, trace };
}

/** Pointwise mean of the same probe over seeds (x from the first; predicted, truth and mae averaged). */
export function meanProbe(probes: readonly Probe[]): Probe | null {
  const first = probes[0];
  if (!first) return null;
  if (first.unavailable) return first;
  const points = first.points.map((p, i) => {
    const at = probes.map((q) => q.points[i]).filter((q): q is ProbePoint => q !== undefined);
    return { x: p.x, predicted: meanOf(at.map((q) => q.predicted)), truth: meanOf(at.map((q) => q.truth)), mae: meanOf(at.map((q) => q.mae)) };
  });
  const { details: _details, ...rest } = first;
  return { ...rest, points, note: `${first.note} Mean over ${probes.length} seed(s).` };
}

/** Per check: mean of the means, worst of the worsts, pass only if every seed passed (null if any seed promised nothing). */
export function meanAudit(runs: readonly AuditRow[][]): AuditRow[] {
  const first = runs[0];
  if (!first) return [];
  return first.map((row, i) => {
    const same = runs.map((r) => r[i]).filter((r): r is AuditRow => r !== undefined && r.check === row.check);
    const passes = same.map((r) => r.pass);
    return {
      ...row,
      mean: meanOf(same.map((r) => r.mean)),
      worst: Math.max(...same.map((r) => r.worst)),
      samples: same.reduce((a, r) => a + r.samples, 0),
      pass: passes.some((p) => p === null) ? null : passes.every((p) => p === true),
    };
  });
}

export interface ArmProbes {
  arm: string;
  armIndex: number;
  model: ModelOptions;
  runs: RunProbes[];
  /** Across the seeds that trained: mean audit rows and pointwise mean probes. */
  mean: { seeds: number; audit: AuditRow[]; probes: Probe[] } | null;
}

export interface ProbeDocument {
  kind: 'farfield-probes';
  version: 1;
  spec: ExperimentSpec;
  specHash: string;
  seeds: number[];
  arms: ArmProbes[];
}

export interface ProbeDocumentOptions {
  /** Seeds per arm, the first N of the spec's (default 1: the first seed). */
  seeds?: number;
  /** Arm names to probe (default: all). */
  arms?: readonly string[];
  graphs?: number;
  onRunStart?: (info: { arm: string; seed: number }) => void;
  onProgress?: (info: { arm: string; seed: number } & TrainProgress) => void;
  shouldStop?: () => boolean;
}

/**
 * Train each selected arm on the first `seeds` seeds in-process (the same
 * `executeRun` as every run: same data, same initial weights), then probe,
 * audit and trace each trained network and dispose it. Synchronous; call with
 * an initialised tfjs backend (a worker in the browser).
 */
export function probeDocument(spec: ExperimentSpec, options: ProbeDocumentOptions = {}): ProbeDocument {
  const { seeds: seedCount = 1, graphs } = options;
  if (!Number.isInteger(seedCount) || seedCount < 1) throw new Error(`${WHERE}: seeds must be a whole number >= 1, got ${String(seedCount)}`);
  const names = spec.arms.map((a) => a.name);
  const wanted = options.arms ?? names;
  for (const name of wanted) {
    if (!names.includes(name)) throw new Error(`${WHERE}: no arm named "${name}"; arms: ${names.join(', ')}`);
  }
  const armIndices = names.flatMap((name, i) => (wanted.includes(name) ? [i] : []));
  const seeds = Array.from({ length: seedCount }, (_, s) => spec.seeds.base + s);
  const dataCache = new Map<number, SeedData>();
  const arms: ArmProbes[] = armIndices.map((armIndex) => ({ arm: names[armIndex]!, armIndex, model: armModel(spec, armIndex), runs: [], mean: null }));
  seeds.forEach((seed, seedIndex) => {
    for (const entry of arms) {
      const { arm, armIndex } = entry;
      options.onRunStart?.({ arm, seed });
      let kept: { network: MessagePassingNetwork; transforms: FeatureTransforms; data: SeedData } | null = null;
      const result = executeRun(
        spec,
        { index: seedIndex * spec.arms.length + armIndex, armIndex, arm, seedIndex, seed },
        {
          dataCache,
          onProgress: options.onProgress ? (p) => options.onProgress!({ arm, seed, ...p }) : undefined,
          shouldStop: options.shouldStop,
          keepNetwork: (network, transforms, data) => (kept = { network, transforms, data }),
        },
      );
      const run: RunProbes = { arm, armIndex, seed, status: result.status, inDistribution: result.inDistribution, audit: [], probes: [], trace: null };
      if (result.reason) run.reason = result.reason;
      const held = kept as { network: MessagePassingNetwork; transforms: FeatureTransforms; data: SeedData } | null;
      if (held) {
        try {
          Object.assign(run, probeRun(spec, armIndex, seed, held.network, held.transforms, held.data, { graphs }));
        } finally {
          held.network.dispose();
        }
      }
      entry.runs.push(run);
    }
    // Seeds share graphs across arms only; free this seed's data before the next.
    dataCache.delete(seed);
  });
  for (const entry of arms) {
    const ok = entry.runs.filter((r) => r.status === 'ok' && r.audit.length);
    if (!ok.length) continue;
    const kinds = ok[0]!.probes.map((p) => p.kind);
    entry.mean = {
      seeds: ok.length,
      audit: meanAudit(ok.map((r) => r.audit)),
      probes: kinds.map((kind) => meanProbe(ok.map((r) => r.probes.find((p) => p.kind === kind)!))!).filter(Boolean),
    };
  }
  return { kind: 'farfield-probes', version: 1, spec, specHash: specHash(spec), seeds, arms };
}
