/**
 * The fused process kernels (src/engine/kernels-process.ts) must give exactly
 * the bits of the stock composition they replace, forward and backward, for
 * every aggregator and activation they cover, with and without biases, under a
 * gradient tape (unfused relu) and outside one (relu fused into the matmul).
 * The reference is the stock path itself (differential testing, common
 * practice); a directional central difference checks the gradient against the
 * loss itself (common practice for gradient checking).
 */
import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs-core';
import { initBackend } from '../../src/engine/backend.ts';
import type { BackendWasm } from '@tensorflow/tfjs-backend-wasm';
import { backendUnary, processSteps, setFusedProcessEnabled, type ProcessMessage } from '../../src/engine/kernels-process.ts';
import { modelSchema } from '../../src/experiment/spec.ts';
import { MessagePassingNetwork, type NetworkInputs } from '../../src/model/network.ts';
import { fusedProcessApplies } from '../../src/model/fused-process.ts';
import { buildInstance } from '../../src/tasks/sample.ts';
import type { TaskInstance } from '../../src/tasks/types.ts';
import { makeBatch, type FeatureTransforms } from '../../src/train/batch.ts';
import { uploadBatch, type BatchTensors } from '../../src/train/tensors.ts';
import { maskedLoss } from '../../src/train/loss.ts';
import { train } from '../../src/train/trainer.ts';
import { Rng } from '../../src/util/rng.ts';

const TRANSFORMS: FeatureTransforms = { node: ['identity'], edge: ['identity'], nodeStats: [], edgeStats: [] };

beforeAll(async () => {
  await initBackend('wasm');
});

afterEach(() => setFusedProcessEnabled(true));

function instances(family: string, count: number, weightRange: [number, number], seed = 3): TaskInstance[] {
  const rng = new Rng(seed);
  return Array.from({ length: count }, (_, i) => {
    const r = rng.fork(i);
    const params: Record<string, number> = family === 'er' ? { edgeProbability: 0.3 } : {};
    return buildInstance('shortest-path', family, r.int(8, 14), r, { weightRange, params }).instance;
  });
}

interface Outcome {
  loss: number;
  grads: Record<string, Float32Array>;
  evaluated: Float32Array;
}

function lossAndGrads(network: MessagePassingNetwork, batch: BatchTensors, steps: number): Outcome {
  const vars = [...network.params.vars.values()];
  return tf.tidy(() => {
    const { value, grads } = tf.variableGrads(
      () => maskedLoss(network.forward(batch, { steps }).prediction, batch.target, batch.mask, 'huber'),
      vars,
    );
    const evaluated = network.forward(batch, { steps }).prediction.dataSync() as Float32Array;
    return {
      loss: value.dataSync()[0]!,
      grads: Object.fromEntries(Object.entries(grads).map(([name, g]) => [name, g.dataSync() as Float32Array])),
      evaluated: evaluated.slice(),
    };
  });
}

/** Count of values that differ under Object.is (so NaN = NaN and 0 ≠ -0). */
function differing(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let n = a.length === b.length ? 0 : Math.max(a.length, b.length);
  for (let i = 0; i < Math.min(a.length, b.length); i++) if (!Object.is(a[i], b[i])) n++;
  return n;
}

/** Loss, outputs and every gradient of the two paths equal bit for bit. */
function expectSameBits(fused: Outcome, stock: Outcome): void {
  expect(Object.is(fused.loss, stock.loss)).toBe(true);
  expect(differing(fused.evaluated, stock.evaluated)).toBe(0);
  expect(Object.keys(fused.grads).sort()).toEqual(Object.keys(stock.grads).sort());
  for (const name of Object.keys(stock.grads)) expect([name, differing(fused.grads[name]!, stock.grads[name]!)]).toEqual([name, 0]);
}

/**
 * Train the same network from the same seeds on the fused path and on the stock path: the outcome
 * (loss curve, validation curve, kept step, status) and every weight must be equal, and the fused
 * run must leave no tensor behind.
 */
