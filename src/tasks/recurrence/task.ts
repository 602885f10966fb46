/**
 * `{ "recurrence": { semiring, source, others, direction } }`: the path problem
 * of a semiring as a task, built from the spec's object (see options.ts for
 * the allowed values and README.md for the table).
 *
 * - Target: the fixed point x(v) = b(v) ⊕ ⊕_{u→v} x(u) ⊗ f(u→v) (solver.ts).
 *   Start b: the semiring's one at a drawn source and its zero elsewhere
 *   (`source: "drawn"`); max-min's widest outgoing factor instead of +∞ at the
 *   source (`"drawn-widest-edge"`, the built-in widest-path's convention); each
 *   node's own weight (`source: "none"` with `others: "node-weights"`).
 *   Factor f: the edge weight, 1, or the weight of the edge's head node.
 * - Mask: nodes whose value is not finite (unreached under min-plus, max-plus
 *   and max-min, whose zero is ±∞; max-min's +∞ at a `"drawn"` source) have
 *   mask 0 and target 0. Under or-and, plus-times and max-times the zero is 0
 *   and every node counts.
 * - Inputs, in the factors' units (so a weight-scale rung scales them with the
 *   weights, as the built-in tasks do): node [start] = b(v) with each infinity
 *   replaced by a finite stand-in: min-plus's +∞ by the median factor m
 *   (lower median of |factor|), max-plus's −∞ by −m, max-min's −∞ by 0 and its
 *   +∞ at the source by the widest outgoing factor. Edge [factor], except with
 *   node weights: [median node weight], the same on every edge (the factor is
 *   the head's own input). Same encoding as shortest-path, widest-path and
 *   earliest-finish; hop-count's node input is the marker isSource, where
 *   min-plus over unit factors gives 1 − isSource (0 at the source, m = 1
 *   elsewhere).
 * - Source draw: `options.source`, else as the built-in tasks (uniform; on a
 *   directed graph a node without incoming edges, or without outgoing edges for
 *   `direction: "backward"`). Node weights are drawn as earliest-finish draws
 *   its durations. With the same rng the built-in tasks' targets come out bit
 *   for bit (test/tasks/recurrence-builtins.test.ts).
 * - Scale shift: `'graph'` (the caller scales the weights); with node weights
 *   `'task'` (the task scales what it draws).
 * - depth: rounds of the solver that changed something (for earliest-finish's
 *   equivalent this can be fewer than its longest chain).
 */
import type Graph from 'graphology';
import type { Task, TaskInstance, TaskOptions } from '../types.ts';
import { chooseSource, maskNonFinite, medianMagnitude, messageEdges } from '../common.ts';
import { drawDurations } from '../earliest-finish.ts';
import { SEMIRINGS } from './algebra.ts';
import { ACYCLIC_ONLY, RECURRENCE_GLOSS, recurrenceLabel, recurrenceProblems, type RecurrenceSpec } from './options.ts';
import { recurrenceRounds, solveRecurrence, type RecurrenceSystem } from './solver.ts';
import { recurrenceAlignment } from './alignment.ts';
import { recurrenceWeightProblems } from './check.ts';

const WHERE = 'tasks/recurrence';
const ALL_FAMILIES = ['er', 'geometric', 'grid', 'path', 'tree', 'dag'];

/** The start b: zero everywhere, then the source's value, or each node's own weight. */
function startOf(spec: RecurrenceSpec, n: number, edges: Pick<RecurrenceSystem, 'src' | 'factor'>, source: number | undefined, nodeWeights: readonly number[] | null): number[] {
  if (nodeWeights) return nodeWeights.slice();
  const ops = SEMIRINGS[spec.semiring];
  const start = new Array<number>(n).fill(ops.zero);
  if (source === undefined) return start;
  start[source] = spec.source === 'drawn-widest-edge' ? widestOutgoing(edges, source) : ops.one;
  return start;
}

/** The largest factor on the source's outgoing message edges (−∞ without one). */
function widestOutgoing(edges: Pick<RecurrenceSystem, 'src' | 'factor'>, source: number): number {
  let best = -Infinity;
  for (let e = 0; e < edges.src.length; e++) if (edges.src[e] === source && edges.factor[e]! > best) best = edges.factor[e]!;
  return best;
}

/** The node input: the start with each infinity replaced by its stand-in in the factors' units (see the header). */
function startInput(spec: RecurrenceSpec, system: RecurrenceSystem): number[] {
  const m = medianMagnitude(system.factor);
  return system.start.map((b, v) => {
    if (Number.isFinite(b)) return b;
    if (spec.semiring === 'min-plus') return m;
    if (spec.semiring === 'max-plus') return 0 - m; // −m, but +0 (not −0) on a graph without edges
    // max-min: −∞ (unreached) below every width; +∞ at the source, the widest first edge.
    if (b < 0) return 0;
    const widest = widestOutgoing(system, v);
    return Number.isFinite(widest) ? widest : 0;
  });
}

