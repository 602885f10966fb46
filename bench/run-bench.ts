/**
 * `farfield bench`: every performance number of issue 9 measured in one run,
 * so ratios are taken under the same machine load. Order: the in-process work
 * first (reference steps on WASM and CPU interleaved in rounds with the matmul
 * ceiling, kernel profile, long-run leak check), then worker scaling through
 * the CLI pool, then the shipped presets as child processes.
 */
import os from 'node:os';
import { fileURLToPath } from 'node:url';
import * as tf from '@tensorflow/tfjs-core';
import { initBackend, type BackendName } from '../src/engine/backend.ts';
import { longRun } from './long-run.ts';
import { geometricMean, gflops, loadAverage, matmulSample, type MatmulSample } from './measure.ts';
import { choosePresets, TARGET_PRESET, timePreset, type PresetTiming } from './presets.ts';
import {
  createReferenceTrainer,
  FLOP_FORMULA,
  FULL_REFERENCE,
  profileStep,
  REFERENCE,
  referenceFlops,
  referenceInstances,
  referenceShape,
  type ReferenceSize,
  type ReferenceTrainer,
  type StepProfile,
} from './reference.ts';
import { timePresetInBrowser, type BrowserTiming } from './browser.ts';
import { evaluateTargets, type BenchDocument, type PerAggregator } from './report.ts';
import { measureWorkers, presetScaling, type PresetScaling, type WorkersReport } from './workers.ts';
import { measureFusion, type FusionReport } from './fusion.ts';

export interface BenchOptions {
  quick: boolean;
  /** Preset names (comma list) or undefined for all; ignored when skipPresets. */
  presets?: string;
  skipPresets: boolean;
  /** Also time the target preset in headless Chromium (after the CLI presets). */
  browser: boolean;
  longSteps: number;
  /** Reference timing per variant, seconds (split over the rounds). */
  seconds: number;
  rounds: number;
  workers: number;
  workerTrainingSteps: number;
  workerRepeats: 1 | 2;
  /** Time the target preset again on one worker, right after its all-core run (worker scaling on the real workload). */
  presetScaling: boolean;
  presetTimeoutSeconds: number;
  /** Aborting stops the preset being timed and skips the rest; the document is still returned. */
  stopPresets?: AbortSignal;
  /** Told when each phase starts. */
  onPhase?: (phase: 'reference' | 'fusion' | 'long-run' | 'workers' | 'presets' | 'browser') => void;
}

export function defaultOptions(quick: boolean): BenchOptions {
  return {
    quick,
    skipPresets: quick,
    browser: !quick,
    longSteps: quick ? 200 : 2000,
    seconds: quick ? 0.5 : 9,
    rounds: quick ? 1 : 3,
    workers: Math.max(1, os.cpus().length),
    workerTrainingSteps: quick ? 5 : 100,
    workerRepeats: quick ? 1 : 2,
    presetScaling: !quick,
    presetTimeoutSeconds: 1800,
  };
}

/** --quick shrinks the reference batch so one plain-JS CPU step stays short. */
const QUICK_REFERENCE: ReferenceSize = { graphs: 8, steps: 4 };

const AGGREGATORS = ['sum', 'max'] as const;

interface Variant {
  backend: BackendName;
  aggregator: (typeof AGGREGATORS)[number];
  trainer: ReferenceTrainer;
  steps: number;
  seconds: number;
  rounds: number[];
}

/**
 * What holds the step back, from the profile: engine bookkeeping (wall minus
 * kernel bodies) against the kernel kinds, and the matmuls' achieved rate.
 */
