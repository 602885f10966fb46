/**
 * The reference training step, built from the real engine: the
 * MessagePassingNetwork (mlp message and update), hidden 32, T = 16 message-
 * passing steps, one batch of 32 shortest-path graphs of 16 nodes from the
 * `er` family with mean degree 4 (512 nodes, ~2,048 directed message edges,
 * ~4 incoming per node), trained by the real trainer (src/train/trainer.ts:
 * disjoint-union batch built and uploaded every step, the real maskedLoss,
 * global-norm clipping, Adam). Only the aggregator and the backend vary.
 *
 * Timing calls `train()` with a `shouldStop` deadline, so a measured step is
 * exactly what a preset's run spends per step (minus validation). Each call
 * creates and disposes its own Adam optimizer; that costs a few launches per
 * call, not per step, and every variant pays it alike.
 */
import * as tf from '@tensorflow/tfjs-core';
import { initBackend, type BackendName } from '../src/engine/backend.ts';
import { fusedKernelMatmulFlops } from '../src/engine/kernels-process.ts';
import { modelSchema, type AggregatorName } from '../src/experiment/spec.ts';
import { MessagePassingNetwork } from '../src/model/network.ts';
import { buildInstance } from '../src/tasks/sample.ts';
import type { TaskInstance } from '../src/tasks/types.ts';
import { train, type TrainOutcome } from '../src/train/trainer.ts';
import type { FeatureTransforms } from '../src/train/batch.ts';
import { Rng } from '../src/util/rng.ts';

export const REFERENCE = {
  task: 'shortest-path',
  family: 'er',
  meanDegree: 4,
  hidden: 32,
  steps: 16,
  graphs: 32,
  nodesPerGraph: 16,
  learningRate: 1e-3,
  loss: 'huber',
  seed: 7,
} as const;

/** The workload's knobs that `--quick` shrinks (the full reference is 32 graphs, 16 steps). */
export interface ReferenceSize {
  graphs: number;
  steps: number;
}

export const FULL_REFERENCE: ReferenceSize = { graphs: REFERENCE.graphs, steps: REFERENCE.steps };

export interface ReferenceShape {
  hidden: number;
  steps: number;
  graphs: number;
  nodes: number;
  edges: number;
  nodeFeatures: number;
  edgeFeatures: number;
}

/** The fixed batch: graph i from `new Rng(seed).fork('bench').fork(i)`. */
export function referenceInstances(graphs: number = REFERENCE.graphs): TaskInstance[] {
  const base = new Rng(REFERENCE.seed).fork('bench');
  const out: TaskInstance[] = [];
  for (let i = 0; i < graphs; i++) {
    out.push(
      buildInstance(REFERENCE.task, REFERENCE.family, REFERENCE.nodesPerGraph, base.fork(i), { params: { meanDegree: REFERENCE.meanDegree } })
        .instance,
    );
  }
  return out;
}

export function referenceShape(instances: readonly TaskInstance[], steps: number = REFERENCE.steps): ReferenceShape {
  const first = instances[0]!;
  return {
    hidden: REFERENCE.hidden,
    steps,
    graphs: instances.length,
    nodes: instances.reduce((s, t) => s + t.nodes, 0),
    edges: instances.reduce((s, t) => s + t.messageSrc.length, 0),
    nodeFeatures: first.nodeInputs[0]?.length ?? 0,
    edgeFeatures: first.edgeInputs[0]?.length ?? 0,
  };
}