function expectSameTrainingRun(model: Record<string, unknown>, data: TaskInstance[], steps: number): void {
  const options = modelSchema.parse(model);
  const budget = { steps, batchGraphs: 16, learningRate: 0.01, clipNorm: 1, loss: 'huber', validateEvery: steps / 2 } as const;
  const run = (fused: boolean) => {
    setFusedProcessEnabled(fused);
    const network = new MessagePassingNetwork(options, data[0]!.nodeInputs[0]!.length, data[0]!.edgeInputs[0]!.length, new Rng(2));
    const outcome = train({ network, train: data.slice(0, 24), validation: data.slice(24), transforms: TRANSFORMS, budget, rng: new Rng(4) });
    const weights = network.params.snapshot();
    network.dispose();
    return { outcome, weights };
  };
  try {
    const before = tf.memory().numTensors;
    const fused = run(true);
    expect(tf.memory().numTensors).toBe(before);
    const stock = run(false);
    expect(fused.outcome).toEqual(stock.outcome);
    for (const [name, w] of stock.weights) expect([name, differing(fused.weights.get(name)!, w)]).toEqual([name, 0]);
  } finally {
    setFusedProcessEnabled(true);
  }
}

/**
 * A freshly built network's update output layer is zero (each step starts as the identity), so no
 * gradient reaches the aggregation or the message layers; `trained` moves every weight by a seeded
 * random amount first, as some training would, so every gradient rule is exercised.
 */
function compareWays(model: Record<string, unknown>, data: TaskInstance[], steps: number, trained = false): void {
  const options = modelSchema.parse({ hidden: 32, ...model, steps: { rule: 'fixed', count: steps, trainJitter: 0 }, ...model });
  const network = new MessagePassingNetwork(options, data[0]!.nodeInputs[0]!.length, data[0]!.edgeInputs[0]!.length, new Rng(11));
  if (trained) {
    const rng = new Rng(41);
    network.params.restore(new Map([...network.params.snapshot()].map(([name, w]) => [name, Float32Array.from(w, (v) => v + rng.uniform(-0.3, 0.3))])));
  }
  const batch = uploadBatch(makeBatch(data, TRANSFORMS));
  try {
    expect(fusedProcessApplies(options, {}, batch.nodes, batch.src.shape[0], steps)).toBe(true);
    setFusedProcessEnabled(true);
    const fused = lossAndGrads(network, batch, steps);
    setFusedProcessEnabled(false);
    const stock = lossAndGrads(network, batch, steps);
    expectSameBits(fused, stock);
  } finally {
    setFusedProcessEnabled(true);
    batch.dispose();
    network.dispose();
  }
}

/**
 * The semiring message layers through the fused kernels, composed here as the network's fused forward
 * would (encode, edge term, the kernels, decode), against the network's stock forward: the network
 * does not route these kinds to the kernels yet (src/model/fused-process.ts, FUSED_MESSAGES).
 */
function semiringForward(network: MessagePassingNetwork, batch: BatchTensors, steps: number): tf.Tensor2D {
  const p = network.params;
  const o = network.options;
  const optional = (name: string) => (p.has(name) ? p.get(name) : undefined);
  const encoded = network.encode(batch.nodeX);
  const edgeTerm = network.edgeTerm(batch.edgeX);
  const h = processSteps(
    {
      encoded,
      edgeTerm,
      inputTerm: network.stepConstants(encoded).inputTerm!,
      src: batch.src,
      dst: batch.dst,
      ws: p.get('message.semiring') as tf.Tensor2D,
      ju: tf.concat([p.get('update.wh'), p.get('update.wa')], 0) as tf.Tensor2D,
      w2u: p.get('update.w2') as tf.Tensor2D,
      b2u: optional('update.b2'),
    },
    {
      steps,
      message: o.message as ProcessMessage,
      messageTemperature: o.messageTemperature,
      aggregator: o.aggregator as 'sum',
      temperature: o.aggregatorTemperature,
      activation: o.activation as 'relu',
    },
  );
  return network.decode(h);
}

