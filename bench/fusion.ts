/**
 * The fused process kernels (src/engine/kernels-process.ts) against the path
 * they replace, in the same process and interleaved round by round, so the
 * ratio shares the machine's load: the reference step (bench/reference.ts)
 * and the default preset's own training step (its first arm, its batch shape
 * and step rule, the training graphs of its first seed). Three paths:
 * - fused: this engine, fused kernels on;
 * - stock: this engine with the fused kernels off, the stock composition of
 *   tfjs kernels, bit-identical to fused (so only time differs);
 * - previous: engine 0.2.0's stock composition (bench/previous-network.ts:
 *   the update's input term inside every step's product), the path that was
 *   there before the fused kernels and the once-per-pass input term; the
 *   targets compare against this one. Its rounding differs in the last bits,
 *   its shapes and step counts do not.
 */
import { initBackend } from '../src/engine/backend.ts';
import { setFusedProcessEnabled } from '../src/engine/kernels-process.ts';
import { armModel, armTraining } from '../src/experiment/spec.ts';
import { makeSeedData } from '../src/experiment/datasets.ts';
import { featureTransforms } from '../src/experiment/run.ts';
import { getTask } from '../src/tasks/registry.ts';
import { readPreset } from '../src/share/read-preset.ts';
import { train } from '../src/train/trainer.ts';
import { Rng } from '../src/util/rng.ts';
import { createReferenceTrainer, currentNetwork, profileStep, referenceInstances, timedTrainer, type NetworkFactory, type ReferenceSize, type ReferenceTrainer } from './reference.ts';
import { PreviousEngineNetwork } from './previous-network.ts';

type Path = 'fused' | 'stock' | 'previous';
const PATHS: readonly Path[] = ['fused', 'stock', 'previous'];
const previousNetwork: NetworkFactory = (...args) => new PreviousEngineNetwork(...args);

export interface FusionWorkload {
  name: 'reference' | 'default-preset';
  description: string;
  /** Training steps per second on each path (all rounds pooled). */
  stepsPerSecond: Record<Path, number>;
  /** fused / previous (the targets' ratio). */
  speedup: number;
  /** fused / stock: what fusing alone gives, same engine and bits. */
  speedupOverStock: number;
  /** Backend kernel launches per training step on each path (tf.profile, custom-gradient wrappers excluded). */
  launches: Record<Path, number>;
  rounds: Record<Path, number[]>;
}

export interface FusionReport {
  workloads: FusionWorkload[];
  note: string;
}

/** A trainer for the target preset's first arm on its first seed's training graphs, shaped like the reference trainer. */
async function presetTrainer(presetPath: string, makeNetwork: NetworkFactory): Promise<{ trainer: ReferenceTrainer; description: string }> {
  await initBackend('wasm');
  const { spec } = await readPreset(presetPath);
  const presetFile = presetPath.slice(presetPath.lastIndexOf('/') + 1);
  const data = makeSeedData(spec, spec.seeds.base);
  const task = getTask(spec.task);
  const model = armModel(spec, 0);
  const transforms = featureTransforms(spec, 0, data.train);
  const training = armTraining(spec, 0);
  const root = new Rng(spec.seeds.base).fork('bench-model');
  const network = makeNetwork(model, task.nodeFeatureNames.length, task.edgeFeatureNames.length, root);
  const budget = { ...spec.budget, steps: 1_000_000, validateEvery: 0 };
  let calls = 0;
  const run = (shouldStop: () => boolean) =>
    train({
      network,
      train: data.train,
      validation: [],
      transforms,
      budget,
      learningRate: training.learningRate,
      // A constant rate: a cosine over a million steps is the same thing, without the bookkeeping.
      schedule: null,
      rng: root.fork(`training:${calls++}`),
      shouldStop,
    });
  const steps = model.steps;
  const description =
    `${presetFile} arm "${spec.arms[0]!.name}": hidden ${model.hidden}, ${spec.budget.batchGraphs} graphs per batch from ` +
    `${spec.train.graphs} ${spec.train.family} graphs of ${spec.train.sizes[0]}–${spec.train.sizes[1]} nodes, ` +
    `message-passing steps: rule ${steps.rule} + 0..${steps.trainJitter}`;
  return {
    description,
    trainer: timedTrainer('wasm', model.aggregator, run, () => network.dispose()),
  };
}

