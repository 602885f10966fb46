/**
 * Backend setup: one tfjs-core instance, the WASM (default) or plain-JS CPU
 * backend, and Farfield's custom kernels registered exactly once.
 *
 * Why custom kernels: stock tfjs has no WASM kernel for UnsortedSegmentSum, so
 * even `tf.gather`'s gradient throws on WASM, and the CPU backend's segment
 * sum is O(segments x size). See src/engine/kernels-graph.ts. WASM BatchMatMul
 * also runs a slow scalar loop whenever an input is transposed (every matmul
 * gradient); src/engine/kernels-matmul.ts re-registers it to transpose
 * explicitly and take the fast path. src/engine/kernels-identity.ts makes the
 * WASM Identity (used by the engine to save tensors for backprop) share the
 * buffer instead of copying it. src/engine/kernels-layout.ts moves Concat,
 * SplitV and bias-gradient sums onto Farfield's SIMD module, and
 * src/engine/kernels-broadcast.ts runs broadcasting Equal (the gradient of
 * every max or min over an axis) as a loop.
 *
 * Import tf from '@tensorflow/tfjs-core' everywhere in engine code (never the
 * umbrella '@tensorflow/tfjs', which would pull in WebGL).
 *
 * Standard gradients: '@tensorflow/tfjs-core' alone registers NO gradients
 * (tf.grad of tf.sum throws "gradient function not found for Sum") and no
 * chained ops (x.sum()). The umbrella package normally registers both. We do it
 * here: in the browser from tfjs-core's own ESM modules; in Node those ESM files
 * cannot be loaded (extensionless imports in a CommonJS package), and the only
 * prebuilt CommonJS bundle that registers them is the umbrella's Node build, so
 * Node loads that (about 0.5 s once per process; WebGL is registered but never
 * selected). The CLI's worker bundle is the exception: esbuild resolves those
 * ESM files, so its workers register gradients as the browser does. Same
 * gradient source code (one tfjs version) every way.
 */
import * as tf from '@tensorflow/tfjs-core';
import { registerGraphKernels } from './kernels-graph.ts';
import { patchWasmIdentity } from './kernels-identity.ts';
import { patchWasmBroadcast } from './kernels-broadcast.ts';
import { patchWasmLayout } from './kernels-layout.ts';
import { patchWasmMatMul } from './kernels-matmul.ts';
import { prepareSimdKernels, simdKernels } from './simd/simd-kernels.ts';
import type { BackendWasm } from '@tensorflow/tfjs-backend-wasm';

export type BackendName = 'wasm' | 'cpu';

export interface BackendOptions {
  /**
   * WASM threads (XNNPACK thread pool). Only honoured before the WASM backend
   * first initialises, and only where tfjs enables WASM threads (a
   * cross-origin-isolated browser); tfjs disables them in Node.
   */
  threads?: number;
  /**
   * Where the `.wasm` binaries live: a directory prefix, or a map from binary
   * name ('tfjs-backend-wasm.wasm', '-simd', '-threaded-simd') to URL (the
   * browser passes Vite `?url` imports). Only honoured before first init.
   */
  wasmPaths?: string | Record<string, string>;
}

interface WasmModuleApi {
  setWasmPaths(paths: string | Record<string, string>): void;
  setThreadsCount(n: number): void;
  getThreadsCount(): number;
}

let wasmApi: WasmModuleApi | null = null;
let wasmInitialised = false;
/** What a host reports about its engine: backend, WASM threads, and whether Farfield's SIMD kernels run. */
export interface EngineInfo {
  backend: BackendName;
  threads: number;
  simd: boolean;
}

let active: EngineInfo | null = null;
let pending: Promise<EngineInfo> | null = null;

async function loadWasm(options: BackendOptions | undefined): Promise<WasmModuleApi> {
  if (wasmApi == null) {
    const mod = await import('@tensorflow/tfjs-backend-wasm');
    wasmApi = {
      // The declared map type only allows the three known binary names.
      setWasmPaths: (p) => mod.setWasmPaths(p as Parameters<typeof mod.setWasmPaths>[0]),
      setThreadsCount: mod.setThreadsCount,
      getThreadsCount: mod.getThreadsCount,
    };
  }
  if (!wasmInitialised) {
    if (options?.wasmPaths != null) wasmApi.setWasmPaths(options.wasmPaths);
    if (options?.threads != null) {
      if (!Number.isInteger(options.threads) || options.threads < 1) {
        throw new Error(`engine/backend: threads must be a positive integer, got ${options.threads}`);
      }
      wasmApi.setThreadsCount(options.threads);
    }
  }
  return wasmApi;
}

let standardGradients: Promise<void> | null = null;

/**
 * Defined (true) only inside the CLI's prebuilt worker bundle
 * (src/cli/worker-bundle.ts), which inlines tfjs-core's ESM gradient modules:
 * then Node takes the browser's route and skips the umbrella's ~0.3 s load.
 */
declare const FARFIELD_BUNDLED_GRADIENTS: boolean | undefined;

function gradientsAreBundled(): boolean {
  return typeof FARFIELD_BUNDLED_GRADIENTS !== 'undefined' && FARFIELD_BUNDLED_GRADIENTS === true;
}

