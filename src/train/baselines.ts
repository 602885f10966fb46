/**
 * Trivial baselines: the best constant predictor for each metric. An arm whose
 * error is no better than "predict the same number for every node" has learned
 * nothing worth comparing, so every ladder rung reports two constants beside
 * the arms: the best one for that rung (computed exactly from the rung's own
 * targets, an oracle no network can beat by luck) and the one fitted on the
 * training graphs (what a model that ignores the graph would carry over).
 *
 * The optimal constant per metric (only counted nodes, as in ./metrics.ts):
 *   mae   a median of the targets
 *   mre   a weighted median with weights 1/|t| over nodes with |t| ≥ 1e-6
 *   miss  a point covered by the most tolerance intervals [t − tol(t), t + tol(t)]
 */
import type { TaskInstance } from '../tasks/types.ts';
import { ABSOLUTE_TOLERANCE, MetricAccumulator, RELATIVE_TOLERANCE, type Metrics } from './metrics.ts';

export type ConstantMetric = 'mae' | 'mre' | 'miss';
export type PerMetric = Record<ConstantMetric, number>;

export interface ConstantBaselines {
  /** Error of the best constant for this set, per metric (each metric with its own optimal constant). */
  best: PerMetric;
  /** Error on this set of the constant fitted on the training graphs, per metric. */
  train: PerMetric;
  /** The constants themselves. */
  bestConstant: PerMetric;
  trainConstant: PerMetric;
}

const RELATIVE_FLOOR = 1e-6;
const METRICS: readonly ConstantMetric[] = ['mae', 'mre', 'miss'];

/** Targets of counted nodes (mask 1), in instance order. */
export function countedTargets(instances: readonly TaskInstance[]): number[] {
  const out: number[] = [];
  for (const inst of instances) for (let i = 0; i < inst.nodes; i++) if (inst.mask[i]) out.push(inst.target[i]!);
  return out;
}

/** The smallest c minimising Σ w_i |c − x_i| (a weighted median); NaN for no values. */
export function weightedMedian(values: readonly number[], weights: readonly number[]): number {
  const order = values.map((_, i) => i).filter((i) => weights[i]! > 0).sort((p, q) => values[p]! - values[q]!);
  if (order.length === 0) return NaN;
  let total = 0;
  for (const i of order) total += weights[i]!;
  let running = 0;
  for (const i of order) {
    running += weights[i]!;
    if (running >= total / 2) return values[i]!;
  }
  return values[order[order.length - 1]!]!;
}

/** A point covered by the most closed intervals [t − tol, t + tol] (the middle of the leftmost such stretch); NaN for no values. */
function mostCoveredPoint(targets: readonly number[]): number {
  if (targets.length === 0) return NaN;
  // Opening events sort before closing ones at the same coordinate: the intervals are closed.
  const events: Array<[number, number]> = [];
  for (const t of targets) {
    const tol = Math.max(RELATIVE_TOLERANCE * Math.abs(t), ABSOLUTE_TOLERANCE);
    events.push([t - tol, 1], [t + tol, -1]);
  }
  events.sort((p, q) => p[0] - q[0] || q[1] - p[1]);
  let depth = 0;
  let best = -1;
  let at = NaN;
  for (let k = 0; k < events.length; k++) {
    const [x, delta] = events[k]!;
    depth += delta;
    if (depth > best) {
      best = depth;
      // The middle of the stretch where this many intervals overlap, not its edge: an edge point
      // recomputed as |c − t| can land a rounding error outside the tolerance.
      at = (x + events[k + 1]![0]) / 2;
    }
  }
  return at;
}

/** The constant that minimises `metric` over these targets. */
export function optimalConstant(metric: ConstantMetric, targets: readonly number[]): number {
  switch (metric) {
    case 'mae':
      return weightedMedian(targets, targets.map(() => 1));
    case 'mre':
      return weightedMedian(
        targets,
        targets.map((t) => (Math.abs(t) >= RELATIVE_FLOOR ? 1 / Math.abs(t) : 0)),
      );
    case 'miss':
      return mostCoveredPoint(targets);
  }
}

/** Every metric of predicting `constant` at every counted node, scored exactly as a network is. */
export function constantMetrics(instances: readonly TaskInstance[], constant: number): Metrics {
  const acc = new MetricAccumulator();
  for (const inst of instances) for (let i = 0; i < inst.nodes; i++) if (inst.mask[i]) acc.add(constant, inst.target[i]!);
  return acc.result();
}

/** The optimal constant for every metric over these targets. */
export function optimalConstants(targets: readonly number[]): PerMetric {
  return { mae: optimalConstant('mae', targets), mre: optimalConstant('mre', targets), miss: optimalConstant('miss', targets) };
}

/**
 * Both baselines on `instances`: the best constants for these instances, and `trainConstant`
 * (optimalConstants of the training targets, fitted once per run rather than once per rung).
 */
export function constantBaselines(instances: readonly TaskInstance[], trainConstant: PerMetric): ConstantBaselines {
  const bestConstant = optimalConstants(countedTargets(instances));
  const scored = (constants: PerMetric): PerMetric => {
    const out: PerMetric = { mae: NaN, mre: NaN, miss: NaN };
    for (const metric of METRICS) if (!Number.isNaN(constants[metric])) out[metric] = constantMetrics(instances, constants[metric])[metric];
    return out;
  };
  return { best: scored(bestConstant), train: scored(trainConstant), bestConstant, trainConstant: { ...trainConstant } };
}