async function measure(
  name: FusionWorkload['name'],
  description: string,
  trainers: { current: ReferenceTrainer; previous: ReferenceTrainer },
  seconds: number,
  rounds: number,
  quick: boolean,
  log: (line: string) => void,
): Promise<FusionWorkload> {
  const select = (path: Path): ReferenceTrainer => {
    setFusedProcessEnabled(path === 'fused');
    return path === 'previous' ? trainers.previous : trainers.current;
  };
  const launches: Record<Path, number> = { fused: 0, stock: 0, previous: 0 };
  for (const path of PATHS) {
    const trainer = select(path);
    trainer.trainSteps(1); // warm-up
    launches[path] = (await profileStep(trainer, quick ? 1 : 3)).launches;
  }
  const pooled: Record<Path, { steps: number; seconds: number }> = { fused: { steps: 0, seconds: 0 }, stock: { steps: 0, seconds: 0 }, previous: { steps: 0, seconds: 0 } };
  const perRound: Record<Path, number[]> = { fused: [], stock: [], previous: [] };
  const window = seconds / rounds;
  for (let round = 0; round < rounds; round++) {
    // Rotate the order so no path always runs first (or right after another).
    const order = PATHS.map((_, i) => PATHS[(i + round) % PATHS.length]!);
    for (const path of order) {
      const { steps, seconds: s } = await select(path).trainFor(window);
      pooled[path].steps += steps;
      pooled[path].seconds += s;
      perRound[path].push(steps / s);
      log(`fusion: ${name} round ${round + 1}/${rounds} ${path}: ${(steps / s).toFixed(2)} steps/s`);
    }
  }
  setFusedProcessEnabled(true);
  const rate = (k: Path) => pooled[k].steps / pooled[k].seconds;
  const stepsPerSecond = { fused: rate('fused'), stock: rate('stock'), previous: rate('previous') };
  return {
    name,
    description,
    stepsPerSecond,
    speedup: stepsPerSecond.fused / stepsPerSecond.previous,
    speedupOverStock: stepsPerSecond.fused / stepsPerSecond.stock,
    launches,
    rounds: perRound,
  };
}

export async function measureFusion(
  presetPath: string,
  size: ReferenceSize,
  seconds: number,
  rounds: number,
  quick: boolean,
  log: (line: string) => void,
): Promise<FusionReport> {
  const workloads: FusionWorkload[] = [];
  try {
    const instances = referenceInstances(size.graphs);
    const reference = {
      current: await createReferenceTrainer('wasm', 'max', instances, size.steps, currentNetwork),
      previous: await createReferenceTrainer('wasm', 'max', instances, size.steps, previousNetwork),
    };
    workloads.push(await measure('reference', `the reference step (max arm, ${size.graphs} graphs, ${size.steps} steps)`, reference, seconds, rounds, quick, log));
    await reference.current.dispose();
    await reference.previous.dispose();
    const preset = { current: await presetTrainer(presetPath, currentNetwork), previous: await presetTrainer(presetPath, previousNetwork) };
    workloads.push(await measure('default-preset', preset.current.description, { current: preset.current.trainer, previous: preset.previous.trainer }, seconds, rounds, quick, log));
    await preset.current.trainer.dispose();
    await preset.previous.trainer.dispose();
  } finally {
    setFusedProcessEnabled(true);
  }
  return {
    workloads,
    note:
      'fused = this engine with the fused process kernels; stock = the same engine with them off, the stock composition of tfjs kernels ' +
      '(Farfield kernels included), bit-identical to fused (test/engine/process-kernel.test.ts); previous = engine 0.2.0\'s stock composition ' +
      '(the update\'s input term inside every step\'s product), the path before the fused kernels and the once-per-pass input term, ' +
      'which the targets compare against (its float32 rounding differs in the last bits; shapes and step counts are the same). ' +
      'Rounds rotate the order of the three paths; all share the SIMD matmul, so a faster matmul speeds up every path.',
  };
}
