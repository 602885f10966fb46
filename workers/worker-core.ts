/**
 * Host-agnostic worker body: receives messages, runs the engine, posts
 * progress and results. Adapters for Web Workers and worker_threads only wire
 * `post` and the message source to this.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { FromWorker, ToWorker } from './protocol.ts';
import { initBackend, type EngineInfo } from '../src/engine/backend.ts';
import { executeRun } from '../src/experiment/run.ts';
import { encodeNetworkWeights, type TrainedWeights } from '../src/experiment/network-weights.ts';
import type { MessagePassingNetwork } from '../src/model/network.ts';
import type { FeatureTransforms } from '../src/train/batch.ts';
import type { SeedData } from '../src/experiment/datasets.ts';

/** Progress messages at most this often, so posting never slows training. */
const PROGRESS_INTERVAL_MS = 250;

export function createWorkerCore(post: (message: FromWorker) => void): (message: ToWorker) => Promise<void> {
  let ready: Promise<EngineInfo> | null = null;
  // Arms of the same seed share graphs; keep the last spec's data per seed.
  let cacheKey = '';
  let dataCache = new Map<number, SeedData>();
  return async (message: ToWorker) => {
    try {
      switch (message.type) {
        case 'init': {
          ready = initBackend(message.backend, { threads: message.threads, wasmPaths: message.wasmPaths });
          const info = await ready;
          post({ type: 'ready', ...info });
          return;
        }
        case 'crash': {
          if (message.how === 'exit') {
            // Simulates a worker dying without a word.
            (globalThis as { process?: { exit(code: number): void } }).process?.exit(3);
            (globalThis as { close?: () => void }).close?.();
            return;
          }
          throw new Error(`deliberate fault injected into run ${message.id}`);
        }
        case 'run': {
          if (!ready) ready = initBackend('wasm');
          await ready;
          const key = JSON.stringify(message.spec);
          if (key !== cacheKey) {
            cacheKey = key;
            dataCache = new Map();
          }
          let last = 0;
          // A holder, not a variable: the hook assigns it inside executeRun.
          const kept: { network?: MessagePassingNetwork; transforms?: FeatureTransforms } = {};
          const result = executeRun(message.spec, message.plan, {
            dataCache,
            ...(message.keepWeights ? { keepNetwork: (network: MessagePassingNetwork, transforms: FeatureTransforms) => Object.assign(kept, { network, transforms }) } : {}),
            onProgress: (p) => {
              const now = Date.now();
              if (now - last >= PROGRESS_INTERVAL_MS || p.step === p.totalSteps) {
                last = now;
                post({ type: 'progress', id: message.id, step: p.step, totalSteps: p.totalSteps, loss: p.loss });
              }
            },
          });
          let weights: TrainedWeights | undefined;
          const { network, transforms } = kept;
          if (network && transforms) {
            try {
              weights = await encodeNetworkWeights(network, transforms);
            } finally {
              network.dispose();
            }
          }
          post({ type: 'done', id: message.id, result, tensors: tf.memory().numTensors, ...(weights ? { weights } : {}) });
          return;
        }
      }
    } catch (error) {
      post({ type: 'error', id: 'id' in message ? message.id : null, message: error instanceof Error ? error.message : String(error) });
    }
  };
}
