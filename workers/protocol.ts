/**
 * The worker boundary: the same messages flow between the CLI and its
 * worker_threads and between the sheet and its Web Workers. Types only, plus
 * one test-hook constant.
 */
import type { ExperimentSpec } from '../src/experiment/spec.ts';
import type { RunPlan } from '../src/experiment/plan.ts';
import type { RunResult } from '../src/experiment/run.ts';
import type { BackendName, EngineInfo } from '../src/engine/backend.ts';
import type { TrainedWeights } from '../src/experiment/network-weights.ts';

export type ToWorker =
  | { type: 'init'; backend: BackendName; threads?: number; wasmPaths?: string | Record<string, string> }
  /** keepWeights: also send back the trained network's weights (saved networks). */
  | { type: 'run'; id: number; spec: ExperimentSpec; plan: RunPlan; keepWeights?: boolean }
  /** Test hook: make the worker throw while running this run (fault-handling tests). */
  | { type: 'crash'; id: number; how: 'throw' | 'exit' };

export type FromWorker =
  | ({ type: 'ready' } & EngineInfo)
  | { type: 'progress'; id: number; step: number; totalSteps: number; loss: number }
  | { type: 'done'; id: number; result: RunResult; tensors: number; weights?: TrainedWeights }
  | { type: 'error'; id: number | null; message: string };

/**
 * Test hook: the Web Worker `name` that makes workers/browser-worker.ts throw
 * while loading, before it can say `ready` (the pool's give-up test in real
 * Chromium). The sheet uses it only with `?fault=load` in the page address's
 * query, which neither a share link (after '#') nor a preset file can set.
 */
export const LOAD_FAULT_WORKER_NAME = 'farfield-run-load-fault';
