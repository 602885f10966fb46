/**
 * The training loop: disjoint-union batches, Adam, global-norm gradient
 * clipping, a divergence guard, and best-on-validation weight keeping.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { Budget, MetricName, Schedule } from './options.ts';
import type { TaskInstance } from '../tasks/types.ts';
import type { MessagePassingNetwork } from '../model/network.ts';
import { stepsFor, trainingStepsFor } from '../model/steps.ts';
import type { Rng } from '../util/rng.ts';
import { makeBatch, stepTargetsFor, type FeatureTransforms } from './batch.ts';
import { uploadBatch } from './tensors.ts';
import { maskedLoss, stepwiseLoss } from './loss.ts';
import { evaluateSet } from './evaluate.ts';
import { FusedAdam, globalNorm } from './adam.ts';
import { learningRateAt } from './schedule.ts';

export interface TrainProgress {
  step: number;
  totalSteps: number;
  loss: number;
}

export type TrainStatus = 'ok' | 'diverged';

export interface TrainOutcome {
  status: TrainStatus;
  stepsDone: number;
  /** Loss every `lossEvery` steps (the mean over that window). */
  lossCurve: number[];
  lossEvery: number;
  lastFiniteLoss: number | null;
  /** For diverged runs: the step at which it was detected and why. */
  divergedAt?: number;
  divergedReason?: string;
  /** Step whose weights were kept (best validation), or the last step. */
  keptStep: number;
  /**
   * Every validation check: the step, the preset's metric and the relative error on the
   * validation graphs. Shows when training reached the fit gate, i.e. whether the budget was
   * long enough (the gate itself is judged on fresh graphs after training).
   */
  validationCurve: ValidationPoint[];
}

export interface ValidationPoint {
  step: number;
  value: number;
  relative: number;
}

export interface TrainArgs {
  network: MessagePassingNetwork;
  train: readonly TaskInstance[];
  validation: readonly TaskInstance[];
  transforms: FeatureTransforms;
  budget: Budget;
  /** The arm's own training switches (see armTraining in experiment/spec.ts); absent: the budget's. */
  learningRate?: number;
  schedule?: Schedule | null;
  /** L1 strength on weight matrices (0: none). */
  sparsity?: number;
  /** Which metric picks the kept weights on the validation set: the preset's own (default mae). */
  metric?: MetricName;
  /**
   * Step-wise supervision: the decoded state after message-passing step k is also
   * fitted to the exact algorithm's state after k rounds (the training instances
   * must carry `roundStates`); the mean over steps of that masked loss is added to
   * the final-output loss. Absent: the budget's (off).
   */
  stepSupervision?: boolean;
  rng: Rng;
  onProgress?: (p: TrainProgress) => void;
  /** Called between steps; return true to stop (cancel). */
  shouldStop?: () => boolean;
}

/** Parameters past this magnitude count as an explosion even while the loss is still finite. */
export const PARAMETER_LIMIT = 1e6;

