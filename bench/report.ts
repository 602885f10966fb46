/**
 * The benchmark document (`farfield bench --json`), its targets, and the
 * human-readable report. Field names are part of the interface (issue 9).
 */
import type { AggregatorName } from '../src/experiment/spec.ts';
import type { BrowserTiming } from './browser.ts';
import type { LongRunReport } from './long-run.ts';
import type { PresetTiming } from './presets.ts';
import type { FusionReport, FusionWorkload } from './fusion.ts';
import type { KernelCategory, KernelStat, MatmulStat } from './reference.ts';
import type { PresetScaling, WorkersReport } from './workers.ts';

export type PerAggregator = Record<Extract<AggregatorName, 'sum' | 'max'>, number>;

export interface BenchDocument {
  bench: 1;
  date: string;
  /** --quick: short windows and a smaller reference batch; a smoke test, not a measurement. */
  quick: boolean;
  seconds: number;
  machine: {
    cores: number;
    cpuModel: string;
    totalMemory: number;
    node: string;
    tfjs: string;
    platform: string;
    arch: string;
    backend: string;
    threads: number;
    /** 1/5/15-minute load averages when the bench started and ended (other jobs on the machine slow every number). */
    loadAverage: { start: [number, number, number]; end: [number, number, number] };
  };
  reference: {
    workload: {
      task: string;
      family: string;
      meanDegree: number;
      hidden: number;
      steps: number;
      graphs: number;
      nodesPerGraph: number;
      nodes: number;
      edges: number;
      optimizer: string;
      loss: string;
      trainer: string;
    };
    /** Training steps per second. */
    wasm: PerAggregator;
    cpu: PerAggregator;
    /** Geometric mean of wasm {sum, max} over that of cpu {sum, max}. */
    wasmOverCpu: number;
    stepsTimed: { wasm: PerAggregator; cpu: PerAggregator };
    /** Steps per second in each round, to show how much the machine's load moved the numbers. */
    roundStepsPerSecond: { wasm: { sum: number[]; max: number[] }; cpu: { sum: number[]; max: number[] } };
    /** 256³ WASM matmul GFLOP/s measured after each round. */
    matmulCeilingPerRound: number[];
    rounds: number;
    secondsPerVariant: number;
    loadAverage1m: [number, number];
  };
  flops: {
    formula: string;
    /** Matmul FLOPs per training step, analytic. */
    perStep: number;
    /** The same from the shapes of the matmul kernels tf.profile recorded (cross-check). */
    perStepProfiled: number;
    /** perStep x geometric-mean WASM steps/s. */
    effectiveGflops: number;
    /** WASM matmul GFLOP/s on a 256³ product (untransposed), measured interleaved with the reference rounds. */
    matmulCeiling: number;
    fractionOfCeiling: number;
    /** Backend kernel launches per training step (tf.profile records, custom-gradient wrappers excluded); mean over sum and max. */
    kernelLaunches: number;
    kernelLaunchesByAggregator: PerAggregator;
    /** Milliseconds per WASM step (unprofiled, geometric mean) and the mean time per launch it implies. */
    stepMs: number;
    microsecondsPerLaunch: number;
    /** Milliseconds the matmuls would take at the 256³ rate. */
    matmulMsAtCeiling: number;
    /** Milliseconds per step the matmul kernels and the fused process kernels (mostly matmul) took under tf.profile (max arm), and the rate that implies. */
    matmulKernelMs: number;
    matmulKernelGflops: number;
    /** Matmul kernels by shape, slowest first (max arm, per step). */
    matmulShapes: MatmulStat[];
    /** Per-step launches and profiled kernel time (max arm) by kind of kernel. */
    breakdown: Record<KernelCategory, { launches: number; ms: number }>;
    profiledKernelMs: number;
    profiledWallMs: number;
    topKernels: KernelStat[];
    limit: string;
  };
  /** The fused process kernels against the path they replace, reference step and the default preset's own step. */
  fusion: FusionReport | null;
  /** Short fixed runs through the pool (start-up and warm-up weigh heavily). */
  workers: WorkersReport | null;
  /** The target preset's own runs on 1 worker against one per core; null when not measured (--quick, --skip-scaling, one core). */
  presetScaling: PresetScaling | null;
  presets: PresetTiming[];
  presetsNote: string;
  /** The target preset in headless Chromium (Run pressed to "done"), or null when skipped. */
  browser: BrowserTiming | null;
  tensors: {
    /** Live tensors in this process before and after all in-process benchmark work (must be equal). */
    tensorsBefore: number;
    tensorsAfter: number;
    equal: boolean;
    longRun: LongRunReport;
  };
  targets: Target[];
}

