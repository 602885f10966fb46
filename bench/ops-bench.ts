/**
 * Micro-benchmark of the engine's graph ops and matmul patch.
 * Run: npx tsx bench/ops-bench.ts [--quick] [--matmul-only]
 * (`npm run bench` is the whole-system benchmark; this one isolates the kernel patches.)
 *
 * Reference workload (DESIGN.md "Facts measured"): hidden 32, 16 message-passing
 * steps, a batch of 32 graphs x 16 nodes (disjoint union, ~4 in-edges per node),
 * message m = relu(W1 h_src + W2 h_dst + w_e e), sum and max aggregators,
 * residual update h <- h + A_sum U_s + A_max U_m + b, linear read-out, MSE, Adam.
 * Reports training steps/s on WASM (with and without each kernel patch; the
 * variants run interleaved in rounds so load on a shared machine hits all
 * alike) and CPU, the first three losses (float32 bits) of each, a dense
 * layer forward+backward (512x32 @ 32x32) with stock vs patched WASM matmul,
 * and WASM matmul GFLOP/s on a 256^3 product.
 */
import os from 'node:os';
import * as tf from '@tensorflow/tfjs-core';
import { initBackend, type BackendName } from '../src/engine/backend.ts';
import { patchWasmIdentity, unpatchWasmIdentity } from '../src/engine/kernels-identity.ts';
import { patchWasmMatMul, unpatchWasmMatMul } from '../src/engine/kernels-matmul.ts';
import { gatherRows, segmentMax, segmentSum } from '../src/model/ops.ts';
import { Rng } from '../src/util/rng.ts';
import { gflops, matmulSample, timeIt } from './measure.ts';

const quick = process.argv.includes('--quick');
const HIDDEN = 32;
const STEPS = 16;
const GRAPHS = 32;
const NODES = 16;
const DEG = 4;

interface Batch {
  x: tf.Tensor2D; // [N, 2] node inputs
  e: tf.Tensor2D; // [E, 1] edge weights
  src: tf.Tensor1D;
  dst: tf.Tensor1D;
  y: tf.Tensor2D; // [N, 1] targets
  n: number;
}

function makeBatch(rng: Rng): Batch {
  const src: number[] = [];
  const dst: number[] = [];
  for (let g = 0; g < GRAPHS; g++) {
    const off = g * NODES;
    for (let v = 0; v < NODES; v++) {
      for (let k = 0; k < DEG; k++) {
        let u = rng.int(0, NODES - 2);
        if (u >= v) u++;
        src.push(off + u);
        dst.push(off + v);
      }
    }
  }
  const n = GRAPHS * NODES;
  const E = src.length;
  const rand = (k: number, lo: number, hi: number) => Array.from({ length: k }, () => rng.uniform(lo, hi));
  return {
    x: tf.tensor2d(rand(n * 2, 0, 1), [n, 2]),
    e: tf.tensor2d(rand(E, 0.1, 1), [E, 1]),
    src: tf.tensor1d(src, 'int32'),
    dst: tf.tensor1d(dst, 'int32'),
    y: tf.tensor2d(rand(n, 0, 3), [n, 1]),
    n,
  };
}

function makeParams(rng: Rng): Record<string, tf.Variable> {
  const mk = (_name: string, shape: [number, number] | [number], scale: number) => {
    const size = shape.reduce((a, b) => a * b, 1);
    const init = tf.tensor(Array.from({ length: size }, () => rng.normal() * scale), shape);
    const v = tf.variable(init, true); // unnamed: several trainers coexist
    init.dispose();
    return v;
  };
  const s = 1 / Math.sqrt(HIDDEN);
  return {
    enc: mk('enc', [2, HIDDEN], 0.7),
    w1: mk('w1', [HIDDEN, HIDDEN], s),
    w2: mk('w2', [HIDDEN, HIDDEN], s),
    we: mk('we', [1, HIDDEN], 1),
    us: mk('us', [HIDDEN, HIDDEN], 0.1 * s),
    um: mk('um', [HIDDEN, HIDDEN], 0.1 * s),
    ub: mk('ub', [HIDDEN], 0),
    dec: mk('dec', [HIDDEN, 1], s),
  };
}

function forwardLoss(b: Batch, p: Record<string, tf.Variable>): tf.Scalar {
  let h = tf.matMul(b.x, p.enc) as tf.Tensor2D;
  const ew = tf.matMul(b.e, p.we) as tf.Tensor2D; // [E, H], same every step
  for (let s = 0; s < STEPS; s++) {
    const hs = gatherRows(tf.matMul(h, p.w1) as tf.Tensor2D, b.src);
    const hd = gatherRows(tf.matMul(h, p.w2) as tf.Tensor2D, b.dst);
    const m = tf.relu(tf.addN([hs, hd, ew])) as tf.Tensor2D;
    const aSum = segmentSum(m, b.dst, b.n);
    const aMax = segmentMax(m, b.dst, b.n);
    h = tf.addN([h, tf.matMul(aSum, p.us), tf.matMul(aMax, p.um)]) as tf.Tensor2D;
    h = tf.add(h, p.ub) as tf.Tensor2D;
  }
  const out = tf.matMul(h, p.dec);
  return tf.mean(tf.squaredDifference(out, b.y)) as tf.Scalar;
}

