/**
 * Length probe: path graphs of growing length with unit weights, source at one
 * end; prediction and truth at the far end (tasks that accept 'path').
 * Host-agnostic: no node: imports.
 */
import type { ExperimentSpec } from '../experiment/spec.ts';
import type { MessagePassingNetwork } from '../model/network.ts';
import type { FeatureTransforms } from '../train/batch.ts';
import { predict } from '../train/evaluate.ts';
import { buildInstance } from '../tasks/sample.ts';
import { getTask } from '../tasks/registry.ts';
import type { TaskInstance } from '../tasks/types.ts';
import { Rng } from '../util/rng.ts';
import type { Probe } from './probe.ts';

export const DEFAULT_LENGTHS: readonly number[] = [4, 6, 8, 12, 16, 24, 32, 48, 64];

export interface LengthProbeOptions {
  lengths?: readonly number[];
  /** Training instances: their `depth` (rounds the exact algorithm needs) gives the trained hop range. */
  train?: readonly TaskInstance[];
}

/** Breadth-first hop counts from `source` over the instance's message edges (Infinity when unreachable). */
function hopsFrom(inst: TaskInstance, source: number): number[] {
  const hops = new Array<number>(inst.nodes).fill(Infinity);
  const out: number[][] = Array.from({ length: inst.nodes }, () => []);
  inst.messageSrc.forEach((u, e) => out[u]!.push(inst.messageDst[e]!));
  hops[source] = 0;
  let frontier = [source];
  while (frontier.length) {
    const next: number[] = [];
    for (const u of frontier) for (const v of out[u]!) if (hops[v] === Infinity) (hops[v] = hops[u]! + 1), next.push(v);
    frontier = next;
  }
  return hops;
}

/**
 * Length sweep. Path graphs 0-1-…-(n−1) with unit weights (weightRange [1, 1])
 * and the source fixed at node 0; the point is the node farthest from the
 * source (by hops, counted nodes only): prediction vs exact target there. x is
 * that hop distance (n − 1); the trained range is the span of `depth` (rounds
 * the exact algorithm needs) over the training graphs, which is what "size"
 * really shifted. The network gets its own step rule for each path length.
 */
export function lengthProbe(network: MessagePassingNetwork, transforms: FeatureTransforms, spec: ExperimentSpec, options: LengthProbeOptions = {}): Probe {
  const { lengths = DEFAULT_LENGTHS, train } = options;
  const task = getTask(spec.task);
  let trainingRange: [number, number];
  let rangeNote: string;
  if (train && train.length) {
    const depths = train.map((t) => t.depth);
    trainingRange = [Math.min(...depths), Math.max(...depths)];
    rangeNote = `trained range = min..max depth (rounds the exact algorithm needs) over the ${train.length} training graphs`;
  } else {
    trainingRange = [1, Math.max(1, spec.train.sizes[1] - 1)];
    rangeNote = 'trained range = the largest hop depth a training graph could have (n_max − 1); training graphs not given';
  }
  const probe: Probe = {
    kind: 'length',
    title: 'Length sweep (path graphs)',
    xLabel: 'hops from the source to the far end (path of hops + 1 nodes)',
    yLabel: 'value at the far end',
    xScale: 'linear',
    trainingRange,
    points: [],
    note: `path graphs with unit weights, source at node 0; predicted and exact target at the counted node farthest from the source; ${rangeNote}.`,
  };
  if (!task.families.includes('path')) {
    probe.unavailable = `task '${task.id}' does not accept the 'path' family (allowed: ${task.families.join(', ')})`;
    return probe;
  }
  const rng = new Rng(spec.seeds.base).fork('probe:length');
  for (const n of lengths) {
    const { instance } = buildInstance(spec.task, 'path', n, rng.fork(n), { weightRange: [1, 1], source: 0 });
    const source = instance.source ?? 0;
    const hops = hopsFrom(instance, source);
    let far = -1;
    for (let i = 0; i < instance.nodes; i++) {
      if (!instance.mask[i] || !Number.isFinite(hops[i]!)) continue;
      if (far < 0 || hops[i]! >= hops[far]!) far = i;
    }
    if (far < 0) continue;
    const [prediction] = predict(network, [instance], transforms);
    const predicted = prediction![far]!;
    const truth = instance.target[far]!;
    probe.points.push({ x: hops[far]!, predicted, truth, mae: Math.abs(predicted - truth) });
  }
  return probe;
}
