/**
 * Training options as the training layer sees them: plain types, no schema.
 * The experiment spec (src/experiment/spec.ts) validates untrusted input into
 * these shapes; a type-level check there keeps the two in step.
 */
import type { LossName } from './loss.ts';

export type MetricName = 'mae' | 'mre' | 'miss';

/**
 * Learning-rate schedule. `constant` keeps the rate; `warmup-cosine` rises
 * linearly from 0 over `warmup` steps, then follows a cosine from the full
 * rate down to `floor` × rate at the last step.
 */
export interface Schedule {
  kind: 'constant' | 'warmup-cosine';
  warmup: number;
  floor: number;
}

export interface Budget {
  steps: number;
  batchGraphs: number;
  learningRate: number;
  clipNorm: number;
  loss: LossName;
  /** Validate every k steps and keep the best weights (0: never; keep the last). */
  validateEvery: number;
  schedule?: Schedule | undefined;
  /** L1 penalty strength on every weight matrix (absent: 0). */
  sparsity?: number | undefined;
  /** Step-wise supervision with the exact algorithm's intermediate states (absent: off). */
  stepSupervision?: boolean | undefined;
  /** The fit gate (read by the experiment layer; absent: its default). */
  fitGate?: number | undefined;
}
