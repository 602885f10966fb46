import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs-core';
import Graph from 'graphology';
import { dijkstra as graphologyDijkstra } from 'graphology-shortest-path';
import { initBackend } from '../../src/engine/backend.ts';
import { MessagePassingNetwork } from '../../src/model/network.ts';
import { AGGREGATOR_REGISTRY } from '../../src/model/aggregators.ts';
import { modelSchema, type ModelOptions } from '../../src/experiment/spec.ts';
import { Rng } from '../../src/util/rng.ts';
import { makeBatch, type FeatureTransforms } from '../../src/train/batch.ts';
import { uploadBatch } from '../../src/train/tensors.ts';
import { maskedLoss } from '../../src/train/loss.ts';
import { buildInstance } from '../../src/tasks/sample.ts';
import type { TaskInstance } from '../../src/tasks/types.ts';
import { bellmanFordNetwork } from '../helpers.ts';

const identity: FeatureTransforms = { node: ['identity'], edge: ['identity'], nodeStats: [], edgeStats: [] };

function model(overrides: Partial<ModelOptions>): ModelOptions {
  return modelSchema.parse({ hidden: 6, ...overrides });
}

function instances(count: number, seed: number, nodes = 7, weightRange: [number, number] = [1, 10]): TaskInstance[] {
  const rng = new Rng(seed);
  return Array.from({ length: count }, (_, i) => buildInstance('shortest-path', 'er', nodes, rng.fork(i), { weightRange }).instance);
}

function lossOf(net: MessagePassingNetwork, insts: TaskInstance[], steps: number): number {
  const t = uploadBatch(makeBatch(insts, identity));
  try {
    return tf.tidy(() => maskedLoss(net.forward(t, { steps }).prediction, t.target, t.mask, 'mse').dataSync()[0]!);
  } finally {
    t.dispose();
  }
}

beforeAll(async () => {
  await initBackend('wasm');
});

describe('aggregators against a naive loop over edges (common practice)', () => {
  const n = 5;
  const channels = 3;
  // node 4 receives nothing: every aggregator must give 0 there
  const dst = [0, 0, 1, 2, 2, 2, 3];
  const rng = new Rng(11);
  const values = dst.map(() => Array.from({ length: channels }, () => rng.uniform(-3, 3)));
  const naive = (combine: (xs: number[]) => number) =>
    Array.from({ length: n }, (_, v) =>
      Array.from({ length: channels }, (_, c) => {
        const xs = dst.flatMap((d, e) => (d === v ? [values[e]![c]!] : []));
        return xs.length ? combine(xs) : 0;
      }),
    );
  const tau = 0.7;
  const expected: Record<string, number[][]> = {
    sum: naive((xs) => xs.reduce((a, b) => a + b, 0)),
    mean: naive((xs) => xs.reduce((a, b) => a + b, 0) / xs.length),
    max: naive((xs) => Math.max(...xs)),
    min: naive((xs) => Math.min(...xs)),
    'smooth-max': naive((xs) => tau * Math.log(xs.reduce((a, x) => a + Math.exp(x / tau), 0))),
    'smooth-min': naive((xs) => -tau * Math.log(xs.reduce((a, x) => a + Math.exp(-x / tau), 0))),
  };
  for (const [name, want] of Object.entries(expected)) {
    it(name, () => {
      const agg = AGGREGATOR_REGISTRY[name as keyof typeof AGGREGATOR_REGISTRY];
      const got = tf.tidy(() => {
        const dstT = tf.tensor1d(dst, 'int32');
        const counts = tf.tensor2d([2, 1, 3, 1, 0], [n, 1]);
        return agg
          .aggregate({ messages: tf.tensor2d(values), dst: dstT, nodes: n, hasIncoming: tf.minimum(counts, 1) as tf.Tensor2D, temperature: tau })
          .arraySync() as number[][];
      });
      for (let v = 0; v < n; v++) for (let c = 0; c < channels; c++) expect(got[v]![c]).toBeCloseTo(want[v]![c]!, 4);
    });
  }

  it('log-sum-exp bound: max(x) <= τ·LSE(x/τ) <= max(x) + τ·log n (Boyd & Vandenberghe, Convex Optimization, 2004, §3.1.5)', () => {
    const smooth = expected['smooth-max']!;
    const hard = expected['max']!;
    const indegree = [2, 1, 3, 1, 0];
    for (let v = 0; v < 4; v++) {
      for (let c = 0; c < channels; c++) {
        expect(smooth[v]![c]!).toBeGreaterThanOrEqual(hard[v]![c]! - 1e-9);
        expect(smooth[v]![c]!).toBeLessThanOrEqual(hard[v]![c]! + tau * Math.log(indegree[v]!) + 1e-9);
      }
    }
  });
});

