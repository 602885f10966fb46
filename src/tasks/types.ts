import type { AggregatorName } from '../model/catalogue.ts';
import type Graph from 'graphology';
import type { Rng } from '../util/rng.ts';

/** An aggregator's name, from the model catalogue (a plain data file with no tfjs; the one list of names). */
export type AggregatorId = AggregatorName;

/**
 * Everything the network sees and is scored on for one graph. Message edges are
 * directed (an undirected graph edge appears twice, once per direction); node
 * i's incoming messages are the edges whose `messageDst` is i.
 */
export interface TaskInstance {
  nodes: number;
  /** Per node, the raw (untransformed) input features, `nodeFeatureNames` order. */
  nodeInputs: number[][];
  /** Directed message edges. */
  messageSrc: number[];
  messageDst: number[];
  /** Per message edge, the raw input features, `edgeFeatureNames` order. */
  edgeInputs: number[][];
  /** Exact per-node target. Entries with mask 0 are placeholders (0). */
  target: number[];
  /** 1 where the node counts in loss and metrics, 0 where it is excluded (e.g. unreachable). */
  mask: number[];
  /** Source node, for tasks that have one. */
  source?: number;
  /**
   * How far the exact algorithm must propagate information on this graph
   * (e.g. largest hop count on a shortest-path tree). Reported next to the node
   * count, because a bigger graph is not always a deeper one.
   */
  depth: number;
  /** Task-specific extra inputs printed by `farfield sample` (durations, charges, positions...). */
  extras?: Record<string, unknown>;
  /**
   * Only when asked for (`buildInstance(..., { roundStates: true })`, used by
   * step-wise supervision): the exact algorithm's per-node state after rounds
   * 1..depth (`task.iterate`), `roundStates[k - 1]` after k rounds; non-finite
   * where not reached yet. Past `depth` the state is the final target.
   */
  roundStates?: number[][];
}

export interface TaskOptions {
  rng: Rng;
  /**
   * Scale shift: the factor the task's value-carrying inputs (edge weights,
   * durations, distances) were multiplied by; already applied to `graph`
   * weights by the caller for weight-carrying tasks. Tasks whose values do not
   * come from edge weights apply it themselves (documented per task).
   */
  weightScale: number;
  /**
   * Added (optional): fixed source node for tasks that have one; when absent
   * the task draws it from `rng`. Out-of-range values are refused.
   */
  source?: number;
  /**
   * Added (optional): range for values the task draws itself (e.g. durations
   * in `earliest-finish`); defaults to the graph's recorded `weightRange`.
   */
  weightRange?: readonly [number, number];
}

export interface Task {
  id: string;
  title: string;
  /** One-line description of the target. */
  describe: string;
  /** Aggregator a practitioner would expect to be aligned (information only). */
  alignedAggregator: AggregatorId;
  /** Explanation of the aligned structure, e.g. "min over (distance + weight)". */
  alignedStructure: string;
  nodeFeatureNames: string[];
  edgeFeatureNames: string[];
  /** Family ids this task makes sense on; others are refused with a clear error. */
  families: string[];
  /** How excluded nodes are handled, shown next to every metric. */
  maskPolicy: string;
  /**
   * Added (optional): who applies the scale shift. 'graph': the caller passes a
   * graph already scaled with `scaleWeights` (edge weights, and positions when
   * the weights are distances); the task does not apply `weightScale` again.
   * 'task': the caller passes the unscaled graph and the task applies
   * `options.weightScale` to the values it draws itself (or has none).
   * `buildInstance` in tasks/sample.ts follows this.
   */
  scaleShift?: 'graph' | 'task';
  /**
   * Added (optional): whether the task accepts weights drawn from `weightRange`
   * at weight scale `scale` (absent: always). A max-times recurrence reads
   * weights as reliabilities and refuses any above 1; probes that sweep the
   * scale skip the scales a task refuses instead of failing.
   */
  admitsWeightScale?(weightRange: readonly [number, number], scale: number): boolean;
  /**
   * Added (optional): what the task asks of a graph file (tasks/file-instance.ts):
   * the weights it reads and whether it starts from a source. Tasks built from a
   * spec (the recurrence) state it here; built-in tasks are listed in
   * FILE_TASK_RULES. Absent from both: the task cannot be scored on files.
   */
  fileRule?: { weights: 'non-negative' | 'positive' | 'ignored'; source: boolean };
  /** Build the instance from a generated graph. Must draw randomness only from options.rng. */
  instance(graph: Graph, options: TaskOptions): TaskInstance;
  /**
   * The exact algorithm's per-node estimate after k synchronous iterations
   * (e.g. Bellman-Ford distances after k rounds), for the alignment trace.
   * Unreached estimates are `Infinity` / `-Infinity` as the algorithm holds them.
   */
  iterate?(graph: Graph, instance: TaskInstance, rounds: number): number[];
}
