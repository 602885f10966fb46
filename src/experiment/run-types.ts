/**
 * The record of one run, as types only: `run.ts` (which produces it) and
 * `run-record.ts` (which builds empty and failed records without the engine)
 * both import from here, so neither imports the other's types.
 */
import type { Metrics } from '../train/metrics.ts';
import type { ConstantBaselines } from '../train/baselines.ts';
import type { ValidationPoint } from '../train/trainer.ts';
import type { FileRungInfo } from './file-rungs.ts';

export type RunStatus = 'ok' | 'diverged' | 'failed' | 'cancelled';

export interface RungResult {
  family: string;
  size: number;
  scale: number;
  metrics: Metrics;
  /**
   * The trivial baselines on this rung's graphs (the same for every arm of a seed): the best
   * constant for the rung and the constant fitted on the training graphs, per metric. Absent in
   * results recorded before baselines existed.
   */
  baseline?: ConstantBaselines;
  /** What actually shifted: propagation depth of the exact algorithm and mean in-degree of message edges. */
  depthMean: number;
  depthMax: number;
  meanDegree: number;
  /** Graph-file rungs only (family "file:<name>", scale 1): which file, its size and what was counted. */
  file?: FileRungInfo;
}

export interface RunResult {
  index: number;
  arm: string;
  armIndex: number;
  seed: number;
  seedIndex: number;
  status: RunStatus;
  reason?: string;
  divergedAt?: number;
  lastFiniteLoss?: number | null;
  stepsDone: number;
  keptStep: number;
  /** Validation checks during training (absent in results recorded before they were kept). */
  validationCurve?: ValidationPoint[];
  lossCurve: number[];
  lossEvery: number;
  parameters: number;
  /**
   * In-distribution score on fresh graphs of the training sizes that played no part in training
   * or in choosing the kept weights (the fit gate reads its mre).
   */
  inDistribution: Metrics | null;
  /** Score on the validation graphs that chose the kept weights (optimistic; for reference only). */
  validation?: Metrics | null;
  ladder: RungResult[];
  seconds: number;
}