/**
 * `weights`: 'fresh' (the update output layer is zero, so only the update layers get a gradient),
 * 'moved' (every weight moved by a seeded amount), or 'tied' (moved, then every encoder column and
 * every semiring weight made equal, so the first step's sums tie across all k).
 */
function compareSemiring(model: Record<string, unknown>, data: TaskInstance[], steps: number, weights: 'fresh' | 'moved' | 'tied' = 'moved'): void {
  const options = modelSchema.parse({ hidden: 32, ...model, steps: { rule: 'fixed', count: steps, trainJitter: 0 } });
  const network = new MessagePassingNetwork(options, data[0]!.nodeInputs[0]!.length, data[0]!.edgeInputs[0]!.length, new Rng(11));
  if (weights !== 'fresh') {
    const rng = new Rng(41);
    const H = options.hidden;
    const moved = new Map([...network.params.snapshot()].map(([name, w]) => [name, Float32Array.from(w, (v) => v + rng.uniform(-0.3, 0.3))]));
    if (weights === 'tied') {
      moved.set('message.semiring', moved.get('message.semiring')!.fill(0.25));
      const encode = moved.get('encode.w')!;
      for (let i = 0; i < encode.length; i++) encode[i] = encode[i - (i % H)]!;
      moved.get('encode.b')?.fill(0.5);
    }
    network.params.restore(moved);
  }
  const batch = uploadBatch(makeBatch(data, TRANSFORMS));
  const vars = [...network.params.vars.values()];
  const run = (forward: () => tf.Tensor2D): Outcome =>
    tf.tidy(() => {
      const { value, grads } = tf.variableGrads(() => maskedLoss(forward(), batch.target, batch.mask, 'huber'), vars);
      return {
        loss: value.dataSync()[0]!,
        grads: Object.fromEntries(Object.entries(grads).map(([name, g]) => [name, g.dataSync() as Float32Array])),
        evaluated: (forward().dataSync() as Float32Array).slice(),
      };
    });
  try {
    setFusedProcessEnabled(false);
    const stock = run(() => network.forward(batch, { steps }).prediction);
    const fused = run(() => semiringForward(network, batch, steps));
    expectSameBits(fused, stock);
  } finally {
    setFusedProcessEnabled(true);
    batch.dispose();
    network.dispose();
  }
}