interface Variant {
  label: string;
  backend: BackendName;
  matmul: boolean;
  identity: boolean;
}

interface Trainer {
  variant: Variant;
  step: () => number;
  steps: number;
  seconds: number;
  firstLosses: string;
  launches: number;
  dispose: () => void;
}

function applyPatches(v: Variant): void {
  if (v.matmul) patchWasmMatMul();
  else unpatchWasmMatMul();
  if (v.identity) patchWasmIdentity();
  else unpatchWasmIdentity();
}

async function makeTrainer(variant: Variant): Promise<Trainer> {
  await initBackend(variant.backend);
  applyPatches(variant);
  const rng = new Rng(7);
  const batch = makeBatch(rng.fork('data'));
  const params = makeParams(rng.fork('init'));
  const opt = tf.train.adam(1e-3);
  const vars = Object.values(params);
  const step = () => {
    const cost = opt.minimize(() => forwardLoss(batch, params), true, vars) as tf.Scalar;
    const v = cost.dataSync()[0];
    cost.dispose();
    return v;
  };
  // Same data, init and step count for every variant: the first losses show
  // which patches change numerics (hex of the float32 bits).
  const hex = (v: number) => new Uint32Array(new Float32Array([v]).buffer)[0].toString(16);
  const firstLosses = [step(), step(), step()].map(hex).join(' ');
  const prof = await tf.profile(() => {
    const c = opt.minimize(() => forwardLoss(batch, params), true, vars);
    c?.dispose();
  });
  return {
    variant,
    step,
    steps: 0,
    seconds: 0,
    firstLosses,
    launches: prof.kernels.length,
    dispose: () => {
      opt.dispose();
      for (const v of Object.values(params)) v.dispose();
      for (const t of [batch.x, batch.e, batch.src, batch.dst, batch.y]) t.dispose();
    },
  };
}

/** Interleave the variants in rounds so load changes on a shared machine hit all of them alike. */
async function trainSpeeds(variants: Variant[], seconds: number, rounds: number): Promise<Map<string, number>> {
  const trainers: Trainer[] = [];
  for (const v of variants) trainers.push(await makeTrainer(v));
  for (let r = 0; r < rounds; r++) {
    for (const t of trainers) {
      await initBackend(t.variant.backend);
      applyPatches(t.variant);
      const budget = (seconds * 1000) / rounds;
      const t0 = performance.now();
      let n = 0;
      while (performance.now() - t0 < budget || n < 1) {
        t.step();
        n++;
      }
      t.steps += n;
      t.seconds += (performance.now() - t0) / 1000;
    }
  }
  const out = new Map<string, number>();
  for (const t of trainers) {
    const sps = t.steps / t.seconds;
    out.set(t.variant.label, sps);
    console.log(
      `  ${t.variant.label.padEnd(30)} ${sps.toFixed(2).padStart(6)} steps/s  (${t.steps} steps in ${t.seconds.toFixed(1)} s, ` +
        `${t.launches} kernels/step, first losses ${t.firstLosses})`,
    );
    await initBackend(t.variant.backend);
    t.dispose();
  }
  applyPatches({ label: '', backend: 'wasm', matmul: true, identity: true });
  return out;
}

