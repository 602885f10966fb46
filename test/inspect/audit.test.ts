/**
 * The algebraic audit on hand-built components, where the right answer is
 * known from the algebra itself.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs-core';
import { initBackend } from '../../src/engine/backend.ts';
import { auditAggregator, auditNetwork, neutralElement, type AuditRow } from '../../src/inspect/audit.ts';
import { MessagePassingNetwork } from '../../src/model/network.ts';
import { modelSchema, type ModelOptions } from '../../src/experiment/spec.ts';
import type { FeatureTransforms } from '../../src/train/batch.ts';
import { buildInstance } from '../../src/tasks/sample.ts';
import type { TaskInstance } from '../../src/tasks/types.ts';
import { predict } from '../../src/train/evaluate.ts';
import { Rng } from '../../src/util/rng.ts';

const identity: FeatureTransforms = { node: ['identity'], edge: ['identity'], nodeStats: [], edgeStats: [] };

function model(overrides: Partial<ModelOptions>): ModelOptions {
  return modelSchema.parse({ hidden: 6, steps: { rule: 'nodes', trainJitter: 0 }, ...overrides });
}

function graphs(count: number, seed: number, nodes = 7, weightScale = 1, task = 'shortest-path', family = 'er'): TaskInstance[] {
  const rng = new Rng(seed);
  return Array.from({ length: count }, (_, i) => buildInstance(task, family, nodes, rng.fork(i), { weightScale }).instance);
}

/**
 * Bellman-Ford as a bias-free network on shortest-path's inputs (0 at the
 * source, the median edge weight m elsewhere): encode h = U·x (0 at the source,
 * U·m "not reached yet" elsewhere), min-plus messages h(u) + w, min
 * aggregation, update h ⊕ a.
 */
function bellmanFordBiasFree(unreached = 1e4): MessagePassingNetwork {
  const net = new MessagePassingNetwork(model({ hidden: 1, aggregator: 'min', message: 'min-plus', update: 'aggregate', bias: false }), 1, 1, new Rng(1));
  net.params.set('encode.w', [unreached]);
  net.params.set('message.semiring', [0]);
  net.params.set('message.we', [1]);
  net.params.set('decode.w', [1]);
  return net;
}

/** A bias-free (or biased) relu / mlp-message / mlp-update max arm with nonzero update output weights (W2 starts at 0). */
function maxArm(bias: boolean): MessagePassingNetwork {
  const net = new MessagePassingNetwork(model({ aggregator: 'max', bias, activation: 'relu', message: 'mlp', update: 'mlp' }), 1, 1, new Rng(2));
  for (const [name, v] of net.params.vars) {
    if (/w2/.test(name)) net.params.set(name, Array.from({ length: v.size }, (_, i) => Math.cos(i) * 0.2));
    if (bias && /\.b/.test(name)) net.params.set(name, Array.from({ length: v.size }, (_, i) => 0.3 * Math.sin(i + 1)));
  }
  return net;
}

/** Worst per-graph ‖f(a_g) − λ f(b_g)‖∞ / ‖λ f(b_g)‖∞, computed directly (not through the audit). */
function worstDeviation(net: MessagePassingNetwork, scaled: TaskInstance[], base: TaskInstance[], lambda: number): number {
  const ys = predict(net, scaled, identity);
  const bs = predict(net, base, identity);
  let worst = 0;
  ys.forEach((y, g) => {
    const want = Array.from(bs[g]!, (v) => v * lambda);
    const size = Math.max(...want.map(Math.abs), 1e-12);
    worst = Math.max(worst, ...Array.from(y, (v, i) => Math.abs(v - want[i]!) / size));
  });
  return worst;
}

function row(rows: AuditRow[], check: string): AuditRow {
  const found = rows.find((r) => r.check.startsWith(check));
  if (!found) throw new Error(`no audit row "${check}" in ${rows.map((r) => r.check).join(', ')}`);
  return found;
}


beforeAll(async () => {
  await initBackend('wasm');
});