/**
 * Matmul FLOPs of one reference training step, counted analytically.
 *
 * A product of an M x K by a K x N matrix costs 2·M·K·N FLOPs (a multiply and
 * an add per term). Backward, each product needs dA = dY·Bᵀ and dB = Aᵀ·dY, each
 * as costly as the forward product, so backward = 2 x forward. (tfjs computes
 * dA even where A is input data, for the encoder x·W_enc and the edge term
 * ê·W_e: the matmul shapes recorded by tf.profile sum to exactly 3 x forward.)
 * With N nodes, E message edges, H hidden, F_n / F_e input features, T steps:
 *
 *   encode        N x F_n · F_n x H     2·N·F_n·H
 *   edge term     E x F_e · F_e x H     2·E·F_e·H
 *   input term    N x H · H x H         2·N·H²      (x̂·W_x, once per forward pass)
 *   per step  t:  h·[W_s|W_d]           N x H · H x 2H     4·N·H²
 *                 message.w2            E x H · H x H      2·E·H²
 *                 update [h,a]·W        N x 2H · 2H x H    4·N·H²
 *                 update.w2             N x H · H x H      2·N·H²
 *   decode        N x H · H x 1         2·N·H
 *
 *   forward  F = 2·N·F_n·H + 2·E·F_e·H + 2·N·H² + T·(10·N·H² + 2·E·H²) + 2·N·H
 *   training step = F + 2·F = 3·F
 *
 * Elementwise work (activations, gathers, segment reductions, loss, clipping,
 * Adam) is not counted: it is O(N·H + E·H) per step, two orders below.
 */
export function referenceFlops(s: ReferenceShape): { forward: number; training: number } {
  const { nodes: N, edges: E, hidden: H, nodeFeatures: Fn, edgeFeatures: Fe, steps: T } = s;
  const forward = 2 * N * Fn * H + 2 * E * Fe * H + 2 * N * H * H + T * (10 * N * H * H + 2 * E * H * H) + 2 * N * H;
  return { forward, training: 3 * forward };
}

const TRANSFORMS: FeatureTransforms = { node: ['identity'], edge: ['identity'], nodeStats: [], edgeStats: [] };

export interface ReferenceTrainer {
  backend: BackendName;
  aggregator: AggregatorName;
  /** Train until `seconds` have passed (at least `minSteps` steps); returns steps done and seconds taken. */
  trainFor(seconds: number, minSteps?: number): Promise<{ steps: number; seconds: number; outcome: TrainOutcome }>;
  /** Exactly `steps` training steps (synchronous; the backend must already be active). */
  trainSteps(steps: number): TrainOutcome;
  dispose(): Promise<void>;
}

/**
 * A reference trainer with its own network (variables live on the backend
 * active at creation, so each backend gets its own trainer).
 */
/** How a trainer builds its network: this engine's by default; the fusion bench passes engine 0.2.0's composition too. */
export type NetworkFactory = (...args: ConstructorParameters<typeof MessagePassingNetwork>) => MessagePassingNetwork;

export const currentNetwork: NetworkFactory = (...args) => new MessagePassingNetwork(...args);

export async function createReferenceTrainer(
  backend: BackendName,
  aggregator: AggregatorName,
  instances: readonly TaskInstance[],
  steps: number = REFERENCE.steps,
  makeNetwork: NetworkFactory = currentNetwork,
): Promise<ReferenceTrainer> {
  await initBackend(backend);
  const model = modelSchema.parse({
    hidden: REFERENCE.hidden,
    aggregator,
    steps: { rule: 'fixed', count: steps, trainJitter: 0 },
  });
  const first = instances[0]!;
  const root = new Rng(REFERENCE.seed).fork('model');
  let network = makeNetwork(model, first.nodeInputs[0]!.length, first.edgeInputs[0]!.length, root);
  let calls = 0;
  const budget = {
    steps: 100_000,
    batchGraphs: instances.length,
    learningRate: REFERENCE.learningRate,
    clipNorm: 1,
    loss: REFERENCE.loss,
    validateEvery: 0,
  } as const;
  const run = (shouldStop: () => boolean): TrainOutcome => {
    const outcome = train({
      network,
      train: instances,
      validation: [],
      transforms: TRANSFORMS,
      budget,
      rng: root.fork(`training:${calls++}`),
      shouldStop,
    });
    if (outcome.status === 'diverged') {
      // Should not happen at this learning rate; start again from fresh weights so timing goes on.
      network.dispose();
      network = makeNetwork(model, first.nodeInputs[0]!.length, first.edgeInputs[0]!.length, root.fork(`restart:${calls}`));
    }
    return outcome;
  };
  return timedTrainer(backend, aggregator, run, () => network.dispose());
}

