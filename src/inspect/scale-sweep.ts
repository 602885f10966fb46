/**
 * Scale probe: every value-carrying input (edge weights, durations, distances:
 * whatever `buildInstance`'s weightScale scales for the task) × λ on fixed
 * graphs, λ from 0.01 to 100; mean prediction and mean truth over counted
 * nodes, plus the MAE. Host-agnostic: no node: imports.
 */
import type { ExperimentSpec } from '../experiment/spec.ts';
import { mean } from '../experiment/statistics.ts';
import type { MessagePassingNetwork } from '../model/network.ts';
import type { FeatureTransforms } from '../train/batch.ts';
import { predict, scorePredictions } from '../train/evaluate.ts';
import { buildInstance } from '../tasks/sample.ts';
import { getTask } from '../tasks/registry.ts';
import { Rng } from '../util/rng.ts';
import type { Probe, ProbePoint } from './probe.ts';

/** 13 log-spaced scales from 0.01 to 100 (λ = 1 included exactly). */
export const DEFAULT_SCALES: readonly number[] = Array.from({ length: 13 }, (_, i) => Number((10 ** (-2 + i / 3)).toPrecision(6)));

export interface ScaleProbeOptions {
  /** Seed of the probe's own graph stream (the run's seed). */
  seed?: number;
  graphs?: number;
  scales?: readonly number[];
}

/**
 * Scale sweep. Fixed graphs (training family and sizes, drawn from the seed's
 * `probe:scale` stream) are rebuilt with `buildInstance(..., { weightScale: λ })`
 * for each λ, so only the values change; the task decides who scales (graph
 * weights or its own draws). Per λ: mean prediction and mean exact target over
 * counted nodes, and the MAE. Training saw λ = 1 only; for homogeneous tasks
 * (shortest path, widest path, earliest finish) the truth grows linearly in λ.
 */
export function scaleProbe(network: MessagePassingNetwork, transforms: FeatureTransforms, spec: ExperimentSpec, options: ScaleProbeOptions = {}): Probe {
  const { seed = spec.seeds.base, graphs = 8, scales = DEFAULT_SCALES } = options;
  const base = new Rng(seed).fork('probe:scale');
  const [lo, hi] = spec.train.sizes;
  const sizes = Array.from({ length: graphs }, (_, i) => base.fork(`size:${i}`).int(lo, hi));
  const task = getTask(spec.task);
  // A task may refuse some scales outright (max-times: reliabilities above 1); those are left out and named.
  const refused = scales.filter((lambda) => task.admitsWeightScale?.(spec.train.weightRange, lambda) === false);
  const points: ProbePoint[] = [];
  for (const lambda of scales.filter((l) => !refused.includes(l))) {
    const instances = sizes.map(
      (n, i) => buildInstance(spec.task, spec.train.family, n, base.fork(i), { weightRange: spec.train.weightRange, weightScale: lambda, params: spec.train.familyParams }).instance,
    );
    const predictions = predict(network, instances, transforms, { chunk: graphs });
    const pred: number[] = [];
    const truth: number[] = [];
    instances.forEach((inst, g) => {
      for (let i = 0; i < inst.nodes; i++) {
        if (!inst.mask[i]) continue;
        pred.push(predictions[g]![i]!);
        truth.push(inst.target[i]!);
      }
    });
    points.push({ x: lambda, predicted: mean(pred), truth: mean(truth), mae: scorePredictions(instances, predictions).mae });
  }
  return {
    kind: 'scale',
    title: 'Scale sweep',
    xLabel: 'scale λ applied to the value-carrying inputs',
    yLabel: 'mean over counted nodes',
    xScale: 'log',
    trainingRange: [1, 1],
    points,
    note:
      `${graphs} fixed ${spec.train.family} graphs of ${lo}–${hi} nodes rebuilt at each λ (task '${task.id}' scales ${task.scaleShift === 'task' ? 'the values it draws itself' : 'the graph weights'}); ` +
      'predicted = mean prediction over counted nodes, truth = mean exact target over the same nodes, mae = mean |prediction − target|. Training saw λ = 1 only.' +
      (refused.length ? ` Left out: λ = ${refused.join(', ')}, which the task refuses at these weights.` : ''),
  };
}
