/**
 * Zero-copy Identity for the WASM backend.
 *
 * The engine clones every tensor it saves for the backward pass (inputs and
 * outputs a gradient needs) through the 'Identity' kernel. The stock WASM
 * Identity allocates and copies; in a reference training step that is ~300
 * copies of [512,32] / [2048,32] buffers. Tensors are immutable, and the WASM
 * backend already shares buffers by reference count for Reshape, so Identity
 * can do the same: bump the count and return the same data id (this is what
 * the CPU backend's Identity does).
 */
import * as tf from '@tensorflow/tfjs-core';
import type { BackendWasm } from '@tensorflow/tfjs-backend-wasm';

const PATCHED = Symbol.for('farfield.identityPatched');
interface Patched {
  [PATCHED]?: tf.KernelConfig;
}

function wrap(original: tf.KernelConfig): tf.KernelFunc {
  const f: tf.KernelFunc = (args) => {
    const x = args.inputs['x'];
    if (x == null || x.dtype === 'string') return original.kernelFunc(args);
    // Registered only for 'wasm'.
    (args.backend as BackendWasm).incRef(x.dataId);
    return { dataId: x.dataId, shape: [...x.shape], dtype: x.dtype };
  };
  (f as Patched)[PATCHED] = original;
  return f;
}

/** Re-register the WASM Identity kernel as a reference-counted share. Idempotent. */
export function patchWasmIdentity(): void {
  const current = tf.getKernel('Identity', 'wasm');
  if (current == null || (current.kernelFunc as Patched)[PATCHED] != null) return;
  tf.unregisterKernel('Identity', 'wasm');
  tf.registerKernel({ ...current, kernelFunc: wrap(current) });
}

/** Restore the stock (copying) WASM Identity kernel. */
export function unpatchWasmIdentity(): void {
  const current = tf.getKernel('Identity', 'wasm');
  const original = current == null ? undefined : (current.kernelFunc as Patched)[PATCHED];
  if (original == null) return;
  tf.unregisterKernel('Identity', 'wasm');
  tf.registerKernel(original);
}
