/**
 * Constructing run records without the engine: host code (the worker pools)
 * records failed runs with this, and must not pull the training code into a
 * page's main thread just to do so.
 */
import type { RunPlan } from './plan.ts';
import type { RunResult, RunStatus } from './run-types.ts';

/** A result with nothing measured yet: the starting point of every run, and the record of a failed one. */
export function unmeasuredResult(plan: RunPlan, status: RunStatus = 'ok', reason?: string): RunResult {
  return {
    index: plan.index,
    arm: plan.arm,
    armIndex: plan.armIndex,
    seed: plan.seed,
    seedIndex: plan.seedIndex,
    status,
    ...(reason === undefined ? {} : { reason }),
    stepsDone: 0,
    keptStep: 0,
    lossCurve: [],
    lossEvery: 1,
    parameters: 0,
    inDistribution: null,
    ladder: [],
    seconds: 0,
  };
}

/** The record of a run that never finished because its worker failed. */
export function failedResult(plan: RunPlan, reason: string): RunResult {
  return unmeasuredResult(plan, 'failed', reason);
}

