/**
 * `earliest-finish`: earliest finish time of each activity in a DAG of
 * precedence constraints (critical path method, the max-plus semiring).
 *
 * - Each node is an activity with a duration; an edge u -> v means u must
 *   finish before v starts. finish(v) = duration(v) + max over predecessors u
 *   of finish(u), or duration(v) when v has none. Solver: `earliestFinish`
 *   (one pass in topological order, Kahn's algorithm).
 * - Durations are drawn by the task: uniform in `weightRange` (from
 *   `options.weightRange`, else the graph's recorded `weightRange`, else the
 *   default [1, 10]) and multiplied by `options.weightScale`. The graph's own
 *   edge weights are not used. Scale shift: applied by the task itself
 *   (`scaleShift: 'task'`); pass the unscaled graph. At scale c the durations
 *   and the edge input are exactly c × their values at scale 1 (same rng) and
 *   the finish times c × (up to float rounding of the sums): the shift scales
 *   all inputs and the target together.
 * - Inputs: node [duration]; edge [medianDuration]. Messages flow pred -> succ.
 * - Edge input, in duration units: the instance's median duration (lower median
 *   over its jobs), the same on every edge. It only marks the edge (the
 *   recursion needs no per-edge value); a constant 1 would do that too, but a
 *   constant does not scale, acts like a bias, and so breaks the positive
 *   homogeneity of a bias-free network under the scale shift. Why the median:
 *   data-derived, about the same at every graph size for a given duration
 *   range, and, being one of the durations, exactly c × its value at scale 1.
 * - Mask: every node counts (all finish times are finite).
 * - depth: the longest path in edges. Synchronous rounds (`iterate`) are
 *   exact after `depth` rounds whatever the durations; particular durations
 *   can need fewer (a short chain of long jobs can beat the longest chain).
 */
import type Graph from 'graphology';
import type { Task, TaskInstance, TaskOptions } from './types.ts';
import { DEFAULT_WEIGHT_RANGE } from '../graphs/common.ts';
import { checkNodeKeys, medianMagnitude, runRounds } from './common.ts';

const WHERE = 'tasks/earliest-finish';

export interface Schedule {
  /** Earliest start time per job (max finish over predecessors, 0 if none). */
  start: number[];
  /** Earliest finish time per job = start + duration. */
  finish: number[];
  /** Largest finish time (0 for no jobs). */
  makespan: number;
  /** Longest precedence chain, counted in edges. */
  depth: number;
  /** A topological order used for the pass. */
  order: number[];
}

/**
 * Earliest start/finish times. `predecessors[v]` lists the jobs that must
 * finish before job v starts. Throws on a cycle, an out-of-range index or a
 * non-finite duration.
 */
export function earliestFinish(durations: readonly number[], predecessors: readonly (readonly number[])[]): Schedule {
  const n = durations.length;
  if (predecessors.length !== n) {
    throw new Error(`${WHERE}: ${n} durations but ${predecessors.length} predecessor lists`);
  }
  const successors: number[][] = Array.from({ length: n }, () => []);
  const indegree = new Array<number>(n).fill(0);
  for (let v = 0; v < n; v++) {
    if (!Number.isFinite(durations[v])) throw new Error(`${WHERE}: duration of job ${v} is not finite (${durations[v]})`);
    for (const u of predecessors[v]!) {
      if (!Number.isInteger(u) || u < 0 || u >= n) throw new Error(`${WHERE}: predecessor ${u} of job ${v} is out of range 0..${n - 1}`);
      successors[u]!.push(v);
      indegree[v]!++;
    }
  }
  const order: number[] = [];
  for (let v = 0; v < n; v++) if (indegree[v] === 0) order.push(v);
  for (let k = 0; k < order.length; k++) {
    for (const v of successors[order[k]!]!) if (--indegree[v]! === 0) order.push(v);
  }
  if (order.length !== n) throw new Error(`${WHERE}: the precedence constraints contain a cycle`);

  const start = new Array<number>(n).fill(0);
  const finish = new Array<number>(n).fill(0);
  const chain = new Array<number>(n).fill(0);
  for (const v of order) {
    let s = 0;
    let c = 0;
    let first = true;
    for (const u of predecessors[v]!) {
      if (first || finish[u]! > s) s = finish[u]!;
      first = false;
      c = Math.max(c, chain[u]! + 1);
    }
    start[v] = s;
    finish[v] = s + durations[v]!;
    chain[v] = c;
  }
  return {
    start,
    finish,
    makespan: n === 0 ? 0 : Math.max(...finish),
    depth: n === 0 ? 0 : Math.max(...chain),
    order,
  };
}