// Most parameters agree to ~1e-3 relative; the 2e-2 bound leaves room for ReLU kinks and float32 rounding.
describe('gradients of the whole network against central finite differences (common practice)', () => {
  const cases: Array<Partial<ModelOptions>> = [
    { aggregator: 'sum', update: 'gated', activation: 'leaky-relu' },
    { aggregator: 'max', update: 'mlp' },
    { aggregator: 'min', update: 'mlp', activation: 'leaky-relu' },
    { aggregator: 'mean', update: 'mlp', bias: false },
    { aggregator: 'smooth-max', update: 'gated', aggregatorTemperature: 0.5 },
    { aggregator: 'min', message: 'smooth-min-plus', update: 'mlp', messageTemperature: 0.5 },
  ];
  for (const options of cases) {
    it(JSON.stringify(options), () => {
      const net = new MessagePassingNetwork(model(options), 1, 1, new Rng(5));
      // Non-zero second layers so every parameter influences the loss.
      for (const [name, v] of net.params.vars) {
        if (/w2|b2/.test(name)) net.params.set(name, Array.from({ length: v.size }, (_, i) => Math.sin(i + 1) * 0.3));
      }
      // Small targets keep the float32 loss small, so finite differences are not drowned by rounding.
      const data = instances(3, 9, 6, [0.1, 1]);
      const t = uploadBatch(makeBatch(data, identity));
      const vars = [...net.params.vars.values()];
      const grads = tf.tidy(() => {
        const { grads } = tf.variableGrads(() => maskedLoss(net.forward(t, { steps: 3 }).prediction, t.target, t.mask, 'mse'), vars);
        return Object.fromEntries(vars.map((v) => [v.name, Array.from(grads[v.name]!.dataSync())]));
      });
      t.dispose();
      // Directional derivative along a random direction, per parameter. ReLU kinks make
      // finite differences wrong when a unit crosses zero inside the step, and float32
      // rounding makes them noisy when the step is tiny, so each parameter must agree
      // at one of three step sizes.
      const dir = new Rng(77);
      const analyticAll: Array<[string, number[], number[], number]> = [];
      for (const [name, variable] of net.params.vars) {
        const base = Array.from(variable.dataSync());
        const v = base.map(() => dir.uniform(-1, 1));
        analyticAll.push([name, base, v, grads[variable.name]!.reduce((acc, g, i) => acc + g * v[i]!, 0)]);
      }
      const floor = 5e-2 * Math.max(...analyticAll.map((a) => Math.abs(a[3])));
      let checked = 0;
      for (const [name, base, v, analytic] of analyticAll) {
        let best = Infinity;
        let bestNumeric = NaN;
        for (const eps of [3e-3, 1e-3, 3e-4]) {
          net.params.set(name, base.map((x, i) => x + eps * v[i]!));
          const plus = lossOf(net, data, 3);
          net.params.set(name, base.map((x, i) => x - eps * v[i]!));
          const minus = lossOf(net, data, 3);
          net.params.set(name, base);
          const numeric = (plus - minus) / (2 * eps);
          const rel = Math.abs(analytic - numeric) / Math.max(Math.abs(analytic), floor);
          if (rel < best) {
            best = rel;
            bestNumeric = numeric;
          }
        }
        expect(best, `${name}: analytic ${analytic} numeric ${bestNumeric}`).toBeLessThan(2e-2);
        checked++;
      }
      expect(checked).toBeGreaterThan(5);
      net.dispose();
    });
  }
});

