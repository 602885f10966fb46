/**
 * Step-wise supervision: the exact algorithm's state after k synchronous
 * rounds as the target of the network's decoded state after step k. Checked
 * here: the per-step targets against hand-worked Bellman-Ford rounds and
 * against every task's own `iterate`, the step loss against the plain masked
 * loss, an exact Bellman-Ford network scoring zero, determinism, no effect
 * when the switch is off, no leaked tensors, and the spec refusal for a task
 * without intermediate states.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs-core';
import Graph from 'graphology';
import { dijkstra as graphologyDijkstra } from 'graphology-shortest-path';
import { initBackend } from '../../src/engine/backend.ts';
import { validateSpec } from '../../src/experiment/check.ts';
import { makeSeedData, usesStepSupervision } from '../../src/experiment/datasets.ts';
import { executeRun, featureTransforms, type RunResult } from '../../src/experiment/run.ts';
import { armModel, SpecError, type ExperimentSpec, type SpecInput } from '../../src/experiment/spec.ts';
import { MessagePassingNetwork } from '../../src/model/network.ts';
import { tasks } from '../../src/tasks/registry.ts';
import { buildInstance, roundStatesOf } from '../../src/tasks/sample.ts';
import { shortestPath } from '../../src/tasks/shortest-path.ts';
import type { TaskInstance } from '../../src/tasks/types.ts';
import { makeBatch, stepTargetsFor, type FeatureTransforms } from '../../src/train/batch.ts';
import { maskedLoss, stepwiseLoss, type LossName } from '../../src/train/loss.ts';
import { uploadBatch } from '../../src/train/tensors.ts';
import { train } from '../../src/train/trainer.ts';
import { Rng } from '../../src/util/rng.ts';
import { bellmanFordNetwork, expectSameBits, specRefusal, tinySpec } from '../helpers.ts';

const identity: FeatureTransforms = { node: ['identity'], edge: ['identity'], nodeStats: [], edgeStats: [] };
const INF = Infinity;

beforeAll(async () => {
  await initBackend('wasm');
});

// A hand-built undirected graph: 0–1 (1), 1–2 (2), 0–2 (5), 2–3 (1), and node 4 with no edge
// (unreachable from source 0).
function handGraph(): Graph {
  const graph = new Graph({ type: 'undirected' });
  for (let i = 0; i < 5; i++) graph.addNode(String(i));
  for (const [u, v, w] of [[0, 1, 1], [1, 2, 2], [0, 2, 5], [2, 3, 1]] as const) graph.addEdge(String(u), String(v), { weight: w });
  return graph;
}
// Bellman-Ford rounds on the hand-built graph, common practice (synchronous rounds: round k reads
// only round k − 1), worked by hand from source 0:
//   k=1: 1 ← 0+1 = 1; 2 ← 0+5 = 5
//   k=2: 2 ← min(5, 1+2) = 3; 3 ← 5+1 = 6
//   k=3: 3 ← min(6, 3+1) = 4
//   k=4: nothing changes, so depth = 3. Node 4 is never reached.
const handRounds: number[][] = [
  [0, 1, 5, INF, INF],
  [0, 1, 3, 6, INF],
  [0, 1, 3, 4, INF],
];

function handInstance(): { graph: Graph; instance: TaskInstance } {
  const graph = handGraph();
  const plain = shortestPath.instance(graph, { rng: new Rng(0), weightScale: 1, source: 0 });
  return { graph, instance: { ...plain, roundStates: roundStatesOf(shortestPath, graph, plain) } };
}

/** Column k − 1 of a row-major [nodes, steps] array. */
function column(values: Float32Array, steps: number, k: number): number[] {
  return Array.from({ length: values.length / steps }, (_, i) => values[i * steps + k - 1]!);
}

