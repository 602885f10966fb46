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

import { kernelPatch } from './kernel-patch.ts';

function wrap(original: tf.KernelConfig): tf.KernelFunc {
  return (args) => {
    const x = args.inputs['x'];
    if (x == null || x.dtype === 'string') return original.kernelFunc(args);
    // Registered only for 'wasm'.
    (args.backend as BackendWasm).incRef(x.dataId);
    return { dataId: x.dataId, shape: [...x.shape], dtype: x.dtype };
  };
}

const identity = kernelPatch('identity', ['Identity'], wrap);

/** Re-register the WASM Identity kernel as a reference-counted share. Idempotent. */
export const patchWasmIdentity = (): void => identity.patch();

/** Restore the stock (copying) WASM Identity kernel. */
export const unpatchWasmIdentity = (): void => identity.unpatch();