function limitText(launches: number, stepMs: number, profile: StepProfile, matmulFlops: number, ceiling: number): string {
  const perLaunch = (stepMs * 1000) / launches;
  const wall = Math.max(profile.wallMs, profile.kernelMs);
  const bookkeeping = wall - profile.kernelMs;
  const pct = (ms: number) => `${Math.round((100 * ms) / wall)}%`;
  const c = profile.categories;
  // The fused kernels' products are counted in matmulFlops, so their time counts here too (it is mostly matmul).
  const matmulRate = c.matmul.ms + c.fused.ms > 0 ? matmulFlops / ((c.matmul.ms + c.fused.ms) * 1e6) : NaN;
  const kinds: Array<[string, number]> = [
    ['engine bookkeeping (tape, tidy, dispatch; outside kernel bodies)', bookkeeping],
    [
      `fused process kernels (${Math.round(c.fused.launches)} launches: every message-passing step forward and backward, mostly matmuls at the rate of 128-bit SIMD without fused multiply-add)`,
      c.fused.ms,
    ],
    [`matmul kernels (${Math.round(c.matmul.launches)} launches at ${matmulRate.toFixed(1)} GFLOP/s, ${Math.round((100 * matmulRate) / ceiling)}% of the 256³ rate)`, c.matmul.ms],
    [`elementwise and reduction kernels (${Math.round(c.elementwise.launches)} launches)`, c.elementwise.ms],
    [`graph kernels (${Math.round(c.graph.launches)} launches)`, c.graph.ms],
    [`tape copies and reshapes (${Math.round(c.copies.launches)} launches)`, c.copies.ms],
  ];
  kinds.sort((a, b) => b[1] - a[1]);
  // Matmuls near the 256³ rate are doing useful work at full speed: then the limit is everything else.
  const matmulAtCeiling = matmulRate >= 0.9 * ceiling;
  const top = kinds.find(([what]) => !(matmulAtCeiling && what.startsWith('matmul')))![0];
  const headline = top.startsWith('engine')
    ? matmulAtCeiling
      ? 'per-op overhead (the matmuls already run at the 256³ rate)'
      : 'per-op overhead'
    : top.startsWith('fused')
      ? 'the fused process kernels, that is their matmuls: 128-bit WASM SIMD without fused multiply-add issues about 8 FLOP per cycle and these small products reach most of it'
      : top.startsWith('matmul')
      ? 'matmul kernels running below the 256³ rate (small, gradient-shaped products)'
      : top.replace(/ \(.*$/, '');
  return (
    `${headline}: ${Math.round(launches)} launches per step, ${perLaunch.toFixed(1)} µs each on average. ` +
    `Profiled step: ${kinds.map(([what, ms]) => `${what} ${pct(ms)}`).join('; ')}.`
  );
}

export async function runBench(options: BenchOptions, log: (line: string) => void): Promise<BenchDocument> {
  const started = performance.now();
  const loadStart = loadAverage();
  // Both backends up before counting tensors, so start-up state is not counted as work.
  await initBackend('cpu');
  const { backend, threads } = await initBackend('wasm');
  const tensorsBefore = tf.memory().numTensors;

  // ---- reference steps, matmul ceiling, profile ----
  options.onPhase?.('reference');
  const size = options.quick ? QUICK_REFERENCE : FULL_REFERENCE;
  const instances = referenceInstances(size.graphs);
  const shape = referenceShape(instances, size.steps);
  const variants: Variant[] = [];
  const profiles = new Map<string, StepProfile>();
  for (const b of ['wasm', 'cpu'] as const) {
    for (const a of AGGREGATORS) {
      log(`reference: setting up ${b} ${a}`);
      const trainer = await createReferenceTrainer(b, a, instances, size.steps);
      trainer.trainSteps(1); // warm-up: first-use compilation and allocation
      if (b === 'wasm') profiles.set(a, await profileStep(trainer, options.quick ? 1 : 3));
      variants.push({ backend: b, aggregator: a, trainer, steps: 0, seconds: 0, rounds: [] });
    }
  }
  const ceiling: MatmulSample[] = [];
  const loadRef0 = loadAverage()[0];
  const window = options.seconds / options.rounds;
  for (let round = 0; round < options.rounds; round++) {
    // Mirror the order every other round so drift in the machine's load hits all variants alike.
    const order = round % 2 === 0 ? variants : [...variants].reverse();
    for (const v of order) {
      const { steps, seconds } = await v.trainer.trainFor(window);
      v.steps += steps;
      v.seconds += seconds;
      v.rounds.push(steps / seconds);
      log(`reference: round ${round + 1}/${options.rounds} ${v.backend} ${v.aggregator}: ${(steps / seconds).toFixed(2)} steps/s`);
    }
    await initBackend('wasm');
    ceiling.push(matmulSample(256, Math.max(200, window * 1000)));
  }
  const loadRef1 = loadAverage()[0];
  for (const v of variants) await v.trainer.dispose();
  await initBackend('wasm');
  const rate = (b: BackendName): PerAggregator => {
    const get = (a: string) => {
      const v = variants.find((x) => x.backend === b && x.aggregator === a)!;
      return v.steps / v.seconds;
    };
    return { sum: get('sum'), max: get('max') };
  };
  const timed = (b: BackendName): PerAggregator => {
    const get = (a: string) => variants.find((x) => x.backend === b && x.aggregator === a)!.steps;
    return { sum: get('sum'), max: get('max') };
  };
  const perRound = (b: BackendName) => {
    const get = (a: string) => variants.find((x) => x.backend === b && x.aggregator === a)!.rounds;
    return { sum: get('sum'), max: get('max') };
  };
  const wasm = rate('wasm');
  const cpu = rate('cpu');
  const wasmMean = geometricMean([wasm.sum, wasm.max]);
  const wasmOverCpu = wasmMean / geometricMean([cpu.sum, cpu.max]);

  const flopsPerStep = referenceFlops(shape).training;
  const matmulCeiling = gflops(ceiling);
  const effectiveGflops = (flopsPerStep * wasmMean) / 1e9;
  const sumProfile = profiles.get('sum')!;
  const maxProfile = profiles.get('max')!;
  const launches = (sumProfile.launches + maxProfile.launches) / 2;
  const stepMs = 1000 / wasmMean;
  const matmulMs = (flopsPerStep / (matmulCeiling * 1e9)) * 1000;
  const matmulProfiledMs = maxProfile.categories.matmul.ms + maxProfile.categories.fused.ms;

  // ---- fused kernels against the previous path ----
  options.onPhase?.('fusion');
  const fusion: FusionReport = await measureFusion(fileURLToPath(new URL(`../presets/${TARGET_PRESET}`, import.meta.url)), size, options.seconds, options.rounds, options.quick, log);
  await initBackend('wasm');

  // ---- long run ----
  options.onPhase?.('long-run');
  log(`tensors: long run of ${options.longSteps} training steps`);
  const long = await longRun(options.longSteps);
  await initBackend('wasm');
  const tensorsAfter = tf.memory().numTensors;

  // ---- workers ----
  options.onPhase?.('workers');
  let workers: WorkersReport | null = null;
  if (options.workers > 1) {
    log(`workers: 1 vs ${options.workers} worker(s) on the same ${options.workerTrainingSteps}-step runs`);
    workers = await measureWorkers(options.workers, options.workerTrainingSteps, options.workerRepeats, log);
  } else {
    log('workers: one core, nothing to compare');
  }

  // ---- presets ----
  options.onPhase?.('presets');
  const presets: PresetTiming[] = [];
  let scaling: PresetScaling | null = null;
  let presetsNote: string;
  if (options.skipPresets) {
    presetsNote = options.quick ? 'presets skipped (--quick)' : 'presets skipped (--skip-presets)';
  } else {
    const files = choosePresets(options.presets);
    const skipped: string[] = [];
    for (const file of files) {
      if (options.stopPresets?.aborted) {
        skipped.push(file);
        continue;
      }
      log(`presets: ${file} ...`);
      const timing = await timePreset(file, options.presetTimeoutSeconds, options.stopPresets);
      log(`presets: ${file} ${timing.wall.toFixed(1)} s${timing.error ? ` (${timing.error})` : ''}`);
      presets.push(timing);
      if (file === TARGET_PRESET && options.presetScaling && os.cpus().length > 1 && !timing.error && !options.stopPresets?.aborted) {
        log(`presets: ${file} again on 1 worker (worker scaling on the real workload) ...`);
        const one = await timePreset(file, options.presetTimeoutSeconds, options.stopPresets, 1);
        scaling = presetScaling(timing, one, os.cpus().length);
        log(`presets: ${file} on 1 worker ${one.wall.toFixed(1)} s -> speedup ${scaling.speedup.toFixed(2)}x${one.error ? ` (${one.error})` : ''}`);
      }
    }
    presetsNote =
      (skipped.length ? `interrupted: not run ${skipped.join(', ')}. ` : '') +
      'wall = spawn to exit of `node bin/farfield.mjs run <preset> --json --quiet` (one worker per core, the preset\'s own seeds); ' +
      'peakWorkerRssMB = largest per-worker peak of V8 heap + external memory (the tfjs WASM heap), sampled at every message a worker posts; ' +
      'peakProcessRssMB = peak RSS of the whole child process (getrusage). Threads share one process, so RSS itself cannot be split per worker.';
  }

  // ---- browser ----
  let browser: BrowserTiming | null = null;
  if (options.browser && !options.stopPresets?.aborted) {
    options.onPhase?.('browser');
    browser = await timePresetInBrowser(TARGET_PRESET, options.presetTimeoutSeconds, log);
    log(`browser: ${TARGET_PRESET} ${browser.wall == null ? 'not timed' : `${browser.wall.toFixed(1)} s`}${browser.error ? ` (${browser.error})` : ''}`);
  }

  const doc: Omit<BenchDocument, 'targets'> = {
    bench: 1,
    date: new Date().toISOString(),
    quick: options.quick,
    seconds: (performance.now() - started) / 1000,
    machine: {
      cores: os.cpus().length,
      cpuModel: os.cpus()[0]?.model.trim() ?? 'unknown',
      totalMemory: os.totalmem(),
      node: process.version,
      tfjs: tf.version_core,
      platform: os.platform(),
      arch: os.arch(),
      backend,
      threads,
      loadAverage: { start: loadStart, end: loadAverage() },
    },
    reference: {
      workload: {
        task: REFERENCE.task,
        family: REFERENCE.family,
        meanDegree: REFERENCE.meanDegree,
        hidden: shape.hidden,
        steps: shape.steps,
        graphs: shape.graphs,
        nodesPerGraph: REFERENCE.nodesPerGraph,
        nodes: shape.nodes,
        edges: shape.edges,
        optimizer: `adam (lr ${REFERENCE.learningRate}), global-norm clip 1`,
        loss: `${REFERENCE.loss} (maskedLoss)`,
        trainer: 'src/train/trainer.ts train(), batch rebuilt and uploaded every step',
      },
      wasm,
      cpu,
      wasmOverCpu,
      stepsTimed: { wasm: timed('wasm'), cpu: timed('cpu') },
      roundStepsPerSecond: { wasm: perRound('wasm'), cpu: perRound('cpu') },
      matmulCeilingPerRound: ceiling.map((c) => gflops([c])),
      rounds: options.rounds,
      secondsPerVariant: options.seconds,
      loadAverage1m: [loadRef0, loadRef1],
    },
    flops: {
      formula: FLOP_FORMULA,
      perStep: flopsPerStep,
      perStepProfiled: (sumProfile.matmulFlops + maxProfile.matmulFlops) / 2,
      effectiveGflops,
      matmulCeiling,
      fractionOfCeiling: effectiveGflops / matmulCeiling,
      kernelLaunches: Math.round(launches),
      kernelLaunchesByAggregator: { sum: Math.round(sumProfile.launches), max: Math.round(maxProfile.launches) },
      stepMs,
      microsecondsPerLaunch: (stepMs * 1000) / launches,
      matmulMsAtCeiling: matmulMs,
      matmulKernelMs: matmulProfiledMs,
      matmulKernelGflops: matmulProfiledMs > 0 ? maxProfile.matmulFlops / (matmulProfiledMs * 1e6) : NaN,
      breakdown: maxProfile.categories,
      profiledKernelMs: maxProfile.kernelMs,
      profiledWallMs: maxProfile.wallMs,
      topKernels: maxProfile.top,
      matmulShapes: maxProfile.matmuls,
      limit: limitText(launches, stepMs, maxProfile, maxProfile.matmulFlops, matmulCeiling),
    },
    fusion,
    workers,
    presetScaling: scaling,
    presets,
    presetsNote,
    browser,
    tensors: { tensorsBefore, tensorsAfter, equal: tensorsBefore === tensorsAfter, longRun: long },
  };
  doc.machine.loadAverage.end = loadAverage();
  doc.seconds = (performance.now() - started) / 1000;
  return { ...doc, targets: evaluateTargets(doc, TARGET_PRESET) };
}
