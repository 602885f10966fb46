/**
 * What one run's numbers depend on, as a key: the shared parts of the spec
 * that reach training and scoring (task, graphs, ladder, budget, metric), the
 * arm's resolved model and training switches, and the seed. Not the question,
 * the expectation, the arm's name or position, the other arms or the seed
 * count: a run with the same key gives the same numbers (seeded streams are
 * named, so other arms and seeds draw nothing from it). The sheet reuses a
 * finished run under an edited spec when its key is unchanged.
 */
import { canonicalJson, sha256Hex } from '../util/hash.ts';
import { armModel, armTraining, type ExperimentSpec } from './spec.ts';
import type { RunPlan } from './plan.ts';
import type { RunResult } from './run-types.ts';

export function runKey(spec: ExperimentSpec, plan: Pick<RunPlan, 'armIndex' | 'seed'>): string {
  const { question: _q, expectation: _e, arms: _a, seeds: _s, sweep: _w, model: _m, ...shared } = spec;
  // The fit gate only judges finished runs: changing it reruns nothing.
  const { fitGate: _g, ...budget } = spec.budget;
  return sha256Hex(canonicalJson({ shared: { ...shared, budget }, model: armModel(spec, plan.armIndex), training: armTraining(spec, plan.armIndex), seed: plan.seed })).slice(0, 16);
}

/** A finished run carried over to another plan position (same key): renumbered, same numbers. */
export function renumbered(result: RunResult, plan: RunPlan): RunResult {
  return { ...result, index: plan.index, arm: plan.arm, armIndex: plan.armIndex, seed: plan.seed, seedIndex: plan.seedIndex };
}
