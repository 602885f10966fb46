/**
 * Re-registering a stock WASM kernel with a faster wrapper, reversibly: the
 * wrapper remembers the kernel it replaced (under a per-family symbol), so
 * patching is idempotent and tests and benchmarks can restore the stock
 * kernel to compare both.
 */
import * as tf from '@tensorflow/tfjs-core';

type Marked = Record<symbol, tf.KernelConfig | undefined>;

export interface KernelPatch {
  /** Replace each named WASM kernel with `make(stock)`; idempotent; kernels not loaded yet are skipped. */
  patch(): void;
  /** Restore the stock kernels. */
  unpatch(): void;
  /** True if every named kernel is currently the patched one. */
  isPatched(): boolean;
}

export function kernelPatch(family: string, kernelNames: readonly string[], make: (stock: tf.KernelConfig, kernelName: string) => tf.KernelFunc): KernelPatch {
  const marker = Symbol.for(`farfield.${family}Patched`);
  const stockOf = (config: tf.KernelConfig | undefined) => (config == null ? undefined : (config.kernelFunc as unknown as Marked)[marker]);
  return {
    patch() {
      for (const name of kernelNames) {
        const current = tf.getKernel(name, 'wasm');
        if (current == null || stockOf(current) != null) continue;
        const kernelFunc = make(current, name);
        (kernelFunc as unknown as Marked)[marker] = current;
        tf.unregisterKernel(name, 'wasm');
        tf.registerKernel({ ...current, kernelFunc });
      }
    },
    unpatch() {
      for (const name of kernelNames) {
        const stock = stockOf(tf.getKernel(name, 'wasm'));
        if (stock == null) continue;
        tf.unregisterKernel(name, 'wasm');
        tf.registerKernel(stock);
      }
    },
    isPatched() {
      return kernelNames.every((name) => stockOf(tf.getKernel(name, 'wasm')) != null);
    },
  };
}
