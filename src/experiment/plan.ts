/**
 * Run expansion: an experiment is arms × seeds runs. Runs are numbered
 * seed-major (all arms of seed 0, then seed 1, ...) so a prefix of the runs
 * always holds complete pairs, and shards are deterministic slices.
 */
import type { ExperimentSpec } from './spec.ts';
import type { GraphFileContent } from './file-rungs.ts';

export interface RunPlan {
  index: number;
  armIndex: number;
  arm: string;
  seedIndex: number;
  /** The seed value every random draw of this run flows from. */
  seed: number;
  /**
   * The content of the spec's graph files (`test.files`), supplied by the host
   * that read them; absent when the spec names none. Never copied into results.
   */
  files?: readonly GraphFileContent[];
}

export function planRuns(spec: ExperimentSpec): RunPlan[] {
  const runs: RunPlan[] = [];
  for (let s = 0; s < spec.seeds.count; s++) {
    spec.arms.forEach((arm, a) => {
      runs.push({ index: runs.length, armIndex: a, arm: arm.name, seedIndex: s, seed: spec.seeds.base + s });
    });
  }
  return runs;
}

/** The i-th of n deterministic slices (1-based i, round-robin so each slice mixes arms and seeds). */
export function shardRuns(runs: readonly RunPlan[], shard: { index: number; count: number }): RunPlan[] {
  const { index, count } = shard;
  if (!Number.isInteger(count) || count < 1) throw new Error(`experiment/plan: shard count must be a whole number >= 1, got ${count}`);
  if (!Number.isInteger(index) || index < 1 || index > count) throw new Error(`experiment/plan: shard ${index} is out of range 1..${count}`);
  return runs.filter((r) => r.index % count === index - 1);
}
