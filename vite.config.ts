/// <reference types="vitest/config" />
import { defineConfig } from 'vite';

// Cross-origin isolation lets the WASM backend use threads where the browser allows it.
const isolation = {
  'Cross-Origin-Opener-Policy': 'same-origin',
  'Cross-Origin-Embedder-Policy': 'require-corp',
};

export default defineConfig({
  base: './',
  server: { headers: isolation, host: '127.0.0.1' },
  preview: { headers: isolation, host: '127.0.0.1' },
  worker: { format: 'es' },
  // Excluding the WASM backend from pre-bundling breaks one of its exports.
  optimizeDeps: {
    include: [
      '@tensorflow/tfjs-backend-wasm',
      // Found only when a run starts (inside the worker); listed so the dev server does not reload the page mid-run to add them.
      '@tensorflow/tfjs-core',
      '@tensorflow/tfjs-backend-cpu',
      '@tensorflow/tfjs-core/dist/register_all_gradients',
      '@tensorflow/tfjs-core/dist/public/chained_ops/register_all_chained_ops',
    ],
  },
  build: { target: 'es2022', outDir: 'dist', assetsInlineLimit: 0 },
  test: {
    include: ['test/**/*.test.ts'],
    testTimeout: 60_000,
    hookTimeout: 180_000,
    pool: 'forks',
    fileParallelism: true,
  },
});