describe('fused semiring message layers give the stock composition’s bits', () => {
  const er = instances('er', 16, [1, 10]);
  const small = instances('er', 8, [1, 10], 29);
  const ties = instances('er', 12, [3, 3], 5);
  const dags = instances('dag', 12, [1, 10], 7);
  for (const message of ['min-plus', 'max-plus', 'smooth-min-plus', 'smooth-max-plus']) {
    for (const aggregator of ['min', 'max', 'sum', 'mean', 'smooth-min', 'smooth-max']) {
      it(`${message} with ${aggregator}: relu and leaky relu, with biases and bias-free, fresh and moved weights`, () => {
        compareSemiring({ message, aggregator, messageTemperature: 0.3 }, er, 6);
        compareSemiring({ message, aggregator, messageTemperature: 1, activation: 'leaky-relu', bias: false }, er, 5);
        compareSemiring({ message, aggregator, messageTemperature: 0.3, aggregatorTemperature: 0.5 }, er, 4, 'fresh');
      });
    }
    it(`${message}: temperatures, small and odd widths, ties, DAGs (nodes without incoming edges)`, () => {
      compareSemiring({ message, aggregator: 'min', messageTemperature: 0.05, hidden: 16 }, small, 10);
      compareSemiring({ message, aggregator: 'sum', messageTemperature: 3, hidden: 8, activation: 'leaky-relu', bias: false }, small, 3);
      compareSemiring({ message, aggregator: 'max', messageTemperature: 0.37, hidden: 7 }, small, 4);
      compareSemiring({ message, aggregator: 'smooth-min', messageTemperature: 0.7, hidden: 10, activation: 'leaky-relu' }, small, 4);
      compareSemiring({ message, aggregator: 'min', messageTemperature: 0.3 }, ties, 6);
      compareSemiring({ message, aggregator: 'min', messageTemperature: 0.3 }, ties, 3, 'tied');
      compareSemiring({ message, aggregator: 'mean', messageTemperature: 1, activation: 'leaky-relu', bias: false }, er, 3, 'tied');
      compareSemiring({ message, aggregator: 'min', messageTemperature: 0.3 }, dags, 1);
      compareSemiring({ message, aggregator: 'smooth-max', messageTemperature: 1, bias: false }, dags, 20);
    });
    it(`${message} through the network's own forward (fused path chosen, moved weights)`, () => {
      compareWays({ message, aggregator: 'min', messageTemperature: 0.3 }, er, 6, true);
      compareWays({ message, aggregator: 'smooth-max', messageTemperature: 1, activation: 'leaky-relu', bias: false }, er, 4, true);
    });
  }

  it('a smooth-min-plus training run keeps its outcome and weights and leaves no tensor behind', () => {
    expectSameTrainingRun(
      { hidden: 16, message: 'smooth-min-plus', messageTemperature: 0.3, aggregator: 'min', steps: { rule: 'nodes', trainJitter: 4 } },
      instances('er', 32, [1, 10], 43),
      8,
    );
  });
});

