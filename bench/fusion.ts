/**
 * The fused process kernels (src/engine/kernels-process.ts) against the path
 * they replace, in the same process and interleaved round by round, so the
 * ratio shares the machine's load: the reference step (bench/reference.ts)
 * and the default preset's own training step (its first arm, its batch shape
 * and step rule, the training graphs of its first seed). Both paths give the
 * same bits, so they train identically and only the time differs.
 */
import { initBackend } from '../src/engine/backend.ts';
import { setFusedProcessEnabled } from '../src/engine/kernels-process.ts';
import { armModel, armTraining } from '../src/experiment/spec.ts';
import { makeSeedData } from '../src/experiment/datasets.ts';
import { featureTransforms } from '../src/experiment/run.ts';
import { getTask } from '../src/tasks/registry.ts';
import { MessagePassingNetwork } from '../src/model/network.ts';
import { readPreset } from '../src/share/read-preset.ts';
import { train } from '../src/train/trainer.ts';
import { Rng } from '../src/util/rng.ts';
import { createReferenceTrainer, profileStep, referenceInstances, timedTrainer, type ReferenceSize, type ReferenceTrainer } from './reference.ts';

export interface FusionWorkload {
  name: 'reference' | 'default-preset';
  description: string;
  /** Training steps per second on each path (all rounds pooled). */
  stepsPerSecond: { fused: number; previous: number };
  /** fused / previous. */
  speedup: number;
  /** Backend kernel launches per training step on each path (tf.profile, custom-gradient wrappers excluded). */
  launches: { fused: number; previous: number };
  rounds: { fused: number[]; previous: number[] };
}

export interface FusionReport {
  workloads: FusionWorkload[];
  note: string;
}

/** A trainer for the target preset's first arm on its first seed's training graphs, shaped like the reference trainer. */
async function presetTrainer(presetPath: string): Promise<{ trainer: ReferenceTrainer; description: string }> {
  await initBackend('wasm');
  const { spec } = await readPreset(presetPath);
  const presetFile = presetPath.slice(presetPath.lastIndexOf('/') + 1);
  const data = makeSeedData(spec, spec.seeds.base);
  const task = getTask(spec.task);
  const model = armModel(spec, 0);
  const transforms = featureTransforms(spec, 0, data.train);
  const training = armTraining(spec, 0);
  const root = new Rng(spec.seeds.base).fork('bench-model');
  const network = new MessagePassingNetwork(model, task.nodeFeatureNames.length, task.edgeFeatureNames.length, root);
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
  trainer: ReferenceTrainer,
  seconds: number,
  rounds: number,
  quick: boolean,
  log: (line: string) => void,
): Promise<FusionWorkload> {
  const paths = [true, false] as const;
  const launches = { fused: 0, previous: 0 };
  for (const fused of paths) {
    setFusedProcessEnabled(fused);
    trainer.trainSteps(1); // warm-up
    launches[fused ? 'fused' : 'previous'] = (await profileStep(trainer, quick ? 1 : 3)).launches;
  }
  const pooled = { fused: { steps: 0, seconds: 0 }, previous: { steps: 0, seconds: 0 } };
  const perRound = { fused: [] as number[], previous: [] as number[] };
  const window = seconds / rounds;
  for (let round = 0; round < rounds; round++) {
    for (const fused of round % 2 === 0 ? paths : [...paths].reverse()) {
      setFusedProcessEnabled(fused);
      const key = fused ? 'fused' : 'previous';
      const { steps, seconds: s } = await trainer.trainFor(window);
      pooled[key].steps += steps;
      pooled[key].seconds += s;
      perRound[key].push(steps / s);
      log(`fusion: ${name} round ${round + 1}/${rounds} ${key}: ${(steps / s).toFixed(2)} steps/s`);
    }
  }
  setFusedProcessEnabled(true);
  const rate = (k: 'fused' | 'previous') => pooled[k].steps / pooled[k].seconds;
  return {
    name,
    description,
    stepsPerSecond: { fused: rate('fused'), previous: rate('previous') },
    speedup: rate('fused') / rate('previous'),
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
    const reference = await createReferenceTrainer('wasm', 'max', referenceInstances(size.graphs), size.steps);
    workloads.push(await measure('reference', `the reference step (max arm, ${size.graphs} graphs, ${size.steps} steps)`, reference, seconds, rounds, quick, log));
    await reference.dispose();
    const preset = await presetTrainer(presetPath);
    workloads.push(await measure('default-preset', preset.description, preset.trainer, seconds, rounds, quick, log));
    await preset.trainer.dispose();
  } finally {
    setFusedProcessEnabled(true);
  }
  return {
    workloads,
    note:
      'previous = the stock composition of tfjs kernels (Farfield kernels included) that the fused process kernels replace; ' +
      'both paths give bit-identical results (test/engine/process-kernel.test.ts), so they train the same network and only time differs. ' +
      'Rounds alternate the order of the two paths.',
  };
}
