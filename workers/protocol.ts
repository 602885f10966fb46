/**
 * The worker boundary, types only: the same messages flow between the CLI and
 * its worker_threads and between the sheet and its Web Workers.
 */
import type { ExperimentSpec } from '../src/experiment/spec.ts';
import type { RunPlan } from '../src/experiment/plan.ts';
import type { RunResult } from '../src/experiment/run.ts';
import type { BackendName, EngineInfo } from '../src/engine/backend.ts';

export type ToWorker =
  | { type: 'init'; backend: BackendName; threads?: number; wasmPaths?: string | Record<string, string> }
  | { type: 'run'; id: number; spec: ExperimentSpec; plan: RunPlan }
  /** Test hook: make the worker throw while running this run (fault-handling tests). */
  | { type: 'crash'; id: number; how: 'throw' | 'exit' };

export type FromWorker =
  | ({ type: 'ready' } & EngineInfo)
  | { type: 'progress'; id: number; step: number; totalSteps: number; loss: number }
  | { type: 'done'; id: number; result: RunResult; tensors: number }
  | { type: 'error'; id: number | null; message: string };