describe('per-step targets', () => {
  it('equal hand-worked Bellman-Ford rounds on a hand-built 5-node graph (Bellman-Ford rounds, common practice; final distances checked with graphology-shortest-path)', () => {
    const { graph, instance } = handInstance();
    expect(instance.depth).toBe(3);
    expect(instance.roundStates).toEqual(handRounds);
    // Final distances: graphology-shortest-path's Dijkstra paths, summed.
    const paths = graphologyDijkstra.singleSource(graph, '0', 'weight');
    const reference = [0, 1, 2, 3].map((v) => {
      const path = paths[String(v)]!;
      let d = 0;
      for (let i = 1; i < path.length; i++) d += graph.getEdgeAttribute(graph.edge(path[i - 1]!, path[i]!)!, 'weight') as number;
      return d;
    });
    expect(reference).toEqual([0, 1, 3, 4]);
    expect(paths['4']).toBeUndefined();
    expect(handRounds[2]!.slice(0, 4)).toEqual(reference);

    const steps = 5;
    const st = stepTargetsFor([instance], steps);
    expect(st.steps).toBe(steps);
    // Steps 1..3: the rounds, mask 0 where not reached yet (Infinity) and at the unreachable node 4.
    expect(column(st.target, steps, 1)).toEqual([0, 1, 5, 0, 0]);
    expect(column(st.mask, steps, 1)).toEqual([1, 1, 1, 0, 0]);
    expect(column(st.target, steps, 2)).toEqual([0, 1, 3, 6, 0]);
    expect(column(st.mask, steps, 2)).toEqual([1, 1, 1, 1, 0]);
    expect(column(st.target, steps, 3)).toEqual([0, 1, 3, 4, 0]);
    expect(column(st.mask, steps, 3)).toEqual([1, 1, 1, 1, 0]);
    // Past the depth: the final target and mask.
    for (const k of [4, 5]) {
      expect(column(st.target, steps, k)).toEqual([0, 1, 3, 4, 0]);
      expect(column(st.mask, steps, k)).toEqual([1, 1, 1, 1, 0]);
    }
  });

  it("equal each task's own iterate output, step by step, in a multi-graph batch", () => {
    for (const task of Object.values(tasks)) {
      const instances: TaskInstance[] = [];
      const graphs: Graph[] = [];
      const base = new Rng(11).fork('step-targets');
      for (let g = 0; g < 4; g++) {
        const built = buildInstance(task.id, task.families[0]!, 7 + g, base.fork(g), { roundStates: true });
        instances.push(built.instance);
        graphs.push(built.graph);
      }
      const steps = Math.max(...instances.map((i) => i.depth)) + 3;
      const st = stepTargetsFor(instances, steps);
      let offset = 0;
      let supervised = 0;
      instances.forEach((inst, g) => {
        for (let k = 1; k <= steps; k++) {
          const exact = task.iterate!(graphs[g]!, inst, k);
          for (let i = 0; i < inst.nodes; i++) {
            const at = (offset + i) * steps + k - 1;
            const where = `${task.id} graph ${g} step ${k} node ${i}`;
            if (!Number.isFinite(exact[i]!) || inst.mask[i] === 0) {
              expect(st.mask[at], where).toBe(0);
              continue;
            }
            expect(st.mask[at], where).toBe(1);
            supervised++;
            // At and before the depth: the iterate value itself (in float32); past it the final
            // target, which the algorithm's fixed point equals.
            if (k <= inst.depth) expect(st.target[at], where).toBe(Math.fround(exact[i]!));
            else expect(st.target[at]! - exact[i]!, where).toBeCloseTo(0, 4);
          }
        }
        offset += inst.nodes;
      });
      expect(supervised, task.id).toBeGreaterThan(0);
    }
  });

  it('recording intermediate states draws nothing: the graphs and instances are the same with the switch on', () => {
    const off = tinySpec();
    const on = tinySpec({ budget: { ...off.budget, stepSupervision: true } });
    expect(usesStepSupervision(off)).toBe(false);
    expect(usesStepSupervision(on)).toBe(true);
    const a = makeSeedData(off, 5);
    const b = makeSeedData(on, 5);
    expect(a.train.every((t) => t.roundStates === undefined)).toBe(true);
    expect(b.train.every((t) => Array.isArray(t.roundStates) && t.roundStates.length === t.depth)).toBe(true);
    expect(b.train.map(({ roundStates: _states, ...rest }) => rest)).toEqual(a.train);
    expect(b.validation).toEqual(a.validation);
    expect(b.rungs).toEqual(a.rungs);
  });

  it('a training graph without its intermediate states is refused with a clear error', () => {
    const { instance } = handInstance();
    const { roundStates: _states, ...bare } = instance;
    expect(() => stepTargetsFor([bare], 4)).toThrow(/intermediate states.*graph 0/);
  });
});