export function train(args: TrainArgs): TrainOutcome {
  const { network, budget, rng, transforms } = args;
  const { steps: totalSteps, batchGraphs, clipNorm, loss: lossKind, validateEvery } = budget;
  const learningRate = args.learningRate ?? budget.learningRate;
  const schedule = args.schedule === undefined ? budget.schedule ?? null : args.schedule;
  const sparsity = args.sparsity ?? budget.sparsity ?? 0;
  const stepSupervision = args.stepSupervision ?? budget.stepSupervision ?? false;
  const metric = args.metric ?? 'mae';
  const order = rng.fork('batch-order');
  const stepRng = rng.fork('step-count');
  // Bit-identical to tf.train.adam(learningRate) with the same clipping, in far fewer kernel launches (./adam.ts).
  const optimizer = new FusedAdam(learningRate);
  const variables = [...network.params.vars.values()];
  // Weight matrices only: a bias has no sparse-structure meaning and penalising it would fight the target's offset.
  const penalised = [...network.params.vars.entries()].filter(([name]) => !isBias(name)).map(([, v]) => v);
  const lossEvery = Math.max(1, Math.floor(totalSteps / 100));
  const lossCurve: number[] = [];
  let windowSum = 0;
  let windowCount = 0;
  let lastFiniteLoss: number | null = null;
  let pool: number[] = [];
  let best = { value: Infinity, step: 0, weights: null as Map<string, Float32Array> | null };
  const rule = network.options.steps;
  const validationNodes = args.validation.reduce((m, inst) => Math.max(m, inst.nodes), 0);
  const validationSteps =
    rule.rule === 'until-stable' ? undefined : Math.min(stepsFor(rule, validationNodes) + rule.trainJitter, rule.cap);
  const outcome: TrainOutcome = { status: 'ok', stepsDone: 0, lossCurve, lossEvery, lastFiniteLoss: null, keptStep: 0, validationCurve: [] };

  const nextBatch = (): TaskInstance[] => {
    const picked: TaskInstance[] = [];
    while (picked.length < Math.min(batchGraphs, args.train.length)) {
      if (pool.length === 0) pool = order.shuffle(args.train.map((_, i) => i));
      picked.push(args.train[pool.pop()!]!);
    }
    return picked;
  };

  try {
    for (let step = 1; step <= totalSteps; step++) {
      if (args.shouldStop?.()) break;
      const picked = nextBatch();
      const batch = makeBatch(picked, transforms);
      const steps = trainingStepsFor(network.options.steps, batch.maxNodes, stepRng);
      if (stepSupervision) batch.stepTargets = stepTargetsFor(picked, steps);
      if (schedule) optimizer.setLearningRate(learningRateAt(learningRate, schedule, step, totalSteps));
      const tensors = uploadBatch(batch);
      let lossValue: number;
      let gradNorm: number;
      try {
        let dataLossValue: number | null = null;
        const result = tf.tidy(() => {
          const { value, grads } = tf.variableGrads(() => {
            const { prediction, trace } = network.forward(tensors, {
              steps,
              stopTolerance: network.options.steps.rule === 'until-stable' ? network.options.steps.tolerance : undefined,
              trace: stepSupervision,
            });
            const dataLoss = maskedLoss(prediction, tensors.target, tensors.mask, lossKind);
            if (sparsity === 0 && !stepSupervision) return dataLoss;
            // Read here: the forward pass's intermediates are gone once variableGrads returns.
            dataLossValue = dataLoss.dataSync()[0]!;
            let total = dataLoss;
            if (stepSupervision) total = tf.add(total, stepwiseLoss(trace, tensors.stepTarget!, tensors.stepMask!, lossKind));
            if (sparsity !== 0) total = tf.add(total, tf.mul(sparsity, tf.addN(penalised.map((v) => tf.sum(tf.abs(v))))));
            return total;
          }, variables);
          // Variables the loss does not reach get no gradient (tfjs leaves them out) and no update.
          const updates = variables.filter((v) => grads[v.name] != null).map((variable) => ({ variable, grad: grads[variable.name]! }));
          const normValue = globalNorm(updates.map((u) => u.grad));
          const scale = Number.isFinite(normValue) && normValue > clipNorm ? clipNorm / normValue : 1;
          // The curve and the divergence guard follow the final-output loss, so arms with and without a penalty
          // or step-wise supervision read alike.
          const loss = dataLossValue ?? value.dataSync()[0]!;
          if (Number.isFinite(normValue) && Number.isFinite(loss)) optimizer.apply(updates, scale);
          return { loss, norm: normValue };
        });
        lossValue = result.loss;
        gradNorm = result.norm;
      } finally {
        tensors.dispose();
      }
      outcome.stepsDone = step;
      if (!Number.isFinite(lossValue) || !Number.isFinite(gradNorm)) {
        outcome.status = 'diverged';
        outcome.divergedAt = step;
        outcome.divergedReason = !Number.isFinite(lossValue) ? `loss became ${lossValue}` : `gradient norm became ${gradNorm}`;
        break;
      }
      lastFiniteLoss = lossValue;
      if (step % 25 === 0 || step === totalSteps) {
        const largest = tf.tidy(() => tf.max(tf.stack(variables.map((v) => tf.max(tf.abs(v))))).dataSync()[0]!);
        if (!(largest < PARAMETER_LIMIT)) {
          outcome.status = 'diverged';
          outcome.divergedAt = step;
          outcome.divergedReason = `a parameter reached ${largest.toExponential(2)} (limit ${PARAMETER_LIMIT.toExponential(0)})`;
          break;
        }
      }
      windowSum += lossValue;
      windowCount++;
      if (windowCount === lossEvery) {
        lossCurve.push(windowSum / windowCount);
        windowSum = 0;
        windowCount = 0;
      }
      args.onProgress?.({ step, totalSteps, loss: lossValue });
      if (validateEvery > 0 && (step % validateEvery === 0 || step === totalSteps)) {
        // Score at the most steps training used: the kept weights must stay right when run for
        // longer than the graph needs, since larger test graphs get more steps.
        const { metrics } = evaluateSet(network, args.validation, transforms, { steps: validationSteps });
        outcome.validationCurve.push({ step, value: metrics[metric], relative: metrics.mre });
        if (metrics[metric] < best.value) {
          best = { value: metrics[metric], step, weights: network.params.snapshot() };
        }
      }
    }
  } finally {
    optimizer.dispose();
  }
  outcome.lastFiniteLoss = lastFiniteLoss;
  outcome.keptStep = outcome.stepsDone;
  if (outcome.status === 'ok' && best.weights && best.step !== outcome.stepsDone) {
    network.params.restore(best.weights);
    outcome.keptStep = best.step;
  }
  return outcome;
}

/** Parameter names end in a leaf; biases are the leaves that start with "b" (b, b2, bzr, bc). */
function isBias(name: string): boolean {
  const leaf = name.slice(name.lastIndexOf('.') + 1);
  return leaf.startsWith('b');
}