async function denseBench(): Promise<void> {
  await initBackend('wasm');
  const rng = new Rng(3);
  const x = tf.tensor2d(Array.from({ length: 512 * 32 }, () => rng.normal()), [512, 32]);
  const w = tf.tensor2d(Array.from({ length: 32 * 32 }, () => rng.normal()), [32, 32]);
  const g = tf.grads((a: tf.Tensor, b: tf.Tensor) => tf.sum(tf.relu(tf.matMul(a, b))));
  const run = () => tf.tidy(() => {
    const [dx, dw] = g([x, w]);
    dx.dataSync();
    dw.dataSync();
  });
  const ms = quick ? 300 : 1500;
  unpatchWasmMatMul();
  const stock = timeIt(run, ms);
  const stockT = timeIt(() => tf.tidy(() => void tf.matMul(x, x, true, false).dataSync()), ms / 3);
  patchWasmMatMul();
  const patched = timeIt(run, ms);
  const patchedT = timeIt(() => tf.tidy(() => void tf.matMul(x, x, true, false).dataSync()), ms / 3);
  console.log(`  dense 512x32@32x32 fwd+bwd:  stock ${(stock * 1000).toFixed(0)} us, patched ${(patched * 1000).toFixed(0)} us  (${(stock / patched).toFixed(2)}x)`);
  console.log(`  x^T·x (32x512 @ 512x32):     stock ${(stockT * 1000).toFixed(0)} us, patched ${(patchedT * 1000).toFixed(0)} us  (${(stockT / patchedT).toFixed(2)}x)`);

  const untransposed = gflops([matmulSample(256, ms)]);
  const a = tf.randomNormal([256, 256], 0, 1, 'float32', 1) as tf.Tensor2D;
  const b = tf.randomNormal([256, 256], 0, 1, 'float32', 2) as tf.Tensor2D;
  const flops = 2 * 256 ** 3;
  const mmT = timeIt(() => tf.tidy(() => void tf.matMul(a, b, false, true).dataSync()), ms);
  unpatchWasmMatMul();
  const mmTStock = timeIt(() => tf.tidy(() => void tf.matMul(a, b, false, true).dataSync()), ms);
  patchWasmMatMul();
  console.log(
    `  matmul 256^3: ${untransposed.toFixed(1)} GFLOP/s untransposed; a·bᵀ ${(flops / mmT / 1e6).toFixed(1)} GFLOP/s patched, ` +
      `${(flops / mmTStock / 1e6).toFixed(1)} GFLOP/s stock`,
  );
  tf.dispose([x, w, a, b]);
}

async function opsBench(backend: BackendName): Promise<void> {
  await initBackend(backend);
  const rng = new Rng(5);
  const b = makeBatch(rng);
  const E = b.src.shape[0];
  const m = tf.randomNormal([E, HIDDEN], 0, 1, 'float32', 3) as tf.Tensor2D;
  const h = tf.randomNormal([b.n, HIDDEN], 0, 1, 'float32', 4) as tf.Tensor2D;
  const ms = quick ? 200 : 600;
  const t = (f: () => tf.Tensor) => timeIt(() => f().dispose(), ms) * 1000;
  const gather = t(() => gatherRows(h, b.src));
  const sum = t(() => segmentSum(m, b.dst, b.n));
  const max = t(() => segmentMax(m, b.dst, b.n));
  const add = t(() => tf.add(m, m));
  console.log(
    `  ${backend}: per call (E=${E}, C=${HIDDEN}): gatherRows ${gather.toFixed(0)} us, segmentSum ${sum.toFixed(0)} us, ` +
      `segmentMax ${max.toFixed(0)} us; tf.add same shape ${add.toFixed(0)} us`,
  );
  tf.dispose([m, h, b.x, b.e, b.src, b.dst, b.y]);
}

async function main(): Promise<void> {
  const secs = quick ? 2 : 8;
  console.log(`Farfield ops bench (node ${process.version}, tfjs ${tf.version_core})`);
  console.log(`Reference training step: hidden ${HIDDEN}, ${STEPS} steps, ${GRAPHS} graphs x ${NODES} nodes, ${DEG} in-edges/node, Adam`);
  const load0 = os.loadavg()[0];
  const variants: Variant[] = [
    { label: 'wasm (both patches)', backend: 'wasm', matmul: true, identity: true },
    { label: 'wasm (matmul patch only)', backend: 'wasm', matmul: true, identity: false },
    { label: 'wasm (identity patch only)', backend: 'wasm', matmul: false, identity: true },
    { label: 'wasm (stock tfjs kernels)', backend: 'wasm', matmul: false, identity: false },
    { label: 'cpu', backend: 'cpu', matmul: true, identity: true },
  ];
  const sps = await trainSpeeds(variants, secs, quick ? 1 : 3);
  const g = (label: string) => sps.get(label) ?? NaN;
  const r = (a: number, b: number) => (a / b).toFixed(2);
  const stock = g('wasm (stock tfjs kernels)');
  console.log(
    `  ratios: wasm/cpu ${r(g('wasm (both patches)'), g('cpu'))}x; both patches/stock ${r(g('wasm (both patches)'), stock)}x; ` +
      `matmul patch alone ${r(g('wasm (matmul patch only)'), stock)}x; identity patch alone ${r(g('wasm (identity patch only)'), stock)}x`,
  );
  console.log(`  load average (1 min) ${load0.toFixed(1)} -> ${os.loadavg()[0].toFixed(1)} on ${os.cpus().length} cores`);
  console.log('Matmul (wasm):');
  await denseBench();
  console.log('Graph ops:');
  await opsBench('wasm');
  await opsBench('cpu');
}

if (process.argv.includes('--matmul-only')) await denseBench();
else await main();
