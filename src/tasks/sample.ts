/**
 * Building task instances from (task, family, size, seed): the one entry point
 * the trainer and `farfield sample` use.
 *
 * Seeds: graph i of `sampleGraphs` uses `new Rng(seed).fork('sample').fork(i)`;
 * inside `buildInstance` the graph draws from `rng.fork('graph')` and the task
 * (source, durations, charges) from `rng.fork('task')`, so changing what a task
 * draws never changes the graph.
 *
 * Scale shift: for tasks with `scaleShift: 'graph'` the generated graph is
 * copied with `scaleWeights(graph, weightScale)` and the task reads the scaled
 * graph; for `scaleShift: 'task'` the graph stays unscaled and the task applies
 * `weightScale` to what it draws. The returned graph is the one the task read.
 */
import type Graph from 'graphology';
import { Rng } from '../util/rng.ts';
import { getFamily } from '../graphs/registry.ts';
import { DEFAULT_WEIGHT_RANGE } from '../graphs/common.ts';
import { scaleWeights, toPlainGraph } from '../graphs/plain.ts';
import type { GraphFamily } from '../graphs/types.ts';
import { getTask, taskLabel, type TaskRef } from './registry.ts';
import type { Task, TaskInstance } from './types.ts';

const WHERE = 'tasks/sample';

export interface BuildOptions {
  /** Edge-weight range (and duration range for `earliest-finish`); default [1, 10]. */
  weightRange?: readonly [number, number];
  /** Scale shift factor; default 1. */
  weightScale?: number;
  /** Family parameters, e.g. { meanDegree: 4 }. */
  params?: Readonly<Record<string, number>>;
  /** Fixed source node for tasks that have one. */
  source?: number;
  /**
   * Also record the exact algorithm's state after rounds 1..depth on the
   * instance (`roundStates`, for step-wise supervision). Draws nothing, so the
   * graph and the instance are the same with or without it.
   */
  roundStates?: boolean;
}

export interface BuiltInstance {
  task: Task;
  family: GraphFamily;
  /** The graph the task read (scaled when the task's `scaleShift` is 'graph'). */
  graph: Graph;
  instance: TaskInstance;
}

/** Throws a clear error when the task makes no sense on the family. */
export function checkCombination(task: Task, family: GraphFamily): void {
  if (!task.families.includes(family.id)) {
    throw new Error(
      `${WHERE}: task '${task.id}' does not make sense on graph family '${family.id}'; allowed families for '${task.id}': ${task.families.join(', ')}`,
    );
  }
}

/** Generate one graph of `familyId` with `nodes` nodes and build the `taskId` instance on it. */
export function buildInstance(
  taskId: TaskRef,
  familyId: string,
  nodes: number,
  rng: Rng,
  options: BuildOptions = {},
): BuiltInstance {
  const task = getTask(taskId);
  const family = getFamily(familyId);
  checkCombination(task, family);
  const { weightRange = DEFAULT_WEIGHT_RANGE, weightScale = 1, params, source } = options;
  if (!Number.isFinite(weightScale) || weightScale <= 0) {
    throw new Error(`${WHERE}: weightScale must be a finite number > 0, got ${String(weightScale)}`);
  }
  const raw = family.generate({ nodes, weightRange, rng: rng.fork('graph'), params });
  const scaleInGraph = (task.scaleShift ?? 'graph') === 'graph';
  const graph = scaleInGraph && weightScale !== 1 ? scaleWeights(raw, weightScale) : raw;
  const built = task.instance(graph, { rng: rng.fork('task'), weightScale, weightRange, source });
  const instance = options.roundStates ? { ...built, roundStates: roundStatesOf(task, graph, built) } : built;
  return { task, family, graph, instance };
}

/**
 * The exact algorithm's per-node state after rounds 1..depth (`task.iterate`):
 * entry k − 1 holds the state after k rounds, non-finite where not reached yet.
 * Deterministic (draws nothing). Each round count is computed from scratch, as
 * `iterate` offers no incremental form: cost grows with depth².
 */
export function roundStatesOf(task: Task, graph: Graph, instance: TaskInstance): number[][] {
  if (!task.iterate) throw new Error(`${WHERE}: task '${task.id}' has no intermediate states (no iterate)`);
  const states: number[][] = [];
  for (let k = 1; k <= instance.depth; k++) states.push(task.iterate(graph, instance, k));
  return states;
}

export interface SampleOptions extends BuildOptions {
  task: TaskRef;
  family: string;
  nodes: number;
  count: number;
  seed: number;
}

export interface SampledGraph {
  nodes: number;
  directed: boolean;
  /** [u, v, w] as in the graph (undirected edges once); weights already scaled where the task reads scaled weights. */
  edges: Array<[number, number, number]>;
  positions?: Array<[number, number]>;
  source?: number;
  target: number[];
  mask: number[];
  depth: number;
  /** Task extras (durations, charges, root...) are spread in as further keys. */
  [extra: string]: unknown;
}

export interface Sample {
  task: TaskRef;
  family: string;
  seed: number;
  weightRange: [number, number];
  weightScale: number;
  graphs: SampledGraph[];
}

/** One graph with its exact targets in plain numbers: the entry `farfield sample` prints (also for graph files). */
export function sampledGraph(taskId: string, graph: Graph, instance: TaskInstance): SampledGraph {
  const plain = toPlainGraph(graph);
  const entry: SampledGraph = {
    nodes: plain.nodes,
    directed: plain.directed,
    edges: plain.edges,
    ...(plain.positions ? { positions: plain.positions } : {}),
    ...(instance.source !== undefined ? { source: instance.source } : {}),
    target: instance.target,
    mask: instance.mask,
    depth: instance.depth,
  };
  for (const [key, value] of Object.entries(instance.extras ?? {})) {
    if (key in entry) throw new Error(`${WHERE}: task '${taskId}' extra '${key}' collides with a core field`);
    entry[key] = value;
  }
  return entry;
}

/** `count` graphs with exact targets, in plain numbers (what `farfield sample` prints). */
export function sampleGraphs(options: SampleOptions): Sample {
  const { task, family, nodes, count, seed, weightRange = DEFAULT_WEIGHT_RANGE, weightScale = 1, params, source } = options;
  if (!Number.isInteger(count) || count < 0) throw new Error(`${WHERE}: count must be an integer >= 0, got ${String(count)}`);
  if (!Number.isInteger(seed)) throw new Error(`${WHERE}: seed must be an integer, got ${String(seed)}`);
  checkCombination(getTask(task), getFamily(family));
  const base = new Rng(seed).fork('sample');
  const graphs: SampledGraph[] = [];
  for (let i = 0; i < count; i++) {
    const built = buildInstance(task, family, nodes, base.fork(i), { weightRange, weightScale, params, source });
    graphs.push(sampledGraph(taskLabel(task), built.graph, built.instance));
  }
  return { task, family, seed, weightRange: [weightRange[0], weightRange[1]], weightScale, graphs };
}