/** The system an instance encodes (its message edges already run the recurrence's way). */
function systemOf(spec: RecurrenceSpec, inst: TaskInstance): RecurrenceSystem {
  const nodeWeights = spec.others === 'node-weights' ? inst.nodeInputs.map((f) => f[0]!) : null;
  const factor = nodeWeights ? inst.messageDst.map((v) => nodeWeights[v]!) : inst.edgeInputs.map((f) => f[0]!);
  const edges = { src: inst.messageSrc, factor };
  return { n: inst.nodes, src: inst.messageSrc, dst: inst.messageDst, factor, start: startOf(spec, inst.nodes, edges, inst.source, nodeWeights) };
}

function buildInstance(spec: RecurrenceSpec, graph: Graph, options: TaskOptions): TaskInstance {
  const edges = messageEdges(graph, WHERE);
  const backward = spec.direction === 'backward';
  const src = backward ? edges.dst : edges.src;
  const dst = backward ? edges.src : edges.dst;
  const n = graph.order;
  const source = spec.source === 'none' ? undefined : chooseSource(graph, options.rng, WHERE, options.source, backward);
  const nodeWeights = spec.others === 'node-weights' ? drawDurations(graph, options) : null;
  const factor = nodeWeights ? dst.map((v) => nodeWeights[v]!) : spec.others === 'unit' ? src.map(() => 1) : edges.weight;
  const system: RecurrenceSystem = { n, src, dst, factor, start: startOf(spec, n, { src, factor }, source, nodeWeights) };
  const { value, rounds } = solveRecurrence(spec.semiring, system, WHERE);
  const { target, mask } = maskNonFinite(value);
  const nodeInput = nodeWeights ?? startInput(spec, system);
  const unit = nodeWeights ? medianMagnitude(nodeWeights) : 0;
  const edgeInput = nodeWeights ? src.map(() => unit) : factor;
  return {
    nodes: n,
    nodeInputs: nodeInput.map((x) => [x]),
    messageSrc: src,
    messageDst: dst,
    edgeInputs: edgeInput.map((x) => [x]),
    target,
    mask,
    ...(source === undefined ? {} : { source }),
    depth: rounds,
    ...(nodeWeights ? { extras: { nodeWeights } } : {}),
  };
}

function maskPolicy(spec: RecurrenceSpec): string {
  const zero = SEMIRINGS[spec.semiring].zero;
  if (Number.isFinite(zero)) return `Every node counts; a node no start reaches has the semiring's zero, ${zero}, as its target.`;
  const atSource = spec.semiring === 'max-min' && spec.source === 'drawn' ? " The source's +∞ (the empty path) is masked too." : '';
  return `Nodes no start reaches keep the zero (${zero}): mask 0, target 0; every other node counts.${atSource}`;
}

/**
 * What a graph file must carry: a recurrence from a source reads the file's
 * weights (positive where they act as widths or reliabilities; the solver still
 * refuses a reliability above 1 or a cycle it cannot iterate) or none with unit
 * factors. Node weights are drawn, and a file's graph draws nothing: no rule.
 */
function fileRuleOf(spec: RecurrenceSpec): Pick<Task, 'fileRule'> {
  if (spec.others === 'node-weights') return {};
  if (spec.others === 'unit') return { fileRule: { weights: 'ignored', source: true } };
  const positive = spec.semiring === 'max-min' || spec.semiring === 'max-times';
  return { fileRule: { weights: positive ? 'positive' : 'non-negative', source: true } };
}

function makeTask(spec: RecurrenceSpec): Task {
  const problems = recurrenceProblems(spec);
  if (problems.length) throw new Error(`${WHERE}: ${problems.join('; ')}`);
  const alignment = recurrenceAlignment(spec.semiring);
  const gloss = RECURRENCE_GLOSS[spec.semiring];
  return {
    id: recurrenceLabel(spec),
    title: `Your recurrence (${spec.semiring})`,
    describe: `${gloss}. Start: ${RECURRENCE_GLOSS[spec.source]}. Factors: ${RECURRENCE_GLOSS[spec.others]}. Direction: ${RECURRENCE_GLOSS[spec.direction]}.`,
    alignedAggregator: alignment.aggregator,
    alignedStructure: `x(v) = b(v) ⊕ ⊕ over u→v of x(u) ⊗ f(u→v), ${alignment.operations} (${spec.semiring})`,
    nodeFeatureNames: ['start'],
    edgeFeatureNames: [spec.others === 'node-weights' ? 'medianNodeWeight' : 'factor'],
    families: ACYCLIC_ONLY.has(spec.semiring) ? ['dag'] : [...ALL_FAMILIES],
    maskPolicy: maskPolicy(spec),
    scaleShift: spec.others === 'node-weights' ? 'task' : 'graph',
    ...fileRuleOf(spec),
    admitsWeightScale: (weightRange, scale) => recurrenceWeightProblems(spec, { train: { weightRange }, test: { weightScales: [scale] } }).length === 0,
    instance: (graph, options) => buildInstance(spec, graph, options),
    iterate: (_graph, inst, rounds) => recurrenceRounds(spec.semiring, systemOf(spec, inst), rounds, WHERE),
  };
}

const built = new Map<string, Task>();

/** The task of a recurrence (one object per distinct spec); throws on a combination `recurrenceProblems` refuses. */
export function recurrenceTask(spec: RecurrenceSpec): Task {
  const key = recurrenceLabel(spec);
  let task = built.get(key);
  if (!task) {
    task = makeTask(spec);
    built.set(key, task);
  }
  return task;
}