function isNode(): boolean {
  return typeof process !== 'undefined' && process.versions?.node != null;
}

/** Register tfjs's standard gradients and chained ops once (see header). */
function ensureStandardGradients(): Promise<void> {
  standardGradients ??= (async () => {
    if (tf.getGradient('BatchMatMul') != null && tf.getGradient('Sum') != null) return;
    if (isNode() && !gradientsAreBundled()) {
      const umbrella = '@tensorflow/tfjs'; // a variable, so bundlers leave it alone
      await import(/* @vite-ignore */ umbrella);
    } else {
      await import('@tensorflow/tfjs-core/dist/register_all_gradients');
      await import('@tensorflow/tfjs-core/dist/public/chained_ops/register_all_chained_ops');
    }
    if (tf.getGradient('BatchMatMul') == null) {
      throw new Error('engine/backend: the standard tfjs gradients did not register');
    }
  })();
  return standardGradients;
}

type Listener = (...args: unknown[]) => void;
const ERROR_EVENTS = ['uncaughtException', 'unhandledRejection'] as const;

function nodeErrorListeners(): Map<string, Listener[]> {
  return new Map(ERROR_EVENTS.map((ev) => [ev, process.listeners(ev) as Listener[]]));
}

/**
 * The Emscripten glue of the WASM backend adds process-wide handlers that
 * rethrow every uncaught error from inside its minified source, so Node then
 * prints ~30 kB of wasm glue instead of the error. Remove exactly those
 * (recognisable by their bodies), leaving Node's default handling.
 */
function removeEmscriptenListeners(before: Map<string, Listener[]>): void {
  for (const ev of ERROR_EVENTS) {
    const old = before.get(ev) ?? [];
    for (const l of process.listeners(ev) as Listener[]) {
      const src = String(l);
      if (!old.includes(l) && (src.includes('ExitStatus') || src.includes('throw reason'))) {
        process.removeListener(ev, l);
      }
    }
  }
}

async function doInit(
  name: BackendName,
  options: BackendOptions | undefined,
): Promise<EngineInfo> {
  if (name !== 'wasm' && name !== 'cpu') {
    throw new Error(`engine/backend: unknown backend '${String(name)}' (expected 'wasm' or 'cpu')`);
  }
  await ensureStandardGradients();
  let api: WasmModuleApi | null = null;
  if (name === 'wasm') api = await loadWasm(options);
  else await import('@tensorflow/tfjs-backend-cpu');

  // Kernel registration does not need a live backend; it must precede the
  // first op. Both calls are idempotent.
  registerGraphKernels(name);
  if (name === 'wasm') {
    patchWasmMatMul();
    patchWasmIdentity();
    patchWasmLayout();
    patchWasmBroadcast();
  }

  const before = isNode() ? nodeErrorListeners() : null;
  const ok = await tf.setBackend(name);
  await tf.ready();
  if (before != null) removeEmscriptenListeners(before);
  if (name === 'cpu') {
    // Silence the CPU backend's one-time "install tfjs-node" banner (a private
    // flag of MathBackendCPU; harmless if it is ever renamed).
    const cpu = tf.backend() as unknown as { firstUse?: boolean };
    if (cpu.firstUse === true) cpu.firstUse = false;
  }
  if (!ok || tf.getBackend() !== name) {
    throw new Error(`engine/backend: could not initialise the '${name}' backend (tf.getBackend() = ${tf.getBackend()})`);
  }
  let threads = 1;
  if (name === 'wasm' && api != null) {
    wasmInitialised = true;
    // tfjs sets WASM_HAS_MULTITHREAD_SUPPORT=false in Node and then loads a
    // single-threaded binary; the XNNPACK count it reports is then not real.
    const threaded = await tf.env().getAsync('WASM_HAS_MULTITHREAD_SUPPORT');
    threads = threaded ? Math.max(1, api.getThreadsCount()) : 1;
  }
  // Same numbers either way (src/engine/simd/); reported because speed differs.
  if (name === 'wasm') await prepareSimdKernels(tf.backend() as unknown as BackendWasm);
  const simd = name === 'wasm' && simdKernels(tf.backend() as unknown as BackendWasm) != null;
  active = { backend: name, threads, simd };
  return { ...active };
}

/**
 * Select and initialise a backend; idempotent (repeat calls just make `name`
 * the active backend again). Returns what is actually in use.
 */
export async function initBackend(
  name: BackendName = 'wasm',
  options?: { threads?: number; wasmPaths?: string | Record<string, string> },
): Promise<EngineInfo> {
  // Serialise concurrent calls so setWasmPaths/setThreadsCount never race init.
  const previous = pending;
  const run = (async () => {
    if (previous != null) await previous.catch(() => undefined);
    if (active != null && active.backend === name && tf.getBackend() === name) return { ...active };
    return doInit(name, options);
  })();
  pending = run;
  return run;
}

/** Threads used by the active backend (1 for CPU, and for WASM in Node). */
export function threadsInUse(): number {
  return active?.threads ?? 1;
}
