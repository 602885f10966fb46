/**
 * Algebraic audit: numbers, not pictures. Each check is measured on many
 * random (or real, recorded) inputs and reported as the mean and worst
 * residual, next to what a practitioner expects for that component, so the
 * table reads at a glance:
 *
 *   aggregator  permutation invariance   ⊕ over shuffled edge order vs original order
 *               chunked aggregation      ⊕ over random chunks, combined with `combine`, vs all at once
 *               idempotence              a ⊕ a vs a (`combine`)
 *   update      neutral message          u(h, e) vs h, e the aggregator's neutral element
 *               monoid action law        u(u(h, a), b) vs u(h, a ⊕ b)
 *   network     positive homogeneity     f(x at weight scale λ) vs λ f(x): the inputs scaled as the task's
 *                                        weight-scale rung scales them (every raw input when no task is given)
 *               recorded states match    decode(last state recorded through forward's onStep) vs predict
 *               predict                  (the inspected states are the ones behind the predictions)
 *   schedule    asynchronous replay      outputs under a random asynchronous schedule vs synchronous
 *               extra synchronous steps  control: synchronous with as many steps as the async nodes got updates
 *
 * Residuals: "relative" = max-norm difference ÷ max-norm of the reference
 * (per trial, per node or per graph, as each check says); "absolute" =
 * plain difference. `pass` is true/false where the architecture makes a
 * promise, null where the row only reports (e.g. an MLP update need not leave
 * the state unchanged on an empty message).
 *
 * Host-agnostic (no node: imports); rows are plain JSON (a non-finite residual
 * becomes null in JSON).
 */
import * as tf from '@tensorflow/tfjs-core';
import { MESSAGES_BY_NAME, STEP_RULES_BY_NAME, TRANSFORMS_BY_NAME, UPDATES_BY_NAME, aggregatorRecord, type AggregatorName } from '../model/catalogue.ts';
import { mean } from '../experiment/statistics.ts';
import type { MessagePassingNetwork, NetworkInputs, StepConstants } from '../model/network.ts';
import { getAggregator, type Aggregator } from '../model/aggregators.ts';
import { gatherRows } from '../model/ops.ts';
import { makeBatch, type FeatureTransforms } from '../train/batch.ts';
import { uploadBatch } from '../train/tensors.ts';
import { predict } from '../train/evaluate.ts';
import type { TaskInstance } from '../tasks/types.ts';
import { rungScaling, scaleLikeRung, scalesEverythingTogether } from '../tasks/rung-scaling.ts';
import { taskLabel, type TaskRef } from '../tasks/registry.ts';
import { Rng } from '../util/rng.ts';
import { forwardStates, stepPlan } from './states.ts';

/** Float32 rounding allowance for checks that hold exactly in real arithmetic but involve sums. */
export const ROUNDING_TOLERANCE = 1e-5;
/** Homogeneity and the schedule checks run whole networks (many steps of float32 arithmetic). */
export const NETWORK_TOLERANCE = 1e-4;

export type AuditComponent = 'aggregator' | 'update' | 'network' | 'schedule';

export interface AuditRow {
  check: string;
  component: AuditComponent;
  /** The arm's setting this row is about, e.g. "max", "update aggregate (min)". */
  subject: string;
  measure: 'relative' | 'absolute';
  mean: number;
  worst: number;
  /** Number of residuals the mean and worst are over. */
  samples: number;
  /** What a practitioner expects, in words: "exactly 0", "≈ 0 (float32 rounding)", "not 0", "exactly τ·log 2 = 0.693", "need not be 0 (reported)". */
  expected: string;
  /** Whether the measurement meets `expected`; null where nothing is promised. */
  pass: boolean | null;
  note?: string;
}

/** What a row promises; turned into `expected` text and `pass`. */
type Expect =
  | { kind: 'zero' }
  | { kind: 'rounding'; tol: number }
  | { kind: 'nonzero'; label?: string }
  | { kind: 'value'; value: number; tol: number; label: string }
  | { kind: 'report'; label?: string };

