/**
 * When the network's process phase may run as the fused kernels of
 * src/engine/kernels-process.ts, and the call that runs it. The fused kernels
 * give the stock composition's bits, so the choice only changes speed; where
 * any part of that argument does not hold (another backend, no SIMD module,
 * the stock matmul, or anything per-step a caller watches) the stock
 * composition runs.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { BackendWasm } from '@tensorflow/tfjs-backend-wasm';
import type { ModelOptions } from './options.ts';
import { fusedProcessEnabled, processSteps, type ProcessAggregator, type ProcessInputs, type ProcessMessage } from '../engine/kernels-process.ts';
import { isWasmMatMulPatched } from '../engine/kernels-matmul.ts';
import { simdKernels } from '../engine/simd/simd-kernels.ts';

const FUSED_AGGREGATORS: ReadonlySet<string> = new Set<ProcessAggregator>(['sum', 'mean', 'max', 'min', 'smooth-max', 'smooth-min']);
const FUSED_MESSAGES: ReadonlySet<string> = new Set<ProcessMessage>(['mlp', 'min-plus', 'max-plus', 'smooth-min-plus', 'smooth-max-plus']);

export interface ProcessWatchers {
  trace?: boolean;
  stopTolerance?: number;
  onStep?: unknown;
}

export function fusedProcessApplies(options: ModelOptions, watchers: ProcessWatchers, nodes: number, edges: number, steps: number): boolean {
  if (!fusedProcessEnabled() || !FUSED_MESSAGES.has(options.message) || options.update !== 'mlp') return false;
  if (!FUSED_AGGREGATORS.has(options.aggregator)) return false;
  if (options.activation !== 'relu' && options.activation !== 'leaky-relu') return false;
  if (watchers.trace || watchers.stopTolerance !== undefined || watchers.onStep !== undefined) return false;
  if (steps < 1 || nodes < 1 || edges < 1) return false;
  if (tf.getBackend() !== 'wasm' || !isWasmMatMulPatched()) return false;
  if (simdKernels(tf.backend() as unknown as BackendWasm) == null) return false;
  return true;
}

export function runFusedProcess(options: ModelOptions, inputs: ProcessInputs, steps: number): tf.Tensor2D {
  return processSteps(inputs, {
    steps,
    message: options.message,
    messageTemperature: options.messageTemperature,
    aggregator: options.aggregator as ProcessAggregator,
    temperature: options.aggregatorTemperature,
    activation: options.activation as 'relu' | 'leaky-relu',
  });
}