export interface Target {
  id: 'wasmOverCpu' | 'workerSpeedup' | 'presetWall' | 'browserOverCli' | 'fractionOfCeiling' | 'fusedPresetStep' | 'fusedReferenceStep' | 'fusedLaunches';
  description: string;
  value: number | null;
  threshold: number;
  /** 'atLeast': value >= threshold passes; 'atMost': value <= threshold passes. */
  direction: 'atLeast' | 'atMost';
  unit: string;
  pass: boolean | null;
  status: 'pass' | 'fail' | 'not measured';
  note?: string;
}

function target(t: Omit<Target, 'pass' | 'status'>): Target {
  const measured = t.value != null && Number.isFinite(t.value);
  const pass = !measured ? null : t.direction === 'atLeast' ? t.value! >= t.threshold : t.value! <= t.threshold;
  return { ...t, pass, status: pass == null ? 'not measured' : pass ? 'pass' : 'fail' };
}

/**
 * Worker speedup on the target preset's own runs when measured (the work a
 * user waits for), else on the short pool runs; the note gives the other.
 */
function workerSpeedupTarget(doc: Omit<BenchDocument, 'targets'>, targetPreset: string, quickNote: string | undefined): Target {
  const cores = doc.machine.cores;
  const w = doc.workers;
  const p = doc.presetScaling;
  const short = w && w.workers > 1 ? `short runs (${w.runs} x ${w.trainingStepsPerRun} steps): ${w.speedup.toFixed(2)}x` : null;
  if (p && !p.error) {
    return target({
      id: 'workerSpeedup',
      description: `${targetPreset} on ${p.workers} workers over 1 worker, ${p.workers} cores`,
      value: p.speedup,
      threshold: Math.round(0.9 * p.workers * 100) / 100,
      direction: 'atLeast',
      unit: 'x',
      note: [p.sameFingerprint ? 'same fingerprint' : 'FINGERPRINTS DIFFER', short].filter(Boolean).join('; '),
    });
  }
  return target({
    id: 'workerSpeedup',
    description: `${w?.workers ?? cores} workers over 1 worker on ${cores} cores, same total work (short runs)`,
    value: w && w.workers > 1 ? w.speedup : null,
    threshold: Math.round(0.9 * (w?.workers ?? cores) * 100) / 100,
    direction: 'atLeast',
    unit: 'x',
    note: !w ? 'skipped' : w.workers < 2 ? 'one core: nothing to compare' : [quickNote, p?.error ? `preset scaling failed: ${p.error}` : null].filter(Boolean).join('; ') || undefined,
  });
}

function fusionTargets(doc: Omit<BenchDocument, 'targets'>, quickNote: string | undefined): Target[] {
  const get = (name: string) => doc.fusion?.workloads.find((w) => w.name === name);
  const preset = get('default-preset');
  const reference = get('reference');
  const missing = doc.fusion == null ? 'fusion not measured' : undefined;
  /** A step's fused ÷ previous ratio, with fused ÷ stock beside it in the note. */
  const stepTarget = (id: Target['id'], step: string, w: FusionWorkload | undefined, threshold: number) =>
    target({
      id,
      description: `${step}, fused kernels over the previous path (engine 0.2.0's stock composition)`,
      value: w?.speedup ?? null,
      threshold,
      direction: 'atLeast',
      unit: 'x',
      note: missing ?? ([quickNote, w ? `over this engine's stock path (same bits): ${w.speedupOverStock.toFixed(2)}x` : null].filter(Boolean).join('; ') || undefined),
    });
  return [
    stepTarget('fusedPresetStep', "default preset's own training step", preset, 2.5),
    stepTarget('fusedReferenceStep', 'reference training step', reference, 1.6),
    target({
      id: 'fusedLaunches',
      description: 'kernel launches per reference training step, fused',
      value: reference?.launches.fused ?? null,
      threshold: 300,
      direction: 'atMost',
      unit: '',
      note: missing ?? (reference ? `previous path: ${Math.round(reference.launches.previous)}; stock path: ${Math.round(reference.launches.stock)}` : undefined),
    }),
  ];
}