describe('aggregator audit (the algebra of each aggregator; common practice)', () => {
  it('max and min: idempotent exactly, permutation-invariant exactly, chunked aggregation exact', () => {
    for (const name of ['max', 'min'] as const) {
      const rows = auditAggregator(name, 1, { trials: 12 });
      for (const check of ['permutation invariance', 'chunked aggregation', 'idempotence']) {
        const r = row(rows, check);
        expect(r.worst, `${name} ${check}`).toBe(0);
        expect(r.expected).toBe('exactly 0');
        expect(r.pass).toBe(true);
        expect(r.samples).toBeGreaterThan(10);
      }
    }
  });

  it('sum: not idempotent (a ⊕ a = 2a, relative residual exactly 1); chunked and shuffled sums agree to float32 rounding', () => {
    const rows = auditAggregator('sum', 1, { trials: 12 });
    const idem = row(rows, 'idempotence');
    expect(idem.mean).toBe(1);
    expect(idem.worst).toBe(1);
    expect(idem.expected).toMatch(/^not 0/);
    expect(idem.pass).toBe(true);
    expect(row(rows, 'chunked aggregation').worst).toBeLessThan(1e-6);
    expect(row(rows, 'permutation invariance').worst).toBeLessThan(1e-6);
    expect(row(rows, 'chunked aggregation').pass).toBe(true);
  });

  it('smooth-max (log-sum-exp): a ⊕ a = a + τ·log 2 exactly (elementary: τ·log(2e^{a/τ}) = a + τ·log 2; common practice)', () => {
    for (const tau of [0.25, 1, 3]) {
      const rows = auditAggregator('smooth-max', tau, { trials: 6 });
      const idem = row(rows, 'idempotence');
      expect(idem.measure).toBe('absolute');
      expect(idem.mean).toBeCloseTo(tau * Math.LN2, 5);
      expect(idem.worst).toBeCloseTo(tau * Math.LN2, 5);
      expect(idem.pass).toBe(true);
      // log-sum-exp is associative, so chunks combine exactly up to rounding
      expect(row(rows, 'chunked aggregation').worst).toBeLessThan(1e-5);
    }
    const min = row(auditAggregator('smooth-min', 0.5, { trials: 4 }), 'idempotence');
    expect(min.mean).toBeCloseTo(0.5 * Math.LN2, 5);
  });

  it('mean: idempotent (the midpoint of a and a is a); chunk means merge with count weights', () => {
    const rows = auditAggregator('mean', 1, { trials: 12 });
    expect(row(rows, 'idempotence').worst).toBe(0);
    expect(row(rows, 'chunked aggregation').worst).toBeLessThan(1e-6);
    expect(row(rows, 'chunked aggregation').note).toMatch(/count weights/);
  });

  it('the neutral elements are the monoid identities (0 for +, −∞ for max, +∞ for min)', () => {
    expect(neutralElement('sum')).toBe(0);
    expect(neutralElement('max')).toBe(-Infinity);
    expect(neutralElement('smooth-max')).toBe(-Infinity);
    expect(neutralElement('min')).toBe(Infinity);
    expect(neutralElement('mean')).toBeNull();
  });
});

