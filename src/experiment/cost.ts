/**
 * How long an experiment will take, before anything has run: a two-constant
 * cost model of one run, calibrated on two shipped presets timed by the bench
 * (`bench/presets.ts`) and written into their `expectation`:
 *
 *   quick-demo               20 runs, 2 workers: 8.2 s  → 0.82 worker-seconds per run
 *   shortest-path-max-vs-sum 20 runs, 2 workers: 79.5 s → 7.95 worker-seconds per run
 *
 * (engine 0.3.0 with the fused process kernels, bench of 2026-12-03). A run costs
 * about (training steps × message-passing steps per batch) rounds of the
 * fused kernels, each a fixed part plus a part that grows with the batch's
 * rows × hidden width (the matmuls).
 * Scoring on the ladder is folded into the constants. The estimate is a
 * guide for the run bar ("≈ 40 s"), within a factor of two on the shipped
 * presets; the live ETA replaces it once runs finish.
 */
import { armModel, type ExperimentSpec } from './spec.ts';

/** Milliseconds per kernel round: fixed, and per (batch row × hidden unit). */
const ROUND_MS = 0.1867;
const ROW_UNIT_MS = 4.93e-5;

/** Message-passing steps a training batch gets, on average, under an arm's step rule. */
function trainingDepth(spec: ExperimentSpec, armIndex: number): number {
  const steps = armModel(spec, armIndex).steps;
  const largest = spec.train.sizes[1];
  const base = (() => {
    switch (steps.rule) {
      case 'fixed':
        return steps.count;
      case 'nodes':
        return largest;
      case 'proportional':
        return Math.ceil(steps.factor * largest);
      case 'until-stable':
        return steps.cap;
    }
  })();
  return Math.min(steps.cap, base) + steps.trainJitter / 2;
}

/** Estimated worker-seconds for one run of an arm. */
export function runSeconds(spec: ExperimentSpec, armIndex: number): number {
  const model = armModel(spec, armIndex);
  const meanNodes = (spec.train.sizes[0] + spec.train.sizes[1]) / 2;
  const rows = spec.budget.batchGraphs * meanNodes * model.hidden;
  const rounds = spec.budget.steps * trainingDepth(spec, armIndex);
  return (rounds * (ROUND_MS + ROW_UNIT_MS * rows)) / 1000;
}

export interface CostEstimate {
  runs: number;
  /** Sum of the runs' estimated seconds on one worker. */
  workerSeconds: number;
  /** Wall seconds on `workers` workers (runs spread evenly; never below the longest single run). */
  wallSeconds: number;
}

/** A finished run of this spec on this machine: its arm and its measured seconds. */
export interface ObservedRun {
  armIndex: number;
  seconds: number;
}

/**
 * The estimate for the given runs (arm indices, one per run still to do) on
 * `workers` workers. Runs of the same spec already finished on this machine
 * rescale the model by their median measured / modelled ratio (this machine's
 * speed, other work sharing it).
 */
export function estimateCost(spec: ExperimentSpec, armIndices: readonly number[], workers: number, observed: readonly ObservedRun[] = []): CostEstimate {
  const ratios = observed
    .filter((r) => Number.isFinite(r.seconds) && r.seconds > 0 && r.armIndex < spec.arms.length)
    .map((r) => r.seconds / runSeconds(spec, r.armIndex))
    .sort((a, b) => a - b);
  const scale = ratios.length ? ratios[Math.floor((ratios.length - 1) / 2)]! : 1;
  const perArm = spec.arms.map((_, i) => scale * runSeconds(spec, i));
  const each = armIndices.map((a) => perArm[a] ?? 0);
  const workerSeconds = each.reduce((s, x) => s + x, 0);
  const lanes = Math.max(1, Math.min(workers, each.length));
  const wallSeconds = each.length === 0 ? 0 : Math.max(workerSeconds / lanes, ...each);
  return { runs: each.length, workerSeconds, wallSeconds };
}
