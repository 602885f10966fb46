/**
 * One run: train one arm on one seed's graphs and score it on the ladder.
 * Host-agnostic: the CLI's worker threads and the browser's web workers call
 * exactly this.
 */
import type { ExperimentSpec } from './spec.ts';
import { armModel, armTraining } from './spec.ts';
import type { RunPlan } from './plan.ts';
import { makeSeedData, seedRoot, type SeedData } from './datasets.ts';
import { getTask } from '../tasks/registry.ts';
import { MessagePassingNetwork } from '../model/network.ts';
import { columnStats, transformsFor } from '../model/transforms.ts';
import type { FeatureTransforms } from '../train/batch.ts';
import { train, type TrainProgress } from '../train/trainer.ts';
import { evaluateSet } from '../train/evaluate.ts';
import { evaluateLarge } from '../train/evaluate-large.ts';
import { fileRung } from './file-rungs.ts';
import type { TaskInstance } from '../tasks/types.ts';
import { constantBaselines, countedTargets, optimalConstants } from '../train/baselines.ts';
import { unmeasuredResult } from './run-record.ts';
import type { RungResult, RunResult } from './run-types.ts';

export type { RunStatus, RungResult, RunResult } from './run-types.ts';

export interface RunHooks {
  onProgress?: (p: TrainProgress) => void;
  shouldStop?: () => boolean;
  /** Reuse a seed's graphs across arms in the same worker. */
  dataCache?: Map<number, SeedData>;
  /** Keep the trained network alive (probes); the caller must dispose it. */
  keepNetwork?: (network: MessagePassingNetwork, transforms: FeatureTransforms, data: SeedData) => void;
}

export function featureTransforms(spec: ExperimentSpec, armIndex: number, trainSet: readonly TaskInstance[]): FeatureTransforms {
  const task = getTask(spec.task);
  const model = armModel(spec, armIndex);
  const node = transformsFor(model.nodeTransform, task.nodeFeatureNames.length, `arms[${armIndex}].model.nodeTransform`);
  const edge = transformsFor(model.edgeTransform, task.edgeFeatureNames.length, `arms[${armIndex}].model.edgeTransform`);
  return {
    node,
    edge,
    nodeStats: node.includes('standardize') ? columnStats(trainSet.map((t) => t.nodeInputs), node.length) : [],
    edgeStats: edge.includes('standardize') ? columnStats(trainSet.map((t) => t.edgeInputs), edge.length) : [],
  };
}

function rungSummary(instances: readonly TaskInstance[]): Pick<RungResult, 'depthMean' | 'depthMax' | 'meanDegree'> {
  let depth = 0;
  let depthMax = 0;
  let edges = 0;
  let nodes = 0;
  for (const inst of instances) {
    depth += inst.depth;
    depthMax = Math.max(depthMax, inst.depth);
    edges += inst.messageSrc.length;
    nodes += inst.nodes;
  }
  return { depthMean: instances.length ? depth / instances.length : 0, depthMax, meanDegree: nodes ? edges / nodes : 0 };
}

export function seedData(spec: ExperimentSpec, seed: number, cache?: Map<number, SeedData>): SeedData {
  const hit = cache?.get(seed);
  if (hit) return hit;
  const data = makeSeedData(spec, seed);
  cache?.set(seed, data);
  return data;
}

export function executeRun(spec: ExperimentSpec, plan: RunPlan, hooks: RunHooks = {}): RunResult {
  const started = Date.now();
  const base = unmeasuredResult(plan);
  const data = seedData(spec, plan.seed, hooks.dataCache);
  const task = getTask(spec.task);
  const transforms = featureTransforms(spec, plan.armIndex, data.train);
  const model = armModel(spec, plan.armIndex);
  const root = seedRoot(plan.seed);
  const network = new MessagePassingNetwork(model, task.nodeFeatureNames.length, task.edgeFeatureNames.length, root);
  let kept = false;
  try {
    base.parameters = network.params.count();
    const training = armTraining(spec, plan.armIndex);
    const outcome = train({
      network,
      train: data.train,
      validation: data.validation,
      transforms,
      budget: spec.budget,
      learningRate: training.learningRate,
      schedule: training.schedule,
      sparsity: training.sparsity,
      stepSupervision: training.stepSupervision,
      metric: spec.metric,
      rng: root.fork('training'),
      onProgress: hooks.onProgress,
      shouldStop: hooks.shouldStop,
    });
    Object.assign(base, {
      stepsDone: outcome.stepsDone,
      keptStep: outcome.keptStep,
      validationCurve: outcome.validationCurve,
      lossCurve: outcome.lossCurve,
      lossEvery: outcome.lossEvery,
      lastFiniteLoss: outcome.lastFiniteLoss,
    });
    if (outcome.status === 'diverged') {
      base.status = 'diverged';
      base.divergedAt = outcome.divergedAt;
      base.reason = outcome.divergedReason;
      return base;
    }
    if (outcome.stepsDone < spec.budget.steps) {
      base.status = 'cancelled';
      base.reason = `stopped at step ${outcome.stepsDone} of ${spec.budget.steps}`;
      return base;
    }
    base.inDistribution = evaluateSet(network, data.fit, transforms).metrics;
    base.validation = evaluateSet(network, data.validation, transforms).metrics;
    const trainConstant = optimalConstants(countedTargets(data.train));
    for (const rung of data.rungs) {
      const { metrics } = evaluateSet(network, rung.instances, transforms);
      base.ladder.push({
        family: rung.family,
        size: rung.size,
        scale: rung.scale,
        metrics,
        baseline: constantBaselines(rung.instances, trainConstant),
        ...rungSummary(rung.instances),
      });
    }
    // Graph files: one more rung each, scored in edge chunks (they may be far larger than any generated rung).
    for (const file of spec.test.files ?? []) {
      const rung = fileRung(task, file, plan.files);
      const { metrics } = evaluateLarge(network, rung.instance, transforms);
      base.ladder.push({
        family: rung.family,
        size: rung.instance.nodes,
        scale: 1,
        metrics,
        baseline: constantBaselines([rung.instance], trainConstant),
        ...rungSummary([rung.instance]),
        file: rung.info,
      });
    }
    if (hooks.keepNetwork) {
      hooks.keepNetwork(network, transforms, data);
      kept = true;
    }
    return base;
  } finally {
    base.seconds = (Date.now() - started) / 1000;
    if (!kept) network.dispose();
  }
}