export function evaluateTargets(doc: Omit<BenchDocument, 'targets'>, targetPreset: string): Target[] {
  const quickNote = doc.quick ? 'quick mode: smaller reference and short windows, not comparable to the target' : undefined;
  const cores = doc.machine.cores;
  const w = doc.workers;
  const preset = doc.presets.find((p) => p.file === targetPreset);
  return [
    target({
      id: 'wasmOverCpu',
      description: 'reference training step, WASM over plain-JS CPU backend',
      value: doc.reference.wasmOverCpu,
      threshold: 10,
      direction: 'atLeast',
      unit: 'x',
      note: quickNote,
    }),
    workerSpeedupTarget(doc, targetPreset, quickNote),
    target({
      id: 'presetWall',
      description: `${targetPreset} wall time, all cores, its own seed count`,
      value: preset && !preset.error ? preset.wall : null,
      threshold: 120,
      direction: 'atMost',
      unit: 's',
      note: !preset ? 'preset not run (--quick, --skip-presets or not in --presets)' : preset.error,
    }),
    target({
      id: 'browserOverCli',
      description: `${targetPreset} in headless Chromium over its CLI wall time`,
      value: doc.browser?.wall != null && preset && !preset.error ? doc.browser.wall / preset.wall : null,
      threshold: 1.5,
      direction: 'atMost',
      unit: 'x',
      note: !doc.browser
        ? 'browser not run (--quick or --skip-browser)'
        : doc.browser.error ?? (!preset ? 'CLI time of the preset not measured' : doc.browser.fingerprint === preset.fingerprint ? 'same fingerprint as the CLI' : `fingerprint ${doc.browser.fingerprint} differs from the CLI's ${preset.fingerprint}`),
    }),
    ...fusionTargets(doc, quickNote),
    target({
      id: 'fractionOfCeiling',
      description: 'reference step effective matmul GFLOP/s over the 256³ WASM matmul rate',
      value: doc.flops.fractionOfCeiling,
      threshold: 0.3,
      direction: 'atLeast',
      unit: '',
      note: quickNote,
    }),
  ];
}

const f = (x: number | null | undefined, digits = 2) => (x == null || !Number.isFinite(x) ? '—' : x.toFixed(digits));
const pad = (s: string, n: number) => s.padEnd(n);
const lpad = (s: string, n: number) => s.padStart(n);
const thousands = (x: number) => Math.round(x).toLocaleString('en-US');