describe('fused process kernels give the stock composition’s bits', () => {
  const er = instances('er', 16, [1, 10]);
  for (const aggregator of ['max', 'sum', 'mean', 'min']) {
    for (const activation of ['relu', 'leaky-relu']) {
      it(`${aggregator}, ${activation}, with biases and bias-free`, () => {
        compareWays({ aggregator, activation }, er, 9);
        compareWays({ aggregator, activation, bias: false }, er, 9);
      });
    }
  }

  for (const aggregator of ['smooth-max', 'smooth-min']) {
    for (const activation of ['relu', 'leaky-relu']) {
      it(`${aggregator}, ${activation}, τ = 1 and 0.1, with biases and bias-free`, () => {
        compareWays({ aggregator, activation, aggregatorTemperature: 1 }, er, 9);
        compareWays({ aggregator, activation, aggregatorTemperature: 1 }, er, 9, true);
        compareWays({ aggregator, activation, aggregatorTemperature: 0.1, bias: false }, er, 9, true);
      });
    }
  }

  it('smooth aggregators at other temperatures, on small shapes, with ties and on DAGs (nodes without incoming edges)', () => {
    const small = instances('er', 8, [1, 10], 29);
    const ties = instances('er', 12, [3, 3], 5);
    const dags = instances('dag', 12, [1, 10], 7);
    for (const aggregator of ['smooth-max', 'smooth-min']) {
      compareWays({ aggregator, aggregatorTemperature: 0.37, hidden: 16 }, small, 10, true);
      compareWays({ aggregator, aggregatorTemperature: 3, hidden: 8, activation: 'leaky-relu', bias: false }, small, 3, true);
      // widths that are not a multiple of 4 take the SIMD loops' one-by-one tails
      compareWays({ aggregator, aggregatorTemperature: 0.3, hidden: 7 }, small, 4, true);
      compareWays({ aggregator, aggregatorTemperature: 0.7, hidden: 10, activation: 'leaky-relu' }, small, 4, true);
      compareWays({ aggregator, aggregatorTemperature: 0.1 }, ties, 6, true);
      compareWays({ aggregator, aggregatorTemperature: 1, activation: 'leaky-relu' }, ties, 6, true);
      compareWays({ aggregator, aggregatorTemperature: 0.1 }, dags, 1, true);
      compareWays({ aggregator, aggregatorTemperature: 1, bias: false }, dags, 20, true);
    }
  });

  it('every hard aggregator with moved weights (gradient through the aggregation and the message layers)', () => {
    for (const aggregator of ['max', 'sum', 'mean', 'min']) {
      compareWays({ aggregator }, er, 9, true);
      compareWays({ aggregator, activation: 'leaky-relu', bias: false }, er, 5, true);
    }
  });

  it('the backend’s own Exp and Log, run on blocks of memory, give tf.exp’s and tf.log’s bits', () => {
    // The smooth aggregators' exp and log must be the backend's (Math.exp and Math.log round differently).
    const rng = new Rng(43);
    const n = 4099;
    const values = Float32Array.from({ length: n }, () => rng.uniform(-1, 1) * 10 ** rng.uniform(-3, 3) * (rng.uniform(0, 1) < 0.3 ? 100 : 1));
    [NaN, -Infinity, Infinity, 0, -0, 1, -1, 88.7, 89, -87.3, -104, -150, 1e-45, -1e-45, 3.4e38].forEach((v, i) => (values[i] = v));
    const backend = tf.backend() as unknown as BackendWasm;
    const offset = (t: tf.Tensor) => backend.dataIdMap.get(t.dataId)!.memoryOffset;
    for (const [name, stock] of [['Exp', tf.exp], ['Log', tf.log]] as const) {
      const x = tf.tensor1d(values);
      const out = tf.tensor1d(new Float32Array(n));
      const before = { tensors: tf.memory().numTensors, data: backend.numDataIds() };
      // An odd start and length: the fused kernels call it on sub-blocks of their stash.
      backendUnary(backend, name, offset(x) + 4, offset(out) + 4, n - 3);
      expect({ tensors: tf.memory().numTensors, data: backend.numDataIds() }).toEqual(before);
      const expected = tf.tidy(() => stock(x).dataSync());
      const got = out.dataSync();
      expect([Object.is(got[0], 0), Object.is(got[n - 2], 0), Object.is(got[n - 1], 0)]).toEqual([true, true, true]);
      expect([name, differing(got.subarray(1, n - 2), expected.subarray(1, n - 2))]).toEqual([name, 0]);
      tf.dispose([x, out]);
    }
  });

  it('small networks and batches, whose gradient products the stock path leaves to its blocked scalar loop', () => {
    // hidden 8 with ~100-400 edges: Aᵀ·dy over the edges is not worth transposing, and its 48-wide blocks
    // are summed separately; hidden 16 on 8 small graphs (the quick demo's shape) mixes both kinds.
    const small = instances('er', 8, [1, 10], 29);
    const larger = instances('er', 24, [1, 10], 31);
    for (const aggregator of ['max', 'sum', 'mean']) {
      compareWays({ aggregator, hidden: 16 }, small, 10);
      compareWays({ aggregator, hidden: 8 }, larger, 7);
      compareWays({ aggregator, hidden: 8, activation: 'leaky-relu', bias: false }, small, 3);
    }
  });

  it('ties (every weight equal) and nodes without incoming edges (DAGs), one step and many', () => {
    const ties = instances('er', 12, [3, 3], 5);
    for (const aggregator of ['max', 'min']) compareWays({ aggregator }, ties, 6);
    const dags = instances('dag', 12, [1, 10], 7);
    for (const aggregator of ['max', 'sum', 'mean']) {
      compareWays({ aggregator }, dags, 1);
      compareWays({ aggregator }, dags, 20);
    }
  });

  it('a whole training run keeps its loss curve, kept step and weights, and leaves no tensor behind', () => {
    expectSameTrainingRun({ hidden: 32, aggregator: 'max', steps: { rule: 'nodes', trainJitter: 6 } }, instances('er', 32, [1, 10], 9), 12);
  });

  for (const aggregator of ['sum', 'smooth-max']) it(`a forward and backward pass of 10 steps (${aggregator}) launches under 150 kernels instead of about 60 more per step`, async () => {
    const data = instances('er', 16, [1, 10], 13);
    const options = modelSchema.parse({ hidden: 32, aggregator, steps: { rule: 'fixed', count: 10, trainJitter: 0 } });
    const network = new MessagePassingNetwork(options, data[0]!.nodeInputs[0]!.length, data[0]!.edgeInputs[0]!.length, new Rng(2));
    const batch = uploadBatch(makeBatch(data, TRANSFORMS));
    const launches = async (fused: boolean) => {
      setFusedProcessEnabled(fused);
      const info = await tf.profile(() => {
        tf.tidy(() => tf.variableGrads(() => maskedLoss(network.forward(batch, { steps: 10 }).prediction, batch.target, batch.mask, 'huber')));
      });
      return info.kernels.filter((k) => !k.name.endsWith('__op')).length;
    };
    const fused = await launches(true);
    const stock = await launches(false);
    batch.dispose();
    network.dispose();
    expect(stock - fused).toBeGreaterThan(10 * 60);
    expect(fused).toBeLessThan(150);
  });

  it('refuses an edge id out of range with a message and leaves no tensor behind', () => {
    const data = instances('er', 16, [1, 10], 37);
    const options = modelSchema.parse({ hidden: 32, aggregator: 'max', steps: { rule: 'fixed', count: 3, trainJitter: 0 } });
    const network = new MessagePassingNetwork(options, data[0]!.nodeInputs[0]!.length, data[0]!.edgeInputs[0]!.length, new Rng(2));
    const batch = uploadBatch(makeBatch(data, TRANSFORMS));
    const ids = batch.dst.dataSync().slice();
    ids[3] = batch.nodes + 5;
    const bad = tf.tensor1d(ids, 'int32');
    const before = tf.memory().numTensors;
    expect(() => tf.tidy(() => network.forward({ ...batch, dst: bad }, { steps: 3 }).prediction)).toThrow(/destination id \d+ at edge 3 is out of range/);
    expect(tf.memory().numTensors).toBe(before);
    bad.dispose();
    batch.dispose();
    network.dispose();
  });

  it('the fused gradient matches a central difference of the loss along a random direction', () => {
    const data = instances('er', 16, [1, 10], 17);
    const options = modelSchema.parse({ hidden: 32, aggregator: 'max', steps: { rule: 'fixed', count: 5, trainJitter: 0 } });
    const network = new MessagePassingNetwork(options, data[0]!.nodeInputs[0]!.length, data[0]!.edgeInputs[0]!.length, new Rng(19));
    const batch = uploadBatch(makeBatch(data, TRANSFORMS));
    const inputs: NetworkInputs = batch;
    const { grads } = lossAndGrads(network, batch, 5);
    const rng = new Rng(23);
    const direction = new Map([...network.params.vars.entries()].map(([name, v]) => [name, Float32Array.from(grads[v.name]!, () => rng.uniform(-1, 1))]));
    const gradOf = new Map([...network.params.vars.entries()].map(([name, v]) => [name, grads[v.name]!]));
    const original = network.params.snapshot();
    const lossAlong = (t: number): number => {
      const moved = new Map([...original].map(([name, w]) => [name, Float32Array.from(w, (v, i) => v + t * direction.get(name)![i]!)]));
      network.params.restore(moved);
      return tf.tidy(() => maskedLoss(network.forward(inputs, { steps: 5 }).prediction, batch.target, batch.mask, 'huber').dataSync()[0]!);
    };
    const eps = 1e-3;
    const numeric = (lossAlong(eps) - lossAlong(-eps)) / (2 * eps);
    network.params.restore(original);
    let analytic = 0;
    for (const [name, d] of direction) d.forEach((v, i) => (analytic += v * gradOf.get(name)![i]!));
    batch.dispose();
    network.dispose();
    expect(Math.abs(numeric - analytic)).toBeLessThan(0.02 * Math.abs(analytic) + 1e-4);
  });
});