describe('step loss', () => {
  it('is the mean over steps of the plain masked loss (huber and mse), ignoring columns past the trace', () => {
    const rng = new Rng(4);
    const nodes = 7;
    const steps = 4;
    const rand = (n: number) => Array.from({ length: n }, () => rng.uniform(-3, 3));
    const traceValues = Array.from({ length: steps }, () => rand(nodes));
    const targetValues = rand(nodes * (steps + 2));
    const maskValues = Array.from({ length: nodes * (steps + 2) }, (_, j) => (j % 3 === 0 ? 0 : 1));
    for (let i = 0; i < nodes; i++) maskValues[i * (steps + 2) + 2] = 0; // step 3: nothing supervised
    for (const kind of ['huber', 'mse'] as LossName[]) {
      const [got, want] = tf.tidy(() => {
        const trace = traceValues.map((v) => tf.tensor2d(v, [nodes, 1]));
        const target = tf.tensor2d(targetValues, [nodes, steps + 2]);
        const mask = tf.tensor2d(maskValues, [nodes, steps + 2]);
        const perStep = trace.map((p, k) =>
          maskedLoss(p, tf.slice(target, [0, k], [-1, 1]), tf.slice(mask, [0, k], [-1, 1]), kind).dataSync()[0]!,
        );
        expect(perStep[2]).toBe(0);
        return [stepwiseLoss(trace, target, mask, kind).dataSync()[0]!, perStep.reduce((s, x) => s + x, 0) / steps];
      });
      expect(want).toBeGreaterThan(0);
      expect(got).toBeCloseTo(want!, 5);
    }
  });

  it('is zero for a network that runs Bellman-Ford step for step, and positive for a wrong one', () => {
    const { instance } = handInstance();
    // The encoder maps the source's input to 0 and every other node's to the "not reached" value,
    // whatever the task's node input encoding is (solved from the two input values present).
    const sourceInput = instance.nodeInputs[0]![0]!;
    const otherInput = instance.nodeInputs[1]![0]!;
    expect(otherInput).not.toBe(sourceInput);
    const unreached = 1e4;
    const exactStart = (net: MessagePassingNetwork): MessagePassingNetwork => {
      const w = unreached / (otherInput - sourceInput);
      net.params.set('encode.w', [w]);
      net.params.set('encode.b', [-w * sourceInput]);
      return net;
    };
    const losses = [bellmanFordNetwork({ unreached }), bellmanFordNetwork({ unreached, weightGain: 2 })].map((raw) => {
      const net = exactStart(raw);
      const batch = makeBatch([instance], identity);
      const steps = 6;
      batch.stepTargets = stepTargetsFor([instance], steps);
      const tensors = uploadBatch(batch);
      try {
        return tf.tidy(() => {
          const { trace } = net.forward(tensors, { steps, trace: true });
          expect(trace).toHaveLength(steps);
          return stepwiseLoss(trace, tensors.stepTarget!, tensors.stepMask!, 'huber').dataSync()[0]!;
        });
      } finally {
        tensors.dispose();
        net.dispose();
      }
    });
    expect(losses[0]).toBe(0);
    expect(losses[1]).toBeGreaterThan(0.5);
  });
});