function makeRow(check: string, component: AuditComponent, subject: string, measure: 'relative' | 'absolute', samples: readonly number[], expect: Expect, note?: string): AuditRow {
  const clean = samples.map((x) => (Number.isNaN(x) ? Infinity : x));
  const n = clean.length;
  const mean = n ? clean.reduce((a, b) => a + b, 0) / n : NaN;
  const worst = n ? Math.max(...clean) : NaN;
  const least = n ? Math.min(...clean) : NaN;
  let expected: string;
  let pass: boolean | null;
  switch (expect.kind) {
    case 'zero':
      expected = 'exactly 0';
      pass = n > 0 && worst === 0;
      break;
    case 'rounding':
      expected = `≈ 0 (float32 rounding, ≤ ${expect.tol.toExponential(0)})`;
      pass = n > 0 && worst <= expect.tol;
      break;
    case 'nonzero':
      expected = expect.label ?? 'not 0';
      pass = n > 0 && least > ROUNDING_TOLERANCE;
      break;
    case 'value':
      expected = expect.label;
      pass = n > 0 && clean.every((x) => Math.abs(x - expect.value) <= expect.tol);
      break;
    case 'report':
      expected = expect.label ?? 'need not be 0 (reported)';
      pass = null;
      break;
  }
  return { check, component, subject, measure, mean, worst, samples: n, expected, pass, ...(note ? { note } : {}) };
}

/** Max-norm of a row-major block; tiny floor so an all-zero reference does not divide by 0. */
function maxAbs(values: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < values.length; i++) m = Math.max(m, Math.abs(values[i]!));
  return m;
}

function relativeMaxDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let d = 0;
  for (let i = 0; i < a.length; i++) {
    const x = Math.abs(a[i]! - b[i]!);
    d = Math.max(d, Number.isNaN(x) ? Infinity : x);
  }
  return d === 0 ? 0 : d / Math.max(maxAbs(b), 1e-12);
}

/** Per-row relative residual ||a_i − b_i||∞ / ||b_i||∞ over the rows where `use[i]`. */
function rowResiduals(a: Float32Array, b: Float32Array, width: number, use?: ArrayLike<boolean | number>): number[] {
  const rows = a.length / width;
  const out: number[] = [];
  for (let i = 0; i < rows; i++) {
    if (use && !use[i]) continue;
    out.push(relativeMaxDiff(a.subarray(i * width, (i + 1) * width), b.subarray(i * width, (i + 1) * width)));
  }
  return out;
}

/** a ⊕ b is always a or b (max, min): no arithmetic, so identities hold exactly rather than up to rounding. */
function isSelective(name: AggregatorName): boolean {
  return aggregatorRecord(name).selective;
}

function isSmooth(name: AggregatorName): boolean {
  return aggregatorRecord(name).kind === 'smooth';
}

export interface AggregatorAuditOptions {
  /** Random graphs of messages to measure on. */
  trials?: number;
  nodes?: number;
  edges?: number;
  channels?: number;
  seed?: number;
}

/** Random message values with |m| in [0.1, 3] (away from 0, so relative residuals are meaningful). */
function randomValues(rng: Rng, count: number): Float32Array {
  const out = new Float32Array(count);
  for (let i = 0; i < count; i++) out[i] = (rng.next() < 0.5 ? -1 : 1) * rng.uniform(0.1, 3);
  return out;
}

function aggregateOn(agg: Aggregator, messages: Float32Array, dst: Int32Array, nodes: number, channels: number, temperature: number): { values: Float32Array; has: Uint8Array } {
  const has = new Uint8Array(nodes);
  for (const d of dst) has[d] = 1;
  if (dst.length === 0) return { values: new Float32Array(nodes * channels), has };
  const out = tf.tidy(() =>
    agg.aggregate({
      messages: tf.tensor2d(messages, [dst.length, channels]),
      dst: tf.tensor1d(dst, 'int32'),
      nodes,
      hasIncoming: tf.tensor2d(Float32Array.from(has), [nodes, 1]),
      temperature,
    }),
  );
  const values = out.dataSync() as Float32Array;
  out.dispose();
  return { values: values.slice(), has };
}

function combineOn(agg: Aggregator, a: Float32Array, b: Float32Array, shape: [number, number], temperature: number): Float32Array {
  const out = tf.tidy(() => agg.combine(tf.tensor2d(a, shape), tf.tensor2d(b, shape), temperature));
  const values = (out.dataSync() as Float32Array).slice();
  out.dispose();
  return values;
}

/**
 * Audit of an aggregator on random messages: permutation invariance, chunked
 * (order-free) aggregation and idempotence of `combine`. No learned
 * parameters are involved, so this depends only on the arm's aggregator and
 * temperature.
 *
 * Chunked aggregation for `mean`: chunk means are merged with count weights,
 * Σ n_c·mean_c / Σ n_c (the mean is a sum over a count, and that pair is what
 * combines across chunks); the aggregator's pairwise `combine` (the midpoint)
 * would be exact only for equal counts. Every other aggregator folds its chunk
 * results with its own `combine`; nodes empty in a chunk are skipped (the
 * empty aggregate, 0, is not a neutral element for max/min).
 */
