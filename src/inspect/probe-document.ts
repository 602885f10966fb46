/**
 * Probes: the learned function against exact truth, as curves a plot can draw,
 * each with the range seen in training so the plot can shade it.
 *
 *   scale    every value-carrying input (edge weights, durations, distances:
 *            whatever `buildInstance`'s weightScale scales for the task) × λ on
 *            fixed graphs, λ from 0.01 to 100; mean prediction and mean truth
 *            over counted nodes, plus the MAE.
 *   length   path graphs of growing length with unit weights, source at one
 *            end; prediction and truth at the far end (tasks that accept 'path').
 *   message  a leaf fed by one settled sender, sweeping the edge weight far
 *            past training (tasks whose edge input is a weight:
 *            shortest-path, widest-path). See `messageProbe`.
 *
 * One file per probe (scale-sweep.ts, length-sweep.ts, message-probe.ts; the
 * shared shape in probe.ts). Here, `probeRun` bundles the probes, the
 * algebraic audit (audit.ts) and the alignment trace (trace.ts) for one
 * trained network; `probeDocument` trains the arms in-process (runs from the
 * run planner, `planRuns`) and returns everything as plain JSON (non-finite
 * numbers become null in JSON). Host-agnostic: no node: imports; the caller
 * initialises the tfjs backend.
 */
import type { ExperimentSpec, ModelOptions } from '../experiment/spec.ts';
import { armModel } from '../experiment/spec.ts';
import type { MessagePassingNetwork } from '../model/network.ts';
import type { FeatureTransforms } from '../train/batch.ts';
import type { Metrics } from '../train/metrics.ts';
import type { TrainProgress } from '../train/trainer.ts';
import { getTask } from '../tasks/registry.ts';
import { executeRun, type RunStatus } from '../experiment/run.ts';
import type { SeedData } from '../experiment/datasets.ts';
import { planRuns } from '../experiment/plan.ts';
import { specHash } from '../experiment/results.ts';
import { auditAggregator, auditNetwork, meanAudit, type AuditRow } from './audit.ts';
import { alignmentTrace, traceGraph, type AlignmentTrace } from './trace.ts';
import { meanProbe, type Probe } from './probe.ts';
import { scaleProbe } from './scale-sweep.ts';
import { lengthProbe } from './length-sweep.ts';
import { messageProbe } from './message-probe.ts';

const WHERE = 'inspect/probe-document';

export interface RunProbes {
  arm: string;
  armIndex: number;
  seed: number;
  status: RunStatus;
  reason?: string;
  inDistribution: Metrics | null;
  audit: AuditRow[];
  probes: Probe[];
  trace: AlignmentTrace | null;
}

export interface ProbeRunOptions {
  /** Graphs for the scale probe (default 8); the network audit uses this many validation graphs, at least 8. */
  graphs?: number;
}

/** Probes, audit and trace of one trained network (the network is not disposed). */
export function probeRun(
  spec: ExperimentSpec,
  armIndex: number,
  seed: number,
  network: MessagePassingNetwork,
  transforms: FeatureTransforms,
  data: Pick<SeedData, 'train' | 'validation'>,
  options: ProbeRunOptions = {},
): Omit<RunProbes, 'status' | 'inDistribution' | 'reason'> {
  const { graphs = 8 } = options;
  const model = network.options;
  const task = getTask(spec.task);
  const audit = [
    ...auditAggregator(model.aggregator, model.aggregatorTemperature, { channels: model.hidden, seed }),
    ...auditNetwork(network, transforms, data.validation, { graphs: Math.max(graphs, 8), seed, task: spec.task }),
  ];
  const probes = [
    scaleProbe(network, transforms, spec, { seed, graphs }),
    lengthProbe(network, transforms, spec, { train: data.train }),
    messageProbe(network, transforms, spec, { validation: data.validation }),
  ];
  const trace = task.iterate ? alignmentTrace(network, transforms, traceGraph(spec, seed)) : null;
  return { arm: spec.arms[armIndex]!.name, armIndex, seed, audit, probes, trace };
}

export interface ArmProbes {
  arm: string;
  armIndex: number;
  model: ModelOptions;
  runs: RunProbes[];
  /** Across the seeds that trained: mean audit rows and pointwise mean probes. */
  mean: { seeds: number; audit: AuditRow[]; probes: Probe[] } | null;
}