export function renderReport(doc: BenchDocument): string {
  const m = doc.machine;
  const r = doc.reference;
  const fl = doc.flops;
  const lines: string[] = [];
  const la = (l: number[]) => l.map((x) => x.toFixed(2)).join(' ');
  lines.push(`Farfield bench${doc.quick ? ' (quick: smoke test, not a measurement)' : ''} — ${doc.date}, ${f(doc.seconds, 0)} s`);
  lines.push(`machine   ${m.cores} cores, ${m.cpuModel}, ${thousands(m.totalMemory / 1024 ** 2)} MB, ${m.platform}/${m.arch}, node ${m.node}, tfjs ${m.tfjs}; ${m.backend} backend, ${m.threads} thread(s)`);
  lines.push(`load      ${la(m.loadAverage.start)} at start, ${la(m.loadAverage.end)} at end (1/5/15 min; above ${m.cores}, other jobs share the cores and every number is low)`);
  lines.push('');
  const w = r.workload;
  lines.push(`Reference training step: hidden ${w.hidden}, T = ${w.steps}, ${w.graphs} ${w.family} graphs x ${w.nodesPerGraph} nodes (${w.nodes} nodes, ${w.edges} message edges), ${w.task}, ${w.optimizer}, ${w.loss}`);
  lines.push(`  interleaved: ${r.rounds} round(s), ~${f(r.secondsPerVariant, 1)} s per variant; load ${f(r.loadAverage1m[0])} -> ${f(r.loadAverage1m[1])}`);
  lines.push(`  ${pad('steps/s', 10)}${lpad('sum', 9)}${lpad('max', 9)}`);
  lines.push(`  ${pad('wasm', 10)}${lpad(f(r.wasm.sum), 9)}${lpad(f(r.wasm.max), 9)}   (${r.stepsTimed.wasm.sum} + ${r.stepsTimed.wasm.max} steps timed)`);
  lines.push(`  ${pad('cpu', 10)}${lpad(f(r.cpu.sum, 3), 9)}${lpad(f(r.cpu.max, 3), 9)}   (${r.stepsTimed.cpu.sum} + ${r.stepsTimed.cpu.max} steps timed)`);
  lines.push(`  wasm / cpu ${f(r.wasmOverCpu, 1)}x (geometric means)`);
  if (r.rounds > 1) {
    const spread = (xs: number[]) => `${f(Math.min(...xs))}-${f(Math.max(...xs))}`;
    lines.push(
      `  per round: wasm sum ${spread(r.roundStepsPerSecond.wasm.sum)}, max ${spread(r.roundStepsPerSecond.wasm.max)}; ` +
        `cpu sum ${spread(r.roundStepsPerSecond.cpu.sum)}, max ${spread(r.roundStepsPerSecond.cpu.max)} steps/s; matmul ${spread(r.matmulCeilingPerRound)} GFLOP/s`,
    );
  }
  lines.push('');
  lines.push(`FLOPs: ${f(fl.perStep / 1e6, 1)} MFLOP of matmul per step (tf.profile shapes: ${f(fl.perStepProfiled / 1e6, 1)})`);
  lines.push(`  effective ${f(fl.effectiveGflops)} GFLOP/s vs the WASM 256³ matmul ${f(fl.matmulCeiling)} GFLOP/s = ${f(fl.fractionOfCeiling * 100, 1)}% of the ceiling`);
  lines.push(`  ${thousands(fl.kernelLaunches)} kernel launches per step (sum ${thousands(fl.kernelLaunchesByAggregator.sum)}, max ${thousands(fl.kernelLaunchesByAggregator.max)}); step ${f(fl.stepMs, 1)} ms = ${f(fl.microsecondsPerLaunch, 1)} µs per launch`);
  const b = fl.breakdown;
  lines.push(
    `  profiled per step (max arm): ${Object.entries(b)
      .map(([k, v]) => `${k} ${thousands(v.launches)} launches / ${f(v.ms, 1)} ms`)
      .join(', ')}; kernels ${f(fl.profiledKernelMs, 1)} of ${f(fl.profiledWallMs, 1)} ms wall`,
  );
  lines.push(`  top kernels: ${fl.topKernels.slice(0, 5).map((k) => `${k.name} ${thousands(k.count)}x ${f(k.ms, 1)} ms`).join(', ')}`);
  lines.push(`  matmul and fused process kernels ${f(fl.matmulKernelMs, 1)} ms per step at ${f(fl.matmulKernelGflops, 1)} GFLOP/s (vs ${f(fl.matmulMsAtCeiling, 1)} ms at the 256³ rate); slowest shapes:`);
  for (const mm of fl.matmulShapes.slice(0, 4)) {
    lines.push(`    ${lpad(f(mm.ms, 1), 6)} ms  ${lpad(thousands(mm.count), 3)}x  ${lpad(f(mm.gflops, 1), 5)} GFLOP/s  ${mm.shapes}`);
  }
  lines.push(`  limit: ${fl.limit}`);
  lines.push('');
  if (doc.fusion) {
    lines.push('Fused process kernels against the previous path (engine 0.2.0\'s stock composition) and this engine\'s stock path (same bits), rounds interleaved:');
    for (const w of doc.fusion.workloads) {
      lines.push(
        `  ${pad(w.name, 15)} fused ${f(w.stepsPerSecond.fused)}, stock ${f(w.stepsPerSecond.stock)}, previous ${f(w.stepsPerSecond.previous)} steps/s -> ` +
          `${f(w.speedup)}x the previous path, ${f(w.speedupOverStock)}x stock; ` +
          `launches per step ${thousands(w.launches.fused)} / ${thousands(w.launches.stock)} / ${thousands(w.launches.previous)}`,
      );
      lines.push(`  ${pad('', 15)} ${w.description}`);
    }
    lines.push('');
  }
  const wk = doc.workers;
  if (wk) {
    lines.push(`Workers (CLI pool, ${wk.runs} runs of ${wk.trainingStepsPerRun} training steps, order ${wk.order.join(',')}):`);
    lines.push(
      `  1 worker ${f(wk.oneWorkerSeconds, 1)} s, ${wk.workers} workers ${f(wk.allWorkersSeconds, 1)} s -> speedup ${f(wk.speedup)}x ` +
        `(${f(wk.speedupExcludingStartup)}x without worker start-up: ${f(wk.startupSeconds.one, 1)} s vs ${f(wk.startupSeconds.all, 1)} s to ready)`,
    );
    lines.push(
      `  mean seconds per run ${f(wk.meanRunSeconds.one, 1)} alone vs ${f(wk.meanRunSeconds.all, 1)} side by side; ` +
        `fingerprints ${wk.sameFingerprint ? 'identical' : 'DIFFER'}${wk.failedRuns ? `; ${wk.failedRuns} run(s) FAILED` : ''}`,
    );
  } else {
    lines.push('Workers: skipped');
  }
  const ps = doc.presetScaling;
  if (ps) {
    const slower = ps.runSeconds.one && ps.runSeconds.all ? ` (runs' own seconds ${f(ps.runSeconds.one, 0)} alone vs ${f(ps.runSeconds.all, 0)} side by side)` : '';
    lines.push(
      `  ${ps.file}, ${ps.runs} runs: 1 worker ${f(ps.oneWorkerSeconds, 1)} s, ${ps.workers} workers ${f(ps.allWorkersSeconds, 1)} s -> speedup ${f(ps.speedup)}x${slower}; ` +
        `fingerprints ${ps.sameFingerprint ? 'identical' : 'DIFFER'}${ps.error ? `; ERROR ${ps.error}` : ''}`,
    );
  }
  lines.push('');
  if (doc.presets.length) {
    lines.push('Presets (node bin/farfield.mjs run <preset> --json --quiet, all cores):');
    const width = Math.max(...doc.presets.map((p) => p.file.length));
    for (const p of doc.presets) {
      lines.push(
        `  ${pad(p.file, width)} ${lpad(p.runs ? `${p.runs} runs` : '', 8)} ${lpad(f(p.wall, 1), 7)} s  ` +
          `worker peak ${lpad(f(p.peakWorkerRssMB, 0), 4)} MB, process ${lpad(f(p.peakProcessRssMB, 0), 4)} MB  ` +
          `${p.fingerprint ?? ''}  load ${f(p.load[0], 1)}->${f(p.load[1], 1)}${p.error ? `  ERROR ${p.error}` : ''}`,
      );
    }
  }
  lines.push(`  ${doc.presetsNote}`);
  lines.push('');
  const br = doc.browser;
  if (br) {
    lines.push(
      `Browser: ${br.file} in Chromium ${br.browser ?? '?'} (${br.hardwareConcurrency ?? '?'} cores reported): ` +
        (br.wall == null ? `not timed${br.error ? ` (${br.error})` : ''}` : `${f(br.wall, 1)} s from Run to done, fingerprint ${br.fingerprint ?? '—'}, ${br.simdKernels == null ? 'kernels not reported' : br.simdKernels ? 'SIMD kernels' : 'stock kernels'}; site build and load ${f(br.setupSeconds, 1)} s (not counted)`),
    );
  } else {
    lines.push('Browser: skipped');
  }
  lines.push('');
  const t = doc.tensors;
  const lr = t.longRun;
  lines.push(`Tensors: ${t.tensorsBefore} live before, ${t.tensorsAfter} after the in-process work (${t.equal ? 'equal' : 'LEAK'})`);
  lines.push(
    `  long run ${thousands(lr.steps)} steps (${f(lr.stepsPerSecond, 1)} steps/s, ${lr.status}): tensors ${lr.tensorsBefore} -> ${lr.tensorsAfter}, ` +
      `in training ${lr.tensorsAtEarlyStep} at step ${lr.earlyStep} -> ${lr.tensorsAtLastStep} at the end; ` +
      `heap ${f(lr.heapBeforeMB, 1)} -> ${f(lr.heapAfterMB, 1)} MB; backend bytes ${thousands(lr.backendBytesBefore)} -> ${thousands(lr.backendBytesAfter)}`,
  );
  lines.push('');
  lines.push('Targets:');
  for (const tg of doc.targets) {
    const mark = tg.status === 'pass' ? 'PASS' : tg.status === 'fail' ? 'FAIL' : ' -- ';
    const rel = tg.direction === 'atLeast' ? '>=' : '<=';
    lines.push(`  ${mark}  ${pad(tg.description, 70)} ${lpad(f(tg.value), 8)}${tg.unit}  (${rel} ${tg.threshold}${tg.unit})${tg.note ? `  [${tg.note}]` : ''}`);
  }
  return lines.join('\n');
}
