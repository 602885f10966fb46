/**
 * The three tfjs WASM binaries, emitted by Vite as static assets and passed to
 * each worker's 'init' message (tfjs picks one by the browser's features).
 */
import plainWasm from '@tensorflow/tfjs-backend-wasm/dist/tfjs-backend-wasm.wasm?url';
import simdWasm from '@tensorflow/tfjs-backend-wasm/dist/tfjs-backend-wasm-simd.wasm?url';
import threadedSimdWasm from '@tensorflow/tfjs-backend-wasm/dist/tfjs-backend-wasm-threaded-simd.wasm?url';

/** Absolute URLs: a worker resolves relative paths against its own script, not the page. */
export function wasmPaths(base: string = document.baseURI): Record<string, string> {
  return {
    'tfjs-backend-wasm.wasm': new URL(plainWasm, base).href,
    'tfjs-backend-wasm-simd.wasm': new URL(simdWasm, base).href,
    'tfjs-backend-wasm-threaded-simd.wasm': new URL(threadedSimdWasm, base).href,
  };
}
