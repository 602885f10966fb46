/**
 * The alignment trace: on one small graph, the network's decoded node states
 * after every message-passing step beside the exact algorithm's state after
 * the same number of synchronous iterations (`task.iterate`), with the error
 * per step. It shows *how* a model computes: whether step k of the network
 * holds what round k of Bellman-Ford (or its task's algorithm) holds, or
 * something else that only agrees at the end.
 *
 * The hidden states come from `MessagePassingNetwork.forward` itself, through
 * its `onStep` callback: probes, the audit and this trace read the states of
 * the network's one forward loop, never a copy of it (see states.ts).
 *
 * Host-agnostic: no node: imports; everything returned is plain JSON data
 * (non-finite numbers are written as null where the algorithm has "not
 * reached yet").
 */
import * as tf from '@tensorflow/tfjs-core';
import type Graph from 'graphology';
import { circular } from 'graphology-layout';
import type { MessagePassingNetwork } from '../model/network.ts';
import { makeBatch, type FeatureTransforms } from '../train/batch.ts';
import { uploadBatch } from '../train/tensors.ts';
import { buildInstance } from '../tasks/sample.ts';
import { getFamily } from '../graphs/registry.ts';
import { toPlainGraph } from '../graphs/plain.ts';
import type { Task, TaskInstance } from '../tasks/types.ts';
import type { ExperimentSpec } from '../experiment/spec.ts';
import { Rng } from '../util/rng.ts';
import { stepPlan } from './states.ts';

const WHERE = 'inspect/trace';

export interface TraceStep {
  /** Message-passing steps taken (0: decoded encoding, before any message). */
  k: number;
  /** decode(hᵏ) per node. */
  predicted: number[];
  /** The exact algorithm's state after k synchronous iterations; null = not reached yet (non-finite). */
  exact: Array<number | null>;
  /** Mean |predicted − exact| over counted nodes (mask 1) whose exact value is finite; null when there are none. */
  mae: number | null;
  /** How many nodes the mae averages over. */
  counted: number;
}

export interface AlignmentTrace {
  task: string;
  family: string;
  nodes: number;
  directed: boolean;
  /** [u, v, w] as in the graph (undirected edges once), weights as the task read them. */
  edges: Array<[number, number, number]>;
  source: number | null;
  /** Raw node inputs (source markers, durations, charges…), `nodeFeatureNames` order. */
  nodeInputs: number[][];
  nodeFeatureNames: string[];
  /** Final exact target and mask (mask 0: excluded from scoring, e.g. unreachable). */
  target: number[];
  mask: number[];
  /** Rounds the exact algorithm needs (task `depth`). */
  depth: number;
  /** Node positions in [0, 1]²: the graph's own positions when the family has them, else a circular layout. */
  positions: Array<[number, number]>;
  stepsRun: number;
  steps: TraceStep[];
  note: string;
}

/** A graph and its task instance (what `buildInstance` returns). */
export interface TraceInput {
  task: Task;
  family?: string;
  graph: Graph;
  instance: TaskInstance;
}

function normalisedPositions(graph: Graph, plainPositions: Array<[number, number]> | undefined): Array<[number, number]> {
  let raw: Array<[number, number]>;
  if (plainPositions) raw = plainPositions;
  else {
    // graphology-layout's circular layout: node i at angle 2πi/n (deterministic, so no seed is needed).
    const layout = circular(graph);
    raw = Array.from({ length: graph.order }, (_, i) => {
      const p = layout[String(i)] ?? { x: 0, y: 0 };
      return [p['x'] ?? 0, p['y'] ?? 0] as [number, number];
    });
  }
  const xs = raw.map((p) => p[0]);
  const ys = raw.map((p) => p[1]);
  const lo = [Math.min(...xs), Math.min(...ys)];
  const span = Math.max(Math.max(...xs) - lo[0]!, Math.max(...ys) - lo[1]!, 1e-12);
  return raw.map(([x, y]) => [round6((x - lo[0]!) / span), round6((y - lo[1]!) / span)]);
}

function round6(x: number): number {
  return Number(x.toFixed(6));
}