export function auditAggregator(name: AggregatorName, temperature: number, options: AggregatorAuditOptions = {}): AuditRow[] {
  const { trials = 24, nodes = 12, edges = 60, channels = 8, seed = 1 } = options;
  const agg = getAggregator(name);
  const rng = new Rng(seed).fork(`audit:aggregator:${name}`);
  const perm: number[] = [];
  const chunked: number[] = [];
  const idem: number[] = [];
  const smooth = isSmooth(name);
  for (let trial = 0; trial < trials; trial++) {
    const dst = Int32Array.from({ length: edges }, () => rng.int(0, nodes - 1));
    const messages = randomValues(rng, edges * channels);
    const whole = aggregateOn(agg, messages, dst, nodes, channels, temperature);

    // Permutation invariance: the same (message, destination) pairs in a shuffled order.
    const order = rng.shuffle(Array.from({ length: edges }, (_, e) => e));
    const pMessages = new Float32Array(edges * channels);
    const pDst = new Int32Array(edges);
    order.forEach((e, i) => {
      pDst[i] = dst[e]!;
      pMessages.set(messages.subarray(e * channels, (e + 1) * channels), i * channels);
    });
    perm.push(relativeMaxDiff(aggregateOn(agg, pMessages, pDst, nodes, channels, temperature).values, whole.values));

    // Chunked aggregation: random chunk per edge, aggregate each chunk, fold.
    const chunks = rng.int(2, 4);
    const chunkOf = Array.from({ length: edges }, () => rng.int(0, chunks - 1));
    let acc = new Float32Array(nodes * channels);
    const accHas = new Uint8Array(nodes);
    const accCount = new Float64Array(nodes);
    for (let c = 0; c < chunks; c++) {
      const ids = chunkOf.flatMap((cc, e) => (cc === c ? [e] : []));
      const cDst = Int32Array.from(ids, (e) => dst[e]!);
      const cMessages = new Float32Array(ids.length * channels);
      ids.forEach((e, i) => cMessages.set(messages.subarray(e * channels, (e + 1) * channels), i * channels));
      const part = aggregateOn(agg, cMessages, cDst, nodes, channels, temperature);
      const counts = new Float64Array(nodes);
      for (const d of cDst) counts[d]!++;
      if (name === 'mean') {
        const next = new Float32Array(nodes * channels);
        for (let v = 0; v < nodes; v++) {
          const total = accCount[v]! + counts[v]!;
          for (let j = 0; j < channels; j++) {
            const i = v * channels + j;
            next[i] = total ? (accCount[v]! * acc[i]! + counts[v]! * part.values[i]!) / total : 0;
          }
        }
        acc = next;
      } else {
        const combined = combineOn(agg, acc, part.values, [nodes, channels], temperature);
        for (let v = 0; v < nodes; v++) {
          if (!part.has[v]) continue;
          for (let j = 0; j < channels; j++) {
            const i = v * channels + j;
            acc[i] = accHas[v] ? combined[i]! : part.values[i]!;
          }
        }
      }
      for (let v = 0; v < nodes; v++) {
        accCount[v]! += counts[v]!;
        if (part.has[v]) accHas[v] = 1;
      }
    }
    chunked.push(relativeMaxDiff(acc, whole.values));

    // Idempotence: a ⊕ a vs a, element by element.
    const a = randomValues(rng, nodes * channels);
    const aa = combineOn(agg, a, a, [nodes, channels], temperature);
    for (let i = 0; i < a.length; i++) idem.push(smooth ? Math.abs(aa[i]! - a[i]!) : Math.abs(aa[i]! - a[i]!) / Math.abs(a[i]!));
  }
  const exactOrRounding: Expect = isSelective(name) ? { kind: 'zero' } : { kind: 'rounding', tol: ROUNDING_TOLERANCE };
  const tauLog2 = temperature * Math.LN2;
  const idemExpect: Expect = aggregatorRecord(name).idempotent
    ? { kind: 'zero' }
    : smooth
      ? { kind: 'value', value: tauLog2, tol: ROUNDING_TOLERANCE * (1 + tauLog2) * 4, label: `exactly τ·log 2 = ${Number(tauLog2.toPrecision(4))}` }
      : { kind: 'nonzero', label: 'not 0 (a ⊕ a = 2a: exactly 1)' };
  const subject = smooth ? `${name} (τ = ${temperature})` : name;
  return [
    makeRow('permutation invariance', 'aggregator', subject, 'relative', perm, exactOrRounding, 'per trial: ‖⊕(shuffled edges) − ⊕(edges)‖∞ / ‖⊕(edges)‖∞'),
    makeRow(
      'chunked aggregation',
      'aggregator',
      subject,
      'relative',
      chunked,
      exactOrRounding,
      name === 'mean'
        ? 'chunk means merged with count weights Σ n_c·mean_c / Σ n_c (the pairwise combine, a midpoint, is exact only for equal counts)'
        : 'aggregate 2–4 random chunks, fold the chunk results with combine, compare with aggregating all at once',
    ),
    makeRow(
      'idempotence a ⊕ a = a',
      'aggregator',
      subject,
      smooth ? 'absolute' : 'relative',
      idem,
      idemExpect,
      smooth ? 'per element |combine(a, a) − a|: log-sum-exp of two equal terms adds τ·log 2' : 'per element |combine(a, a) − a| / |a|',
    ),
  ];
}

