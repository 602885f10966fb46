/**
 * Long-run leak check: train a small model with the real trainer for many
 * steps (validation and best-weight snapshots included) on the WASM backend
 * and compare live tensors, the JS heap and the backend's bytes early and late.
 */
import * as tf from '@tensorflow/tfjs-core';
import { initBackend } from '../src/engine/backend.ts';
import { modelSchema } from '../src/experiment/spec.ts';
import { MessagePassingNetwork } from '../src/model/network.ts';
import { buildInstance } from '../src/tasks/sample.ts';
import type { TaskInstance } from '../src/tasks/types.ts';
import type { FeatureTransforms } from '../src/train/batch.ts';
import { train } from '../src/train/trainer.ts';
import { Rng } from '../src/util/rng.ts';
import { collectGarbage, MB } from './measure.ts';

export interface LongRunReport {
  steps: number;
  /** Live tensors (engine-wide) before the network is created and after it is disposed: must be equal. */
  tensorsBefore: number;
  tensorsAfter: number;
  /** Live tensors inside training at the early mark and at the last step: equal unless a step leaks. */
  tensorsAtEarlyStep: number;
  tensorsAtLastStep: number;
  /** JS heap used (after a forced GC) at the early mark and at the last step. */
  heapBeforeMB: number;
  heapAfterMB: number;
  /** Bytes held by the backend (tf.memory().numBytes) at the same two points. */
  backendBytesBefore: number;
  backendBytesAfter: number;
  /** The step the "before" numbers were taken at (after warm-up). */
  earlyStep: number;
  stepsPerSecond: number;
  status: string;
  model: string;
}

const TRANSFORMS: FeatureTransforms = { node: ['identity'], edge: ['identity'], nodeStats: [], edgeStats: [] };

function graphs(rng: Rng, count: number): TaskInstance[] {
  return Array.from({ length: count }, (_, i) => {
    const r = rng.fork(i);
    return buildInstance('shortest-path', 'er', r.int(6, 10), r).instance;
  });
}

export async function longRun(steps: number): Promise<LongRunReport> {
  await initBackend('wasm');
  const rng = new Rng(11);
  const trainSet = graphs(rng.fork('train'), 64);
  const validation = graphs(rng.fork('validation'), 8);
  // Max aggregation exercises the arg-max kernels; the node rule varies the unroll length per batch.
  const model = modelSchema.parse({ hidden: 16, aggregator: 'max', steps: { rule: 'nodes', trainJitter: 2 } });
  const earlyStep = Math.max(1, Math.min(100, Math.floor(steps / 10)));
  collectGarbage();
  const tensorsBefore = tf.memory().numTensors;
  const network = new MessagePassingNetwork(model, 1, 1, rng.fork('model'));
  const heapMB = () => {
    collectGarbage();
    return process.memoryUsage().heapUsed / MB;
  };
  const early = { tensors: 0, heap: 0, bytes: 0, at: 0 };
  const late = { tensors: 0, heap: 0, bytes: 0, at: 0 };
  let status = 'ok';
  try {
    const outcome = train({
      network,
      train: trainSet,
      validation,
      transforms: TRANSFORMS,
      budget: { steps, batchGraphs: 8, learningRate: 0.003, clipNorm: 1, loss: 'huber', validateEvery: 100 },
      rng: rng.fork('training'),
      onProgress: ({ step }) => {
        if (step !== earlyStep && step !== steps) return;
        const mark = step === earlyStep ? early : late;
        const now = performance.now();
        mark.tensors = tf.memory().numTensors;
        mark.bytes = tf.memory().numBytes;
        mark.heap = heapMB();
        // The timed stretch excludes both forced collections.
        mark.at = mark === early ? performance.now() : now;
      },
    });
    status = outcome.status === 'ok' ? 'ok' : `${outcome.status} at step ${outcome.divergedAt}: ${outcome.divergedReason}`;
  } finally {
    network.dispose();
  }
  collectGarbage();
  const tensorsAfter = tf.memory().numTensors;
  const timed = steps - earlyStep;
  return {
    steps,
    tensorsBefore,
    tensorsAfter,
    tensorsAtEarlyStep: early.tensors,
    tensorsAtLastStep: late.tensors,
    heapBeforeMB: early.heap,
    heapAfterMB: late.heap,
    backendBytesBefore: early.bytes,
    backendBytesAfter: late.bytes,
    earlyStep,
    stepsPerSecond: timed > 0 && late.at > early.at ? timed / ((late.at - early.at) / 1000) : NaN,
    status,
    model: 'hidden 16, max aggregator, steps = nodes (+0..2 in training), batches of 8 shortest-path er graphs of 6-10 nodes, validation every 100 steps',
  };
}