/**
 * A ReferenceTrainer around one `run(shouldStop)` of the real trainer: timed
 * windows and fixed step counts both go through `shouldStop`, so what is
 * measured is exactly a preset's per-step work (the fusion bench wraps its
 * preset-shaped trainer the same way).
 */
export function timedTrainer(
  backend: BackendName,
  aggregator: AggregatorName,
  run: (shouldStop: () => boolean) => TrainOutcome,
  release: () => void,
): ReferenceTrainer {
  return {
    backend,
    aggregator,
    async trainFor(seconds, minSteps = 1) {
      await initBackend(backend);
      const t0 = performance.now();
      const deadline = t0 + seconds * 1000;
      let done = 0;
      const outcome = run(() => done++ >= minSteps && performance.now() >= deadline);
      return { steps: outcome.stepsDone, seconds: (performance.now() - t0) / 1000, outcome };
    },
    trainSteps(steps) {
      let done = 0;
      return run(() => done++ >= steps);
    },
    async dispose() {
      await initBackend(backend);
      release();
    },
  };
}

/** The count in one line, for the JSON document. */
export const FLOP_FORMULA =
  'matmul M x K by K x N = 2·M·K·N FLOPs; backward = 2 x forward (dA = dY·Bᵀ and dB = Aᵀ·dY); ' +
  'forward = 2·N·F_n·H + 2·E·F_e·H + 2·N·H² + T·(10·N·H² + 2·E·H²) + 2·N·H; training step = 3 x forward';

export interface KernelStat {
  name: string;
  /** Launches per training step. */
  count: number;
  /** Milliseconds per training step inside this kernel (as timed by tf.profile, which adds its own overhead). */
  ms: number;
}

export type KernelCategory = 'matmul' | 'fused' | 'graph' | 'copies' | 'elementwise';

/** Which part of a step a kernel belongs to. */
export function kernelCategory(name: string): KernelCategory {
  if (name === 'BatchMatMul' || name === '_FusedMatMul') return 'matmul';
  // The whole message-passing loop, forward and backward (src/engine/kernels-process.ts); mostly matmuls inside.
  if (name === 'FarfieldProcess' || name === 'FarfieldProcessGrad') return 'fused';
  if (name.startsWith('Farfield')) return 'graph';
  // The tape saves every input it needs for backprop with an Identity; reshapes and casts move no math.
  if (name === 'Identity' || name === 'Reshape' || name === 'Cast' || name === 'ZerosLike') return 'copies';
  return 'elementwise';
}

export interface StepProfile {
  /** Backend kernel launches per steady-state training step. */
  launches: number;
  /** tf.profile also lists custom-gradient wrappers (names ending "__op") that launch nothing themselves; per step. */
  wrapperRecords: number;
  /** Matmul FLOPs per step from the launched kernels' shapes (cross-check of the analytic count). */
  matmulFlops: number;
  /** Sum of per-kernel times per step under tf.profile. */
  kernelMs: number;
  /** Wall milliseconds per step while profiling (profiling itself adds overhead). */
  wallMs: number;
  categories: Record<KernelCategory, { launches: number; ms: number }>;
  top: KernelStat[];
  /** Matmul kernels grouped by operand shapes, slowest first (which products hold a step back). */
  matmuls: MatmulStat[];
}

export interface MatmulStat {
  /** Kernel name, operand shapes as recorded (transpose flags are not) and output shape, e.g. "BatchMatMul [1,2048,32] · [1,2048,32] -> [1,32,32]". */
  shapes: string;
  /** Launches and milliseconds per step. */
  count: number;
  ms: number;
  /** Achieved GFLOP/s of these launches. */
  gflops: number;
}

function matmulFlopsOf(k: { name: string; inputShapes: number[][]; outputShapes: number[][] }): number {
  if (kernelCategory(k.name) !== 'matmul') return 0;
  const a = k.inputShapes[0];
  const out = k.outputShapes[0];
  if (!a || !out || out.length < 2) return 0;
  const size = (s: number[]) => s.reduce((p, d) => p * d, 1);
  const M = out[out.length - 2]!;
  const batch = size(out) / (M * out[out.length - 1]!);
  const K = size(a) / (batch * M);
  return 2 * size(out) * K;
}