/** The neutral element of `combine` for the "aggregate" update; null for mean (the midpoint has none). From the catalogue. */
export function neutralElement(name: AggregatorName): number | null {
  return aggregatorRecord(name).neutral;
}

export interface NetworkAuditOptions {
  /** Graphs to measure on (in-distribution validation graphs are the natural choice). */
  graphs?: number;
  /** Input scales for the homogeneity check. */
  scales?: number[];
  /**
   * The task the instances come from. When given, the homogeneity check scales
   * exactly the inputs the task's weight-scale rung scales (`rungScaling` in
   * tasks/rung-scaling.ts: for weight-carrying tasks the inputs then equal
   * `buildInstance(..., { weightScale: λ })` on the same graphs bit for bit),
   * so the row measures the shift the ladder applies. Without it, every raw
   * input is scaled by λ (pure homogeneity, which is the rung's transformation
   * only for the tasks whose rung scales every input).
   */
  task?: TaskRef;
  /** Random asynchronous schedules per batch. */
  schedules?: number;
  /** Chance a node updates at a tick, and that an incoming edge delivers when its node updates. */
  nodeRate?: number;
  edgeRate?: number;
  seed?: number;
}

/** The processor steps at which update checks sample states: first, early, middle and last. */
function sampleSteps(total: number): number[] {
  return [...new Set([0, 1, Math.floor(total / 2), total - 1].filter((t) => t >= 0 && t < total))];
}

/**
 * Whether the whole map f is positively homogeneous (f(λx) = λ f(x), λ > 0) by
 * construction, and if not, why. Needs: no biases; relu/leaky-relu (always);
 * a homogeneous aggregator (sum, mean, max, min); MLP messages (a semiring
 * layer adds a learned constant W: min_k(x_k + W_kj) is not homogeneous); no
 * gated update (sigmoid, tanh); identity input transforms; a step count that
 * does not depend on the values (until-stable compares to a fixed tolerance).
 */
export function homogeneityBreakers(network: MessagePassingNetwork, transforms: FeatureTransforms): string[] {
  const o = network.options;
  const out: string[] = [];
  if (o.bias) out.push('biases');
  if (!aggregatorRecord(o.aggregator).homogeneous) out.push(`${o.aggregator} aggregator`);
  if (!MESSAGES_BY_NAME[o.message].homogeneous) out.push(`${o.message} messages`);
  if (!UPDATES_BY_NAME[o.update].homogeneous) out.push(`${o.update} update`);
  const transformsUsed = [...transforms.node, ...transforms.edge].filter((t) => !TRANSFORMS_BY_NAME[t].homogeneous);
  if (transformsUsed.length) out.push(`${[...new Set(transformsUsed)].join('/')} transform`);
  if (STEP_RULES_BY_NAME[o.steps.rule].valueDependent) out.push(`${o.steps.rule} step rule`);
  return out;
}

function readRows(t: tf.Tensor): Float32Array {
  return (t.dataSync() as Float32Array).slice();
}

/**
 * Audit of a (trained) network's update function, homogeneity and
 * asynchronous schedule, measured on real graphs (`instances`, e.g. the
 * validation set) and the states the network itself produces on them: one
 * `forward` pass records every state through `onStep`, and the update checks
 * read the sampled steps from it.
 */