function resolveWeightRange(graph: Graph, options: TaskOptions): readonly [number, number] {
  const fromGraph = graph.getAttribute('weightRange') as unknown;
  const range =
    options.weightRange ??
    (Array.isArray(fromGraph) && fromGraph.length === 2 ? (fromGraph as [number, number]) : DEFAULT_WEIGHT_RANGE);
  const [lo, hi] = range;
  if (!Number.isFinite(lo) || !Number.isFinite(hi) || lo > hi || lo < 0) {
    throw new Error(`${WHERE}: durations need a weightRange [lo, hi] with 0 <= lo <= hi, got ${JSON.stringify(range)}`);
  }
  return range;
}

/**
 * One value per node drawn from `options.rng`: uniform in the weight range (see
 * `resolveWeightRange`) times `options.weightScale`. Also the node weights of
 * the recurrence task, which must draw exactly these to reproduce this task.
 */
export function drawDurations(graph: Graph, options: TaskOptions): number[] {
  const n = checkNodeKeys(graph, WHERE);
  const { weightScale, rng } = options;
  if (!Number.isFinite(weightScale) || weightScale <= 0) {
    throw new Error(`${WHERE}: weightScale must be a finite number > 0, got ${String(weightScale)}`);
  }
  const [lo, hi] = resolveWeightRange(graph, options);
  return Array.from({ length: n }, () => (lo === hi ? lo : rng.uniform(lo, hi)) * weightScale);
}

function instance(graph: Graph, options: TaskOptions): TaskInstance {
  if (graph.type !== 'directed') throw new Error(`${WHERE}: needs a directed acyclic graph, got a ${graph.type} graph`);
  const n = checkNodeKeys(graph, WHERE);
  const durations = drawDurations(graph, options);
  const predecessors: number[][] = Array.from({ length: n }, () => []);
  const messageSrc: number[] = [];
  const messageDst: number[] = [];
  graph.forEachEdge((_e, _attr, s, t) => {
    predecessors[Number(t)]!.push(Number(s));
    messageSrc.push(Number(s));
    messageDst.push(Number(t));
  });
  const schedule = earliestFinish(durations, predecessors);
  const unit = medianMagnitude(durations);
  return {
    nodes: n,
    nodeInputs: durations.map((d) => [d]),
    messageSrc,
    messageDst,
    edgeInputs: messageSrc.map(() => [unit]),
    target: schedule.finish,
    mask: new Array<number>(n).fill(1),
    depth: schedule.depth,
    extras: { durations },
  };
}

/**
 * After k rounds: f_0(v) = duration(v); f_k(v) = duration(v) + max over
 * messages u -> v of f_{k-1}(u) (duration(v) alone without predecessors),
 * i.e. the longest chain ending at v using at most k edges. Exact after
 * `depth` rounds.
 */
function iterate(_graph: Graph, inst: TaskInstance, rounds: number): number[] {
  const durations = inst.nodeInputs.map((f) => f[0]!);
  const step = (state: number[]): number[] => {
    const best = new Array<number>(inst.nodes).fill(-Infinity);
    for (let e = 0; e < inst.messageSrc.length; e++) {
      const v = inst.messageDst[e]!;
      best[v] = Math.max(best[v]!, state[inst.messageSrc[e]!]!);
    }
    return durations.map((d, v) => d + (best[v] === -Infinity ? 0 : best[v]!));
  };
  return runRounds(durations.slice(), step, rounds, WHERE);
}

export const earliestFinishTask: Task = {
  id: 'earliest-finish',
  title: 'Earliest finish time on a DAG (critical path)',
  describe: 'Duration of the activity plus the latest finish time among its predecessors (0 if none).',
  alignedAggregator: 'max',
  alignedStructure: 'f(v) = duration(v) + max over predecessors u of f(u) (max-plus, critical path method)',
  nodeFeatureNames: ['duration'],
  edgeFeatureNames: ['medianDuration'],
  families: ['dag'],
  maskPolicy: 'Every node counts (all finish times are finite).',
  scaleShift: 'task',
  instance,
  iterate,
};