// Custom-gradient nodes launch nothing themselves: ops wrapped by tfjs end in "__op"; the fused process
// kernels' custom-gradient node (src/engine/kernels-process.ts) is recorded as "forward".
const isWrapper = (name: string) => name.endsWith('__op') || name === 'forward';

/**
 * Profile one steady-state step: profile `1 + k` steps and 1 step (each a
 * fresh trainer call, so both include the optimizer set-up and the final
 * parameter check) and divide the difference by k.
 */
export async function profileStep(trainer: ReferenceTrainer, k = 3): Promise<StepProfile> {
  await initBackend(trainer.backend);
  const summarise = async (steps: number) => {
    const t0 = performance.now();
    const fusedBefore = fusedKernelMatmulFlops();
    const info = await tf.profile(() => {
      trainer.trainSteps(steps);
    });
    const wall = performance.now() - t0;
    // Products inside the fused process kernels are not separate launches; the kernels count them.
    let flops = fusedKernelMatmulFlops() - fusedBefore;
    const byName = new Map<string, { count: number; ms: number }>();
    const byShape = new Map<string, { count: number; ms: number; flops: number }>();
    for (const kernel of info.kernels) {
      const ms = typeof kernel.kernelTimeMs === 'number' ? kernel.kernelTimeMs : 0;
      const entry = byName.get(kernel.name) ?? { count: 0, ms: 0 };
      entry.count++;
      entry.ms += ms;
      byName.set(kernel.name, entry);
      const f = matmulFlopsOf(kernel);
      flops += f;
      if (f > 0) {
        const key = `${kernel.name} ${kernel.inputShapes.slice(0, 2).map((s) => `[${s.join(',')}]`).join(' · ')} -> [${kernel.outputShapes[0]!.join(',')}]`;
        const e = byShape.get(key) ?? { count: 0, ms: 0, flops: 0 };
        e.count++;
        e.ms += ms;
        e.flops += f;
        byShape.set(key, e);
      }
    }
    return { flops, byName, byShape, wall };
  };
  const one = await summarise(1);
  const many = await summarise(1 + k);
  const top: KernelStat[] = [];
  const categories: StepProfile['categories'] = {
    matmul: { launches: 0, ms: 0 },
    fused: { launches: 0, ms: 0 },
    graph: { launches: 0, ms: 0 },
    copies: { launches: 0, ms: 0 },
    elementwise: { launches: 0, ms: 0 },
  };
  let launches = 0;
  let wrapperRecords = 0;
  let kernelMs = 0;
  for (const [name, e] of many.byName) {
    const base = one.byName.get(name) ?? { count: 0, ms: 0 };
    const count = (e.count - base.count) / k;
    const ms = Math.max(0, (e.ms - base.ms) / k);
    if (count <= 0) continue;
    if (isWrapper(name)) {
      // Its time includes the kernel it wraps; counting it would count that twice.
      wrapperRecords += count;
      continue;
    }
    launches += count;
    kernelMs += ms;
    const c = categories[kernelCategory(name)];
    c.launches += count;
    c.ms += ms;
    top.push({ name, count, ms });
  }
  top.sort((a, b) => b.ms - a.ms);
  // Shapes from the longer profile alone (every steady step repeats them); per step = total / (1 + k).
  const matmuls: MatmulStat[] = [...many.byShape]
    .map(([shapes, e]) => ({ shapes, count: e.count / (1 + k), ms: e.ms / (1 + k), gflops: e.ms > 0 ? e.flops / (e.ms * 1e6) : NaN }))
    .sort((a, b) => b.ms - a.ms);
  return {
    launches,
    wrapperRecords,
    matmulFlops: (many.flops - one.flops) / k,
    kernelMs,
    wallMs: Math.max(0, (many.wall - one.wall) / k),
    categories,
    top: top.slice(0, 8),
    matmuls: matmuls.slice(0, 6),
  };
}