export function auditNetwork(network: MessagePassingNetwork, transforms: FeatureTransforms, instances: readonly TaskInstance[], options: NetworkAuditOptions = {}): AuditRow[] {
  const { graphs = 16, scales = [0.1, 0.5, 2, 10], schedules = 2, nodeRate = 0.5, edgeRate = 0.5, seed = 1, task } = options;
  const insts = instances.slice(0, graphs);
  if (insts.length === 0) throw new Error('inspect/audit: auditNetwork needs at least one graph');
  const o = network.options;
  const agg = getAggregator(o.aggregator);
  const tau = o.aggregatorTemperature;
  const H = o.hidden;
  const rng = new Rng(seed).fork('audit:network');
  const rows: AuditRow[] = [];
  const batch = makeBatch(insts, transforms);
  const plan = stepPlan(network, batch.maxNodes);
  const tensors = uploadBatch(batch);
  const n = batch.nodes;
  const E = batch.edges;
  const updateSubject = o.update === 'aggregate' ? `update aggregate (${o.aggregator})` : `update ${o.update}`;
  const held: tf.Tensor[] = [];
  try {
    // ---- one forward pass, every state recorded through onStep: the states the update checks use
    const recorded = tf.tidy(() => forwardStates(network, tensors, plan.steps, plan.stopTolerance));
    held.push(recorded.edgeTerm, recorded.prediction, ...recorded.states, ...(recorded.inputTerm ? [recorded.inputTerm] : []));
    const constants: StepConstants = { encoded: recorded.encoded, inputTerm: recorded.inputTerm ?? null };
    const evaluated = predict(network, insts, transforms, { chunk: insts.length });
    const flat = new Float32Array(n);
    let offset = 0;
    for (const values of evaluated) {
      flat.set(values, offset);
      offset += values.length;
    }
    rows.push(
      makeRow(
        'recorded states match predict',
        'network',
        'states recorded through onStep',
        'relative',
        [relativeMaxDiff(readRows(recorded.prediction), flat)],
        { kind: 'rounding', tol: NETWORK_TOLERANCE },
        'decode(last state recorded through the onStep callback of network.forward, the pass whose states the update checks and probes read) vs predict (forward releasing each step, as evaluation runs it): the inspected states are the ones behind the reported predictions',
      ),
    );

    // ---- update checks on recorded states
    const neutral = neutralElement(o.aggregator);
    const neutralSamples: number[] = [];
    const actionSamples: number[] = [];
    const steps = sampleSteps(Math.max(recorded.stepsRun, 1));
    const hasAll = new Float32Array(n).fill(1);
    const incoming = new Float32Array(n);
    for (const d of batch.dst) incoming[d] = 1;
    for (const t of steps) {
      const split = Uint8Array.from({ length: E }, () => (rng.next() < 0.5 ? 1 : 0));
      const hasA = new Float32Array(n);
      const hasB = new Float32Array(n);
      for (let e = 0; e < E; e++) (split[e] ? hasA : hasB)[batch.dst[e]!] = 1;
      const both = Uint8Array.from({ length: n }, (_, v) => (hasA[v] && hasB[v] ? 1 : 0));
      const idsA = Int32Array.from(split.reduce<number[]>((acc, s, e) => (s ? (acc.push(e), acc) : acc), []));
      const idsB = Int32Array.from(split.reduce<number[]>((acc, s, e) => (!s ? (acc.push(e), acc) : acc), []));
      const result = tf.tidy(() => {
        const h = recorded.states[t]!;
        // Neutral message: the aggregator's neutral element for the "aggregate" update (combine must then leave h alone);
        // 0 with the real hasIncoming for MLP / gated updates (what a node without incoming messages gets every step).
        let neutralOut: tf.Tensor2D;
        if (o.update === 'aggregate') {
          const e = tf.fill([n, H], neutral ?? 0) as tf.Tensor2D;
          neutralOut = network.update(h, e, constants, tf.tensor2d(hasAll, [n, 1]));
        } else {
          neutralOut = network.update(h, tf.zeros([n, H]) as tf.Tensor2D, constants, tf.tensor2d(incoming, [n, 1]));
        }
        // Monoid action: deliver the two halves of each node's messages one after another vs their combine at once.
        const m = network.message(h, recorded.edgeTerm, tensors);
        const part = (ids: Int32Array, has: Float32Array) => {
          if (ids.length === 0) return tf.zeros([n, H]) as tf.Tensor2D;
          const dst = tf.tensor1d(Int32Array.from(ids, (e) => batch.dst[e]!), 'int32');
          return agg.aggregate({ messages: gatherRows(m, tf.tensor1d(ids, 'int32')), dst, nodes: n, hasIncoming: tf.tensor2d(has, [n, 1]), temperature: tau });
        };
        const hasAT = tf.tensor2d(hasA, [n, 1]);
        const hasBT = tf.tensor2d(hasB, [n, 1]);
        const a = part(idsA, hasA);
        const b = part(idsB, hasB);
        const stepwise = network.update(network.update(h, a, constants, hasAT), b, constants, hasBT);
        const atOnce = network.update(h, agg.combine(a, b, tau), constants, tf.maximum(hasAT, hasBT) as tf.Tensor2D);
        return { h: readRows(h), neutralOut: readRows(neutralOut), stepwise: readRows(stepwise), atOnce: readRows(atOnce) };
      });
      neutralSamples.push(...rowResiduals(result.neutralOut, result.h, H));
      actionSamples.push(...rowResiduals(result.stepwise, result.atOnce, H, both));
    }
    let neutralExpect: Expect;
    let neutralNote: string;
    if (o.update === 'aggregate') {
      if (neutral === null) {
        neutralExpect = { kind: 'report', label: 'not 0 (mean has no neutral element; a = 0 halves the state)' };
        neutralNote = 'update h ⊕ a with the midpoint; fed a = 0';
      } else {
        neutralExpect = { kind: 'zero' };
        neutralNote = `update h ⊕ e with e = ${neutral} (the neutral element of ${o.aggregator}), every node treated as receiving`;
      }
    } else {
      neutralExpect = { kind: 'report' };
      neutralNote = 'aggregate fed as 0 with the real hasIncoming: what a node without incoming messages receives every step; per node ‖u(h, 0) − h‖∞ / ‖h‖∞';
    }
    rows.push(makeRow('neutral message leaves state', 'update', updateSubject, 'relative', neutralSamples, neutralExpect, neutralNote));
    let actionExpect: Expect;
    if (o.update !== 'aggregate') actionExpect = { kind: 'report' };
    else if (isSelective(o.aggregator)) actionExpect = { kind: 'zero' };
    else if (o.aggregator === 'mean') actionExpect = { kind: 'report', label: 'not 0 (the midpoint is not associative)' };
    else actionExpect = { kind: 'rounding', tol: ROUNDING_TOLERANCE };
    rows.push(
      makeRow(
        'monoid action u(u(h,a),b) = u(h,a⊕b)',
        'update',
        updateSubject,
        'relative',
        actionSamples,
        actionExpect,
        "each node's real messages split at random into halves a, b (nodes with both halves non-empty); per node ‖stepwise − at once‖∞ / ‖at once‖∞",
      ),
    );
  } finally {
    tensors.dispose();
    for (const t of held) t.dispose();
  }

  rows.push(homogeneityRow(network, transforms, insts, scales, task));

  rows.push(...asynchronousRows(network, transforms, insts, { schedules, nodeRate, edgeRate, rng: rng.fork('async') }));
  return rows;
}