describe('bias-free networks are positively homogeneous (common practice: ReLU(λx) = λReLU(x) for λ > 0)', () => {
  for (const aggregator of ['sum', 'max', 'mean', 'min'] as const) {
    it(`${aggregator}: f(λx) = λ f(x) for λ in [0.01, 1000]`, () => {
      const net = new MessagePassingNetwork(model({ aggregator, bias: false }), 1, 1, new Rng(2));
      for (const [name, v] of net.params.vars) if (/w2/.test(name)) net.params.set(name, Array.from({ length: v.size }, (_, i) => Math.cos(i) * 0.2));
      const data = instances(2, 4, 6);
      const outAt = (lambda: number) => {
        const t = uploadBatch(makeBatch(data, identity, { inputScale: lambda }));
        const out = tf.tidy(() => net.forward(t, { steps: 4 }).prediction);
        const values = Array.from(out.dataSync());
        out.dispose();
        t.dispose();
        return values;
      };
      const base = outAt(1);
      const peak = Math.max(...base.map(Math.abs));
      for (const lambda of [0.01, 0.1, 10, 1000]) {
        const scaled = outAt(lambda);
        const worst = Math.max(...scaled.map((y, i) => Math.abs(y - lambda * base[i]!)));
        expect(worst / (lambda * peak)).toBeLessThan(1e-4);
      }
      net.dispose();
    });
  }

  it('a network with biases is not homogeneous (the check can fail)', () => {
    const net = new MessagePassingNetwork(model({ aggregator: 'sum', bias: true }), 1, 1, new Rng(2));
    for (const [name, v] of net.params.vars) if (/\.b/.test(name)) net.params.set(name, Array.from({ length: v.size }, () => 0.3));
    const data = instances(1, 4, 6);
    const at = (lambda: number) => {
      const t = uploadBatch(makeBatch(data, identity, { inputScale: lambda }));
      const out = tf.tidy(() => net.forward(t, { steps: 3 }).prediction);
      const values = Array.from(out.dataSync());
      out.dispose();
      t.dispose();
      return values;
    };
    const a = at(1);
    const b = at(10);
    expect(Math.max(...b.map((y, i) => Math.abs(y - 10 * a[i]!)))).toBeGreaterThan(1e-2);
    net.dispose();
  });
});

describe('min-plus algebra executes shortest paths', () => {
  it('repeated min-plus matrix-vector products with a zero diagonal give shortest-path distances (algebraic path identity; Baccelli, Cohen, Olsder & Quadrat, Synchronization and Linearity, 1992, §2.3; checked with graphology-shortest-path)', () => {
    const rng = new Rng(21);
    for (let trial = 0; trial < 20; trial++) {
      const { instance } = buildInstance('shortest-path', 'er', 9, rng.fork(trial));
      const n = instance.nodes;
      // A[u][v] = weight of edge u->v, 0 on the diagonal, +big elsewhere
      const BIG = 1e6;
      const A: number[][] = Array.from({ length: n }, (_, u) => Array.from({ length: n }, (_, v) => (u === v ? 0 : BIG)));
      instance.messageSrc.forEach((u, e) => (A[u]![instance.messageDst[e]!] = Math.min(A[u]![instance.messageDst[e]!]!, instance.edgeInputs[e]![0]!)));
      const d0 = Array.from({ length: n }, (_, v) => (v === instance.source ? 0 : BIG));
      // x_{k+1} = A^T ⊗ x_k in min-plus: x_v = min_u (x_u + A_uv), as a tfjs min over a broadcast sum
      let x = tf.tensor2d(d0, [1, n]);
      const At = tf.tensor2d(A);
      for (let k = 0; k < n; k++) {
        const next = tf.tidy(() => tf.min(tf.add(tf.reshape(x, [n, 1]), At), 0).reshape([1, n]));
        x.dispose();
        x = next as tf.Tensor2D;
      }
      const got = Array.from(x.dataSync());
      x.dispose();
      At.dispose();
      const g = new Graph({ type: 'directed' });
      for (let v = 0; v < n; v++) g.addNode(String(v));
      instance.messageSrc.forEach((u, e) => {
        const key = `${u}->${instance.messageDst[e]}`;
        if (!g.hasEdge(key)) g.addDirectedEdgeWithKey(key, String(u), String(instance.messageDst[e]), { weight: instance.edgeInputs[e]![0] });
      });
      const paths = graphologyDijkstra.singleSource(g, String(instance.source));
      for (let v = 0; v < n; v++) {
        const path = paths[String(v)]!;
        let length = 0;
        for (let i = 1; i < path.length; i++) length += g.getEdgeAttribute(g.edge(path[i - 1]!, path[i]!)!, 'weight') as number;
        expect(got[v]).toBeCloseTo(length, 3);
      }
    }
  });

  it('a min-plus message layer with hand-set weights runs Bellman-Ford exactly (Sedgewick & Wayne, Algorithms 4th ed., §4.4; against graphology-shortest-path)', () => {
    const net = bellmanFordNetwork();
    const rng = new Rng(8);
    for (let trial = 0; trial < 30; trial++) {
      const { instance, graph } = buildInstance('shortest-path', 'er', 12, rng.fork(trial));
      const t = uploadBatch(makeBatch([instance], identity));
      const out = tf.tidy(() => net.forward(t, { steps: instance.nodes }).prediction);
      const got = Array.from(out.dataSync());
      out.dispose();
      t.dispose();
      const paths = graphologyDijkstra.singleSource(graph, String(instance.source));
      for (let v = 0; v < instance.nodes; v++) {
        const path = paths[String(v)]!;
        let length = 0;
        for (let i = 1; i < path.length; i++) length += graph.getEdgeAttribute(graph.edge(path[i - 1]!, path[i]!)!, 'weight') as number;
        expect(got[v]).toBeCloseTo(length, 3);
      }
    }
    net.dispose();
  });
});