describe('network audit', () => {
  it('a bias-free ReLU network is positively homogeneous to float32 rounding (ReLU(λx) = λReLU(x), λ > 0; common practice)', () => {
    const net = new MessagePassingNetwork(model({ aggregator: 'max', bias: false }), 1, 1, new Rng(2));
    for (const [name, v] of net.params.vars) if (/w2/.test(name)) net.params.set(name, Array.from({ length: v.size }, (_, i) => Math.cos(i) * 0.2));
    const rows = auditNetwork(net, identity, graphs(6, 4), { scales: [0.1, 10, 100], schedules: 1 });
    const homogeneity = row(rows, 'positive homogeneity');
    // Reported residual (float32, a few steps): typically ~1e-7.
    console.info(`bias-free ReLU network: homogeneity residual mean ${homogeneity.mean.toExponential(2)}, worst ${homogeneity.worst.toExponential(2)}`);
    expect(homogeneity.worst).toBeLessThan(1e-5);
    expect(homogeneity.pass).toBe(true);
    expect(homogeneity.subject).toMatch(/homogeneous by construction/);
    net.dispose();
  });

  it('with biases the homogeneity residual is large and only reported (so the check can fail)', () => {
    const net = new MessagePassingNetwork(model({ aggregator: 'sum', bias: true }), 1, 1, new Rng(2));
    for (const [name, v] of net.params.vars) if (/\.b|w2/.test(name)) net.params.set(name, Array.from({ length: v.size }, () => 0.3));
    const before = tf.memory().numTensors;
    const rows = auditNetwork(net, identity, graphs(4, 4), { schedules: 1 });
    expect(tf.memory().numTensors).toBe(before);
    const homogeneity = row(rows, 'positive homogeneity');
    expect(homogeneity.worst).toBeGreaterThan(1e-2);
    expect(homogeneity.pass).toBeNull();
    expect(homogeneity.subject).toMatch(/biases/);
    // an MLP update need not leave the state alone on an empty message: reported, no verdict
    expect(row(rows, 'neutral message').pass).toBeNull();
    expect(row(rows, 'neutral message').worst).toBeGreaterThan(0);
    net.dispose();
  });

  it('Bellman-Ford as a network: neutral message, monoid action and asynchronous replay all hold (chaotic relaxation; Bertsekas & Tsitsiklis, Parallel and Distributed Computation, 1989, ch. 6)', () => {
    const net = bellmanFordBiasFree();
    const before = tf.memory().numTensors;
    const rows = auditNetwork(net, identity, graphs(6, 9, 9), { schedules: 2 });
    expect(tf.memory().numTensors).toBe(before);
    expect(row(rows, 'recorded states match predict').worst).toBe(0);
    const neutral = row(rows, 'neutral message');
    expect(neutral.worst).toBe(0);
    expect(neutral.pass).toBe(true);
    const action = row(rows, 'monoid action');
    expect(action.worst).toBe(0);
    expect(action.pass).toBe(true);
    const replay = row(rows, 'asynchronous replay');
    expect(replay.note).toMatch(/fixed point: yes/);
    expect(replay.worst).toBeLessThan(1e-6);
    expect(replay.pass).toBe(true);
    expect(row(rows, 'extra synchronous steps').worst).toBe(0);
    net.dispose();
  });

  it('the update checks read every sampled step from one forward pass (not one rerun from step 0 per sampled step)', () => {
    const net = bellmanFordBiasFree();
    const calls: number[] = [];
    const forward = net.forward.bind(net);
    net.forward = (inputs, options) => {
      if (options.onStep) calls.push(options.steps);
      return forward(inputs, options);
    };
    const rows = auditNetwork(net, identity, graphs(3, 9, 9), { schedules: 1 });
    // One recorded pass for the update checks (T = 9 steps, sampled at 0, 1, 4, 8) and one of T + 1 steps for the schedule rows.
    expect(calls).toEqual([9, 10]);
    expect(row(rows, 'monoid action').samples).toBeGreaterThan(0);
    net.dispose();
  });

  it('a sum-update network is not asynchrony-safe: partial deliveries are counted again (the replay moves the outputs)', () => {
    // h ← h + Σ messages: every delivery adds again, so how often a message arrives changes the answer.
    const sumNet = new MessagePassingNetwork(model({ hidden: 1, aggregator: 'sum', message: 'min-plus', update: 'aggregate', bias: false }), 1, 1, new Rng(1));
    sumNet.params.set('encode.w', [1]);
    sumNet.params.set('message.semiring', [0]);
    sumNet.params.set('message.we', [0.01]);
    sumNet.params.set('decode.w', [1]);
    const rows = auditNetwork(sumNet, identity, graphs(4, 9, 6), { schedules: 1 });
    expect(row(rows, 'asynchronous replay').worst).toBeGreaterThan(1e-3);
    expect(row(rows, 'asynchronous replay').pass).toBeNull();
    sumNet.dispose();
  });
});

