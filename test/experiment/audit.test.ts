/**
 * The algebraic audit on hand-built components, where the right answer is
 * known from the algebra itself.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs-core';
import { initBackend } from '../../src/engine/backend.ts';
import { auditAggregator, auditNetwork, neutralElement, type AuditRow } from '../../src/experiment/audit.ts';
import { MessagePassingNetwork } from '../../src/model/network.ts';
import { modelSchema, type ModelOptions } from '../../src/experiment/spec.ts';
import type { FeatureTransforms } from '../../src/train/batch.ts';
import { buildInstance } from '../../src/tasks/sample.ts';
import type { TaskInstance } from '../../src/tasks/types.ts';
import { Rng } from '../../src/util/rng.ts';
import { bellmanFordNetwork } from '../helpers.ts';

const identity: FeatureTransforms = { node: ['identity'], edge: ['identity'], nodeStats: [], edgeStats: [] };

function model(overrides: Partial<ModelOptions>): ModelOptions {
  return modelSchema.parse({ hidden: 6, steps: { rule: 'nodes', trainJitter: 0 }, ...overrides });
}

function graphs(count: number, seed: number, nodes = 7): TaskInstance[] {
  const rng = new Rng(seed);
  return Array.from({ length: count }, (_, i) => buildInstance('shortest-path', 'er', nodes, rng.fork(i)).instance);
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
    const net = bellmanFordNetwork();
    const before = tf.memory().numTensors;
    const rows = auditNetwork(net, identity, graphs(6, 9, 9), { schedules: 2 });
    expect(tf.memory().numTensors).toBe(before);
    expect(row(rows, 'replay matches forward').worst).toBeLessThan(1e-6);
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