/**
 * Positive homogeneity under the weight-scale shift: per graph and λ,
 * ‖f(x_λ) − λ f(x)‖∞ / ‖λ f(x)‖∞, where x_λ is the graph's input as the task's
 * rung ×λ builds it (`task` given) or every raw input times λ (no task). A
 * promise (float32 rounding) only where the network is homogeneous by
 * construction and the rung scales every input and the target together;
 * otherwise the residual is reported, with the reason in the subject or note.
 */
function homogeneityRow(network: MessagePassingNetwork, transforms: FeatureTransforms, insts: readonly TaskInstance[], scales: readonly number[], ref: TaskRef | undefined): AuditRow {
  const scaling = ref === undefined ? null : rungScaling(ref);
  const task = ref === undefined ? undefined : taskLabel(ref);
  const base = predict(network, insts, transforms);
  const homogeneity: number[] = [];
  for (const lambda of scales) {
    const scaled = scaling
      ? predict(network, insts.map((inst) => scaleLikeRung(inst, scaling, lambda)), transforms)
      : predict(network, insts, transforms, { inputScale: lambda });
    scaled.forEach((y, g) => {
      const want = base[g]!.map((v) => v * lambda);
      homogeneity.push(relativeMaxDiff(y, want));
    });
  }
  const breakers = homogeneityBreakers(network, transforms);
  const rungMatches = scaling === null || scalesEverythingTogether(scaling);
  const promise = breakers.length === 0 && rungMatches;
  const measured = `per graph and λ ∈ {${scales.join(', ')}}: ‖f(x_λ) − λ f(x)‖∞ / ‖λ f(x)‖∞`;
  let how: string;
  if (scaling === null) how = 'x_λ = every raw input (node and edge) times λ before transforms (no task given)';
  else if (rungMatches) how = `x_λ = the inputs as the ${task} weight-scale rung ×λ builds them (every node and edge input times λ; the target scales by λ too)`;
  else {
    const powers = (p: readonly number[]) => `[${p.map((x) => (x === 0 ? '1' : x === 1 ? 'λ' : Number.isNaN(x) ? 'no single power' : `λ^${x}`)).join(', ')}]`;
    how =
      `x_λ = the inputs as the ${task} weight-scale rung ×λ builds them (node inputs × ${powers(scaling.node)}, edge inputs × ${powers(scaling.edge)}, target × ${powers([scaling.target])}): ` +
      'the rung does not scale every input and the target together, so homogeneity is not what it asks of the network; reported';
  }
  return makeRow(
    'positive homogeneity f(λx) = λf(x)',
    'network',
    breakers.length ? `not homogeneous by construction (${breakers.join(', ')})` : 'bias-free, homogeneous by construction',
    'relative',
    homogeneity,
    promise ? { kind: 'rounding', tol: NETWORK_TOLERANCE } : { kind: 'report' },
    `${measured}; ${how}`,
  );
}