describe('memory', () => {
  it('a forward and backward pass leaves no tensors behind', () => {
    const net = new MessagePassingNetwork(model({ aggregator: 'max', update: 'gated' }), 1, 1, new Rng(3));
    const data = instances(2, 1, 6);
    const before = tf.memory().numTensors;
    const t = uploadBatch(makeBatch(data, identity));
    tf.tidy(() => {
      tf.variableGrads(() => maskedLoss(net.forward(t, { steps: 3 }).prediction, t.target, t.mask, 'huber'), [...net.params.vars.values()]);
    });
    t.dispose();
    expect(tf.memory().numTensors).toBe(before);
    net.dispose();
  });
});

describe('forward onStep: the hidden states of the one forward loop', () => {
  const configs: Array<[string, Partial<ModelOptions>]> = [
    ['mlp update, max', { aggregator: 'max' }],
    ['gated update, sum', { aggregator: 'sum', update: 'gated' }],
    ['aggregate update, min-plus messages', { aggregator: 'min', update: 'aggregate', message: 'min-plus' }],
  ];
  for (const [label, overrides] of configs) {
    it(`${label}: called once per step with the new state; decode(last) is the prediction; results bit-identical with and without it`, () => {
      const net = new MessagePassingNetwork(model(overrides), 1, 1, new Rng(5));
      for (const [name, v] of net.params.vars) if (/w2/.test(name)) net.params.set(name, Array.from({ length: v.size }, (_, i) => Math.sin(i + 1) * 0.3));
      const t = uploadBatch(makeBatch(instances(2, 6, 7), identity));
      const before = tf.memory().numTensors;
      try {
        const out = tf.tidy(() => {
          const plain = net.forward(t, { steps: 5, trace: true });
          const seen: number[] = [];
          const decodedStates: tf.Tensor2D[] = [];
          let last: tf.Tensor2D | null = null;
          const watched = net.forward(t, {
            steps: 5,
            onStep: (step, state) => {
              seen.push(step);
              decodedStates.push(net.decode(state));
              last = tf.clone(state);
            },
          });
          const kept: tf.Tensor2D[] = [];
          const released = net.forward(t, { steps: 5, releaseSteps: true, onStep: (_step, state) => kept.push(tf.clone(state)) });
          return {
            seen: tf.tensor1d(seen),
            plain: plain.prediction,
            watched: watched.prediction,
            released: released.prediction,
            lastDecoded: net.decode(last!),
            trace: tf.concat(plain.trace, 1),
            decoded: tf.concat(decodedStates, 1),
            keptLast: net.decode(kept[kept.length - 1]!),
            keptFirstDiffers: tf.max(tf.abs(tf.sub(kept[0]!, kept[1]!))),
          };
        });
        const bits = (x: tf.Tensor) => Array.from(x.dataSync());
        expect(bits(out.seen)).toEqual([1, 2, 3, 4, 5]);
        const plain = bits(out.plain);
        for (const other of [out.watched, out.released, out.lastDecoded, out.keptLast]) bits(other).forEach((v, i) => expect(Object.is(v, plain[i])).toBe(true));
        const trace = bits(out.trace);
        bits(out.decoded).forEach((v, i) => expect(Object.is(v, trace[i])).toBe(true));
        // Consecutive states differ, so handing over the previous state instead of the new one would fail above.
        expect(bits(out.keptFirstDiffers)[0]).toBeGreaterThan(0);
        for (const x of Object.values(out)) x.dispose();
        expect(tf.memory().numTensors).toBe(before);
      } finally {
        t.dispose();
        net.dispose();
      }
    });
  }

  it('until-stable: onStep runs for the steps actually taken, not the cap (a Bellman-Ford network settles after its depth)', () => {
    const net = bellmanFordNetwork();
    const t = uploadBatch(makeBatch(instances(1, 8, 6), identity));
    try {
      const calls: number[] = [];
      const stepsRun = tf.tidy(() => net.forward(t, { steps: 200, stopTolerance: 1e-3, onStep: (step) => calls.push(step) }).stepsRun);
      expect(stepsRun).toBeLessThan(200);
      expect(calls).toEqual(Array.from({ length: stepsRun }, (_, i) => i + 1));
    } finally {
      t.dispose();
      net.dispose();
    }
  });
});