/**
 * The alignment trace of `network` on one graph. Step k's prediction is the
 * decoded state after k steps (k = 0: decode(encode(x)), before any message),
 * read through `forward`'s `onStep` callback; the exact column is
 * `task.iterate(graph, instance, k)`. `steps` defaults to the network's own
 * step rule for this graph size.
 */
export function alignmentTrace(network: MessagePassingNetwork, transforms: FeatureTransforms, input: TraceInput, options: { steps?: number } = {}): AlignmentTrace {
  const { task, graph, instance } = input;
  if (!task.iterate) throw new Error(`${WHERE}: task '${task.id}' has no per-iteration exact algorithm (iterate)`);
  const plan = stepPlan(network, instance.nodes);
  const steps = options.steps ?? plan.steps;
  const tensors = uploadBatch(makeBatch([instance], transforms));
  let decoded: number[][];
  let stepsRun: number;
  try {
    const result = tf.tidy(() => {
      const perStep: tf.Tensor2D[] = [network.decode(network.encode(tensors.nodeX))];
      const run = network.forward(tensors, {
        steps,
        stopTolerance: options.steps === undefined ? plan.stopTolerance : undefined,
        onStep: (_step, state) => perStep.push(network.decode(state)),
      });
      return { all: tf.concat(perStep, 1) as tf.Tensor2D, stepsRun: run.stepsRun };
    });
    const rows = result.all.arraySync() as number[][];
    result.all.dispose();
    stepsRun = result.stepsRun;
    // rows: [node][k] -> decoded: [k][node]
    decoded = Array.from({ length: stepsRun + 1 }, (_, k) => rows.map((r) => r[k]!));
  } finally {
    tensors.dispose();
  }
  const traceSteps: TraceStep[] = decoded.map((predicted, k) => {
    const state = task.iterate!(graph, instance, k);
    const exact = state.map((v) => (Number.isFinite(v) ? v : null));
    let err = 0;
    let counted = 0;
    exact.forEach((v, i) => {
      if (v === null || !instance.mask[i]) return;
      const e = Math.abs(predicted[i]! - v);
      err += Number.isFinite(e) ? e : Infinity;
      counted++;
    });
    return { k, predicted, exact, mae: counted ? err / counted : null, counted };
  });
  const plain = toPlainGraph(graph);
  return {
    task: task.id,
    family: input.family ?? String(graph.getAttribute('family') ?? ''),
    nodes: instance.nodes,
    directed: plain.directed,
    edges: plain.edges,
    source: instance.source ?? null,
    nodeInputs: instance.nodeInputs,
    nodeFeatureNames: task.nodeFeatureNames,
    target: instance.target,
    mask: instance.mask,
    depth: instance.depth,
    positions: normalisedPositions(graph, plain.positions),
    stepsRun,
    steps: traceSteps,
    note:
      'predicted[k] = decode(state after k message-passing steps), k = 0 before any message; ' +
      `exact[k] = ${task.id} exact algorithm after k synchronous iterations (null = not reached yet); ` +
      'mae over counted nodes whose exact value is finite. Agreement at every k means the network runs the algorithm step for step; ' +
      'agreement only at the end means it computes the answer some other way.',
  };
}

/** Nodes for the trace graph: 9 by default, within the family's minimum and the training range. */
export function traceNodes(spec: ExperimentSpec): number {
  const family = getFamily(spec.train.family);
  const [lo, hi] = spec.train.sizes;
  const wanted = Math.min(Math.max(9, lo), Math.max(hi, 8), 10);
  return Math.max(wanted, family.minNodes);
}

/** The small graph of the trace: training family, training weights, drawn from the seed's own stream. */
export function traceGraph(spec: ExperimentSpec, seed: number, nodes = traceNodes(spec)): TraceInput {
  const built = buildInstance(spec.task, spec.train.family, nodes, new Rng(seed).fork('probe:trace'), {
    weightRange: spec.train.weightRange,
    params: spec.train.familyParams,
  });
  return { task: built.task, family: built.family.id, graph: built.graph, instance: built.instance };
}