export interface ProbeDocument {
  kind: 'farfield-probes';
  version: 1;
  spec: ExperimentSpec;
  specHash: string;
  seeds: number[];
  arms: ArmProbes[];
}

export interface ProbeDocumentOptions {
  /** Seeds per arm: the first N of the spec's seed sequence base, base + 1, … (default 1: the first seed). */
  seeds?: number;
  /** Arm names to probe (default: all). */
  arms?: readonly string[];
  graphs?: number;
  onRunStart?: (info: { arm: string; seed: number }) => void;
  onProgress?: (info: { arm: string; seed: number } & TrainProgress) => void;
  shouldStop?: () => boolean;
}

/**
 * Train each selected arm on the first `seeds` seeds in-process (the same
 * `executeRun` as every run: same data, same initial weights), then probe,
 * audit and trace each trained network and dispose it. Synchronous; call with
 * an initialised tfjs backend (a worker in the browser).
 */
export function probeDocument(spec: ExperimentSpec, options: ProbeDocumentOptions = {}): ProbeDocument {
  const { seeds: seedCount = 1, graphs } = options;
  if (!Number.isInteger(seedCount) || seedCount < 1) throw new Error(`${WHERE}: seeds must be a whole number >= 1, got ${String(seedCount)}`);
  const names = spec.arms.map((a) => a.name);
  const wanted = options.arms ?? names;
  for (const name of wanted) {
    if (!names.includes(name)) throw new Error(`${WHERE}: no arm named "${name}"; arms: ${names.join(', ')}`);
  }
  const armIndices = names.flatMap((name, i) => (wanted.includes(name) ? [i] : []));
  // The run planner numbers the runs (seed-major, as `farfield run` does); the
  // first `seedCount` seeds of the spec's sequence, also past its own count.
  const firstSeeds = planRuns({ ...spec, seeds: { ...spec.seeds, count: Math.max(spec.seeds.count, seedCount) } }).filter((run) => run.seedIndex < seedCount);
  const seeds = [...new Set(firstSeeds.map((run) => run.seed))];
  const planned = firstSeeds.filter((run) => armIndices.includes(run.armIndex));
  const dataCache = new Map<number, SeedData>();
  const arms: ArmProbes[] = armIndices.map((armIndex) => ({ arm: names[armIndex]!, armIndex, model: armModel(spec, armIndex), runs: [], mean: null }));
  for (const [i, plan] of planned.entries()) {
    const { arm, armIndex, seed } = plan;
    const entry = arms.find((a) => a.armIndex === armIndex)!;
    options.onRunStart?.({ arm, seed });
    let kept: { network: MessagePassingNetwork; transforms: FeatureTransforms; data: SeedData } | null = null;
    const result = executeRun(spec, plan, {
      dataCache,
      onProgress: options.onProgress ? (p) => options.onProgress!({ arm, seed, ...p }) : undefined,
      shouldStop: options.shouldStop,
      keepNetwork: (network, transforms, data) => (kept = { network, transforms, data }),
    });
    const run: RunProbes = { arm, armIndex, seed, status: result.status, inDistribution: result.inDistribution, audit: [], probes: [], trace: null };
    if (result.reason) run.reason = result.reason;
    const held = kept as { network: MessagePassingNetwork; transforms: FeatureTransforms; data: SeedData } | null;
    if (held) {
      try {
        Object.assign(run, probeRun(spec, armIndex, seed, held.network, held.transforms, held.data, { graphs }));
      } finally {
        held.network.dispose();
      }
    }
    entry.runs.push(run);
    // Seeds share graphs across arms only; free this seed's data after its last run.
    if (planned[i + 1]?.seed !== seed) dataCache.delete(seed);
  }
  for (const entry of arms) {
    const ok = entry.runs.filter((r) => r.status === 'ok' && r.audit.length);
    if (!ok.length) continue;
    const kinds = ok[0]!.probes.map((p) => p.kind);
    entry.mean = {
      seeds: ok.length,
      audit: meanAudit(ok.map((r) => r.audit)),
      probes: kinds.map((kind) => meanProbe(ok.map((r) => r.probes.find((p) => p.kind === kind)!))!).filter(Boolean),
    };
  }
  return { kind: 'farfield-probes', version: 1, spec, specHash: specHash(spec), seeds, arms };
}