/** Per graph: mean over counted nodes |y − ref| ÷ mean over counted nodes |ref|. */
function graphDeviations(insts: readonly TaskInstance[], y: Float32Array, ref: Float32Array): number[] {
  const out: number[] = [];
  let offset = 0;
  for (const inst of insts) {
    let diff = 0;
    let size = 0;
    let count = 0;
    for (let i = 0; i < inst.nodes; i++) {
      if (!inst.mask[i]) continue;
      const d = Math.abs(y[offset + i]! - ref[offset + i]!);
      diff += Number.isNaN(d) ? Infinity : d;
      size += Math.abs(ref[offset + i]!);
      count++;
    }
    if (count) out.push(diff === 0 ? 0 : diff / Math.max(size, 1e-12));
    offset += inst.nodes;
  }
  return out;
}

interface AsyncOptions {
  schedules: number;
  nodeRate: number;
  edgeRate: number;
  rng: Rng;
}

/**
 * Asynchronous replay. Synchronous reference: T steps (the network's rule).
 * Asynchronous schedule: at each tick every node updates with probability
 * `nodeRate`; an updating node aggregates only a random part of its incoming
 * messages (each edge delivers with probability `edgeRate`, at least one),
 * computed from the senders' current states; the others keep their state.
 * Ticks continue until every node has updated at least T times and every edge
 * has delivered at least T times (cap 60·T ticks). Residual per graph:
 * mean over counted nodes |y_async − y_sync| ÷ mean over counted nodes |y_sync|.
 * Expected: an "aggregate" update with min or max is a monotone, idempotent
 * relaxation, which reaches the same fixed point under any fair schedule
 * (chaotic relaxation; Bertsekas & Tsitsiklis, Parallel and Distributed
 * Computation, 1989, ch. 6) — provided the synchronous run itself reached it;
 * everything else is reported. A second row is the control: the synchronous
 * run with as many steps as the average node got updates in the replay, vs T
 * steps, so extra updates are not mistaken for an effect of asynchrony.
 */