describe('network audit: homogeneity under the weight-scale rung', () => {
  it('a bias-free max arm (relu, mlp message, mlp update) on shortest-path is homogeneous under the rung to float32 rounding (ReLU(λx) = λReLU(x), λ > 0; common practice)', () => {
    const net = maxArm(false);
    const base = graphs(6, 4);
    const rows = auditNetwork(net, identity, base, { scales: [2, 10], schedules: 1, task: 'shortest-path' });
    const h = row(rows, 'positive homogeneity');
    console.info(`bias-free max arm, shortest-path rung: homogeneity residual mean ${h.mean.toExponential(2)}, worst ${h.worst.toExponential(2)}`);
    expect(h.samples).toBe(12);
    expect(h.worst).toBeLessThanOrEqual(1e-5);
    expect(h.pass).toBe(true);
    expect(h.note).toMatch(/as the shortest-path weight-scale rung ×λ builds them/);
    // The audit measures what the ladder does: the same residual from instances built by buildInstance at weight scale λ.
    for (const lambda of [2, 10]) {
      const direct = worstDeviation(net, graphs(6, 4, 7, lambda), base, lambda);
      expect(direct).toBeLessThanOrEqual(1e-5);
    }
    // The outputs are not trivially 0 (a zero network would be homogeneous for nothing).
    expect(Math.max(...predict(net, base, identity).flatMap((y) => Array.from(y, Math.abs)))).toBeGreaterThan(1e-2);
    net.dispose();
  });

  it('the same arm with biases is not homogeneous under the rung (reported, no promise)', () => {
    const net = maxArm(true);
    const rows = auditNetwork(net, identity, graphs(6, 4), { scales: [2, 10], schedules: 1, task: 'shortest-path' });
    const h = row(rows, 'positive homogeneity');
    console.info(`max arm with biases, shortest-path rung: homogeneity residual mean ${h.mean.toExponential(2)}, worst ${h.worst.toExponential(2)}`);
    expect(h.worst).toBeGreaterThan(1e-3);
    expect(h.mean).toBeGreaterThan(1e-3);
    expect(h.pass).toBeNull();
    expect(h.subject).toMatch(/biases/);
    net.dispose();
  });

  it('scaling the weights alone (a node input left unscaled, as the old 0/1 source marker was) breaks homogeneity of the bias-free arm', () => {
    const net = maxArm(false);
    const base = graphs(6, 4);
    const weightsOnly = base.map((inst) => ({ ...inst, edgeInputs: inst.edgeInputs.map((r) => r.map((w) => w * 10)) }));
    const residual = worstDeviation(net, weightsOnly, base, 10);
    console.info(`bias-free max arm, edge weights ×10 with node inputs unscaled: worst residual ${residual.toExponential(2)}`);
    expect(residual).toBeGreaterThan(1e-2);
    net.dispose();
  });

  it('Bellman-Ford on the weight-unit inputs needs no bias, so it is homogeneous under the rung too (reported: min-plus messages are not homogeneous for every W)', () => {
    const net = bellmanFordBiasFree();
    const base = graphs(4, 9, 9);
    const rows = auditNetwork(net, identity, base, { scales: [0.5, 2, 10], schedules: 1, task: 'shortest-path' });
    const h = row(rows, 'positive homogeneity');
    expect(h.worst).toBeLessThan(1e-6);
    expect(h.pass).toBeNull();
    // and it is exact: predictions = Bellman-Ford distances at scale 1 and at scale 10
    for (const [lambda, insts] of [[1, base], [10, graphs(4, 9, 9, 10)]] as const) {
      predict(net, insts, identity).forEach((y, g) => insts[g]!.target.forEach((t, v) => expect(y[v]).toBeCloseTo(t, lambda === 1 ? 4 : 3)));
    }
    net.dispose();
  });

  it('where the rung does not scale every input with the target (hop-count: nothing scales) the row only reports, and says why', () => {
    const net = maxArm(false);
    const rows = auditNetwork(net, identity, graphs(4, 4, 7, 1, 'hop-count'), { scales: [2, 10], schedules: 1, task: 'hop-count' });
    const h = row(rows, 'positive homogeneity');
    expect(h.pass).toBeNull();
    expect(h.note).toMatch(/does not scale every input and the target together/);
    // f(x) is unchanged by the rung, so against λ f(x) the residual is |1 − λ| / λ (λ = 2: 0.5, λ = 10: 0.9).
    expect(h.worst).toBeCloseTo(0.9, 5);
    net.dispose();
  });

  it('refuses an unknown task, naming where the error comes from', () => {
    const net = maxArm(false);
    expect(() => auditNetwork(net, identity, graphs(2, 4), { scales: [2], schedules: 1, task: 'sorting' })).toThrow("tasks/registry: unknown task 'sorting'");
    net.dispose();
  });
});