describe('training with step-wise supervision', () => {
  const arms: SpecInput['arms'] = [
    { name: 'max', model: { aggregator: 'max' } },
    { name: 'max, steps', model: { aggregator: 'max' }, stepSupervision: true },
    { name: 'max, off', model: { aggregator: 'max' }, stepSupervision: false },
  ];
  const spec = tinySpec({ arms, seeds: { count: 1, base: 3 } });
  const run = (s: ExperimentSpec, armIndex: number): RunResult =>
    executeRun(s, { index: armIndex, armIndex, arm: s.arms[armIndex]!.name, seedIndex: 0, seed: 3 });

  it('runs, is deterministic, keeps a finite final-output loss curve and changes training; off is bit-identical to absent', () => {
    const withSteps = run(spec, 1);
    const again = run(spec, 1);
    const absent = run(spec, 0);
    const off = run(spec, 2);
    // A spec where no arm uses the switch: its training graphs carry no intermediate states.
    const plainSpec = tinySpec({ arms: [arms[0]!, { name: 'sum', model: { aggregator: 'sum' } }], seeds: { count: 1, base: 3 } });
    const plain = run(plainSpec, 0);

    expect(withSteps.status).toBe('ok');
    expect(withSteps.stepsDone).toBe(spec.budget.steps);
    expect(withSteps.lossCurve.length).toBeGreaterThan(0);
    expect(withSteps.lossCurve.every(Number.isFinite)).toBe(true);
    expectSameBits([again.lossCurve], [withSteps.lossCurve]);
    expect(again.inDistribution).toEqual(withSteps.inDistribution);

    expectSameBits([off.lossCurve], [absent.lossCurve]);
    expect(off.inDistribution).toEqual(absent.inDistribution);
    expect(off.ladder.map((r) => r.metrics)).toEqual(absent.ladder.map((r) => r.metrics));
    expectSameBits([plain.lossCurve], [absent.lossCurve]);
    expect(plain.ladder.map((r) => r.metrics)).toEqual(absent.ladder.map((r) => r.metrics));

    // The same first batch and weights give the same first final-output loss; after that the step loss has moved the weights.
    expect(withSteps.lossCurve[0]).toBe(absent.lossCurve[0]);
    expect(withSteps.lossCurve.some((v, i) => !Object.is(v, absent.lossCurve[i]))).toBe(true);
  });

  it('leaks no tensors', () => {
    const data = makeSeedData(spec, 3);
    const network = new MessagePassingNetwork(armModel(spec, 1), 1, 1, new Rng(3));
    try {
      const before = tf.memory().numTensors;
      const outcome = train({
        network,
        train: data.train,
        validation: data.validation,
        transforms: featureTransforms(spec, 1, data.train),
        budget: { ...spec.budget, steps: 6, validateEvery: 3 },
        stepSupervision: true,
        rng: new Rng(3).fork('training'),
      });
      expect(outcome.status).toBe('ok');
      expect(tf.memory().numTensors).toBe(before);
    } finally {
      network.dispose();
    }
  });
});

describe('spec check', () => {
  const refusal = specRefusal;
  const base = (): SpecInput => ({
    farfield: 1,
    question: 'test: is step-wise supervision refused where there are no intermediate states?',
    task: 'no-states',
    train: { family: 'er', sizes: [5, 8], graphs: 32 },
    test: { sizes: [8], graphsPerRung: 4, validationGraphs: 8 },
    arms: [{ name: 'a' }, { name: 'b' }],
  });

  it('refuses the switch on a task without intermediate states, naming the field and the task', () => {
    const { iterate: _iterate, ...withoutStates } = shortestPath;
    tasks['no-states'] = { ...withoutStates, id: 'no-states' };
    try {
      expect(() => validateSpec(base())).not.toThrow();
      expect(refusal({ ...base(), arms: [{ name: 'a' }, { name: 'b', stepSupervision: true }] })).toMatch(
        /^arms\[1\]\.stepSupervision: task "no-states" has no intermediate states/,
      );
      expect(refusal({ ...base(), budget: { stepSupervision: true } })).toMatch(/^budget\.stepSupervision: task "no-states" has no intermediate states/);
      // Every arm switching it off again leaves nothing to refuse.
      expect(() =>
        validateSpec({ ...base(), budget: { stepSupervision: true }, arms: [{ name: 'a', stepSupervision: false }, { name: 'b', stepSupervision: false }] }),
      ).not.toThrow();
    } finally {
      delete tasks['no-states'];
    }
  });

  it('accepts the switch on a task that has them', () => {
    expect(() => validateSpec({ ...base(), task: 'shortest-path', arms: [{ name: 'a' }, { name: 'b', stepSupervision: true }] })).not.toThrow();
  });
});