function asynchronousRows(network: MessagePassingNetwork, transforms: FeatureTransforms, insts: readonly TaskInstance[], options: AsyncOptions): AuditRow[] {
  const o = network.options;
  const agg = getAggregator(o.aggregator);
  const tau = o.aggregatorTemperature;
  const batch = makeBatch(insts, transforms);
  const { steps: T } = stepPlan(network, batch.maxNodes);
  const tensors = uploadBatch(batch);
  const n = batch.nodes;
  const E = batch.edges;
  const samples: number[] = [];
  const control: number[] = [];
  let syncAtFixedPoint = false;
  let ticksUsed = 0;
  let updatesTotal = 0;
  let updatesCount = 0;
  try {
    const sync = tf.tidy(() => {
      const run = forwardStates(network, tensors, T + 1);
      const hT = run.states[T]!;
      const next = run.states[T + 1]!;
      const change = tf.max(tf.abs(tf.sub(next, hT))).dataSync()[0]!;
      const size = tf.max(tf.abs(hT)).dataSync()[0]!;
      return { y: readRows(network.decode(hT)), fixed: change <= 1e-6 * (1 + size) };
    });
    syncAtFixedPoint = sync.fixed;
    const inEdges: number[][] = Array.from({ length: n }, () => []);
    for (let e = 0; e < E; e++) inEdges[batch.dst[e]!]!.push(e);
    for (let s = 0; s < options.schedules; s++) {
      const rng = options.rng.fork(s);
      const updates = new Int32Array(n);
      const deliveries = new Int32Array(E);
      const fixed = tf.tidy(() => {
        const encoded = network.encode(tensors.nodeX);
        return { encoded, edgeTerm: network.edgeTerm(tensors.edgeX), inputTerm: network.stepConstants(encoded).inputTerm ?? undefined };
      });
      const constants: StepConstants = { encoded: fixed.encoded, inputTerm: fixed.inputTerm ?? null };
      let h: tf.Tensor2D = fixed.encoded;
      const cap = 60 * Math.max(T, 1);
      let tick = 0;
      const enough = () => {
        for (let v = 0; v < n; v++) if (updates[v]! < T) return false;
        for (let e = 0; e < E; e++) if (deliveries[e]! < T) return false;
        return true;
      };
      try {
        while (tick < cap && !enough()) {
          tick++;
          const selected = new Uint8Array(n);
          const delivered: number[] = [];
          const hasIncoming = new Float32Array(n);
          for (let v = 0; v < n; v++) {
            if (rng.next() >= options.nodeRate) continue;
            selected[v] = 1;
            const mine = inEdges[v]!;
            const picked = mine.filter(() => rng.next() < options.edgeRate);
            if (picked.length === 0 && mine.length > 0) picked.push(rng.pick(mine));
            for (const e of picked) delivered.push(e);
            if (picked.length) hasIncoming[v] = 1;
          }
          if (!selected.some((x) => x)) continue;
          const ids = Int32Array.from(delivered);
          const src = Int32Array.from(ids, (e) => batch.src[e]!);
          const dst = Int32Array.from(ids, (e) => batch.dst[e]!);
          const current = h;
          const next = tf.tidy(() => {
            const hasT = tf.tensor2d(hasIncoming, [n, 1]);
            let a: tf.Tensor2D;
            if (ids.length) {
              const sub: NetworkInputs = { nodeX: tensors.nodeX, edgeX: tensors.edgeX, src: tf.tensor1d(src, 'int32'), dst: tf.tensor1d(dst, 'int32'), nodes: n };
              const m = network.message(current, gatherRows(fixed.edgeTerm, tf.tensor1d(ids, 'int32')), sub);
              a = agg.aggregate({ messages: m, dst: sub.dst, nodes: n, hasIncoming: hasT, temperature: tau });
            } else {
              a = tf.zeros([n, o.hidden]) as tf.Tensor2D;
            }
            const updated = network.update(current, a, constants, hasT);
            const mask = tf.tensor2d(Uint8Array.from({ length: n * o.hidden }, (_, i) => selected[Math.floor(i / o.hidden)]!), [n, o.hidden], 'bool');
            return tf.where(mask, updated, current) as tf.Tensor2D;
          });
          if (current !== fixed.encoded) current.dispose();
          h = next;
          for (let v = 0; v < n; v++) if (selected[v]) updates[v]!++;
          for (const e of ids) deliveries[e]!++;
        }
        ticksUsed = Math.max(ticksUsed, tick);
        for (const u of updates) updatesTotal += u;
        updatesCount += n;
        const y = tf.tidy(() => readRows(network.decode(h)));
        samples.push(...graphDeviations(insts, y, sync.y));
      } finally {
        if (h !== fixed.encoded) h.dispose();
        fixed.encoded.dispose();
        fixed.edgeTerm.dispose();
        fixed.inputTerm?.dispose();
      }
    }
    // Control: the synchronous run with as many steps as the average node got updates, vs T steps.
    const meanUpdates = Math.max(T, Math.round(updatesTotal / Math.max(updatesCount, 1)));
    const longer = tf.tidy(() => {
      const run = network.forward(tensors, { steps: meanUpdates });
      return readRows(run.prediction);
    });
    control.push(...graphDeviations(insts, longer, sync.y));
  } finally {
    tensors.dispose();
  }
  const safe = o.update === 'aggregate' && isSelective(o.aggregator);
  const meanUpdates = Math.round(updatesTotal / Math.max(updatesCount, 1));
  let expect: Expect = { kind: 'report' };
  if (safe && syncAtFixedPoint) expect = { kind: 'rounding', tol: NETWORK_TOLERANCE };
  else if (safe) expect = { kind: 'report', label: '≈ 0 once both reach the fixed point (the synchronous run had not)' };
  const subject = o.update === 'aggregate' ? `update aggregate (${o.aggregator})` : `update ${o.update}, ${o.aggregator} aggregator`;
  return [
    makeRow(
      'asynchronous replay',
      'schedule',
      subject,
      'relative',
      samples,
      expect,
      `${options.schedules} random schedules (node rate ${options.nodeRate}, edge rate ${options.edgeRate}) ` +
        `until every node updated and every edge delivered ≥ T = ${T} times (${ticksUsed} ticks, ${meanUpdates} updates per node on average); ` +
        `per graph mean |y_async − y_sync| / mean |y_sync| over counted nodes; synchronous run at a fixed point: ${syncAtFixedPoint ? 'yes' : 'no'}`,
    ),
    makeRow(
      'extra synchronous steps (control)',
      'schedule',
      subject,
      'relative',
      control,
      syncAtFixedPoint ? { kind: 'rounding', tol: NETWORK_TOLERANCE } : { kind: 'report' },
      `synchronous run with ${Math.max(T, meanUpdates)} steps (the average updates per node in the asynchronous replay) vs ${T} steps: ` +
        'how much of the asynchronous deviation extra updates alone explain',
    ),
  ];
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
      mean: mean(same.map((r) => r.mean)),
      worst: Math.max(...same.map((r) => r.worst)),
      samples: same.reduce((a, r) => a + r.samples, 0),
      pass: passes.some((p) => p === null) ? null : passes.every((p) => p === true),
    };
  });
}
