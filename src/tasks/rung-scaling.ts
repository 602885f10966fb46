/**
 * What a weight-scale rung (`test.weightScales`, factor c) does to each task's
 * network inputs and target, as powers of c: input(c) = c^p × input(1) per
 * node and edge feature, target(c) = c^p × target(1). Built through
 * `buildInstance` with `weightScale: c` and the same graph and rng; every task's
 * header explains its entry, and test/tasks/rung-scaling.test.ts checks each
 * entry against `buildInstance` (exactly where the inputs are weights or
 * durations times c, to float rounding where they are recomputed, e.g.
 * distances from scaled positions).
 *
 * Used by the audit (inspect/audit.ts) to measure homogeneity under the
 * rung's own transformation: when every input and the target have power 1, a
 * positively homogeneous network (f(λx) = λ f(x)) keeps its error relative
 * across the rung; when not (hop-count, descendant-count: nothing scales;
 * charge-potential: distances scale, charges do not, potentials go as 1/c),
 * homogeneity is not what the rung asks for.
 */
import { getTask, taskLabel, type TaskRef } from './registry.ts';
import { recurrenceRungScaling } from './recurrence/rung-scaling.ts';
import type { TaskInstance } from './types.ts';

const WHERE = 'tasks/rung-scaling';

export interface RungScaling {
  /** Per node feature (`nodeFeatureNames` order): p with input(c) = c^p × input(1). */
  node: number[];
  /** Per edge feature (`edgeFeatureNames` order). */
  edge: number[];
  /** p with target(c) = c^p × target(1) (sums may differ in the last bits). */
  target: number;
}

const RUNG_SCALING: Record<string, RungScaling> = {
  // nonSourceMedianWeight, weight -> distances
  'shortest-path': { node: [1], edge: [1], target: 1 },
  // sourceWidestEdge, weight -> bottlenecks
  'widest-path': { node: [1], edge: [1], target: 1 },
  // duration, medianDuration -> finish times
  'earliest-finish': { node: [1], edge: [1], target: 1 },
  // isSource, one -> hop counts: weights play no part
  'hop-count': { node: [0], edge: [0], target: 0 },
  // one, one -> counts: weights play no part
  'descendant-count': { node: [0], edge: [0], target: 0 },
  // charge, distance -> potentials ∝ charge / distance
  'charge-potential': { node: [0], edge: [1], target: -1 },
};

/** The rung scaling of a registered task; a clear error when a task has none or its feature counts disagree. */
export function rungScaling(ref: TaskRef): RungScaling {
  const task = getTask(ref);
  const taskId = taskLabel(ref);
  const scaling = typeof ref !== 'string' ? recurrenceRungScaling(ref.recurrence) : Object.hasOwn(RUNG_SCALING, ref) ? RUNG_SCALING[ref] : undefined;
  if (!scaling) throw new Error(`${WHERE}: task '${taskId}' has no entry; add how its weight-scale rung scales each input`);
  if (scaling.node.length !== task.nodeFeatureNames.length || scaling.edge.length !== task.edgeFeatureNames.length) {
    throw new Error(
      `${WHERE}: task '${taskId}' has ${task.nodeFeatureNames.length} node and ${task.edgeFeatureNames.length} edge features, ` +
        `but its entry lists ${scaling.node.length} and ${scaling.edge.length}`,
    );
  }
  return { node: [...scaling.node], edge: [...scaling.edge], target: scaling.target };
}

/** True when the rung scales every input and the target by c (power 1): the case positive homogeneity is about. */
export function scalesEverythingTogether(scaling: RungScaling): boolean {
  return scaling.target === 1 && scaling.node.every((p) => p === 1) && scaling.edge.every((p) => p === 1);
}

function times(value: number, factor: number, power: number): number {
  if (power === 0) return value;
  if (power === 1) return value * factor; // the same float operation the rung performs (w · c, duration · c)
  return value * factor ** power;
}

/**
 * `instance` with its inputs (and target) scaled as the rung ×`factor` scales
 * them. Where a power is 1 the input is `value * factor`, the very operation
 * `scaleWeights` and the task-drawn durations use, so for weight-carrying
 * tasks the inputs equal those `buildInstance(..., { weightScale: factor })`
 * gives on the same graph and rng bit for bit. The target is scaled by
 * factor^p (the rung's own sums may differ in the last bits); mask, edges and
 * depth are unchanged.
 */
export function scaleLikeRung(instance: TaskInstance, scaling: RungScaling, factor: number): TaskInstance {
  if (!Number.isFinite(factor) || factor <= 0) throw new Error(`${WHERE}: factor must be a finite number > 0, got ${String(factor)}`);
  const row = (values: readonly number[], powers: readonly number[], what: string): number[] => {
    if (values.length !== powers.length) throw new Error(`${WHERE}: ${what} row has ${values.length} features, the scaling lists ${powers.length}`);
    return values.map((v, j) => times(v, factor, powers[j]!));
  };
  return {
    ...instance,
    nodeInputs: instance.nodeInputs.map((r) => row(r, scaling.node, 'node')),
    edgeInputs: instance.edgeInputs.map((r) => row(r, scaling.edge, 'edge')),
    target: instance.target.map((t) => times(t, factor, scaling.target)),
  };
}
