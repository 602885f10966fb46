/**
 * The probe worker's boundary, types only: the sheet asks one Web Worker to
 * train each arm on the first seed, then probe, audit and trace it
 * (`probeDocument`), and the worker posts progress and the finished document.
 * Separate from protocol.ts so the run pool's messages stay as they are.
 */
import type { ExperimentSpec } from '../src/experiment/spec.ts';
import type { ProbeDocument } from '../src/inspect/probe-document.ts';

export type ToProbeWorker =
  | { type: 'init'; wasmPaths?: string | Record<string, string> }
  | { type: 'probe'; id: number; spec: ExperimentSpec; seeds: number; graphs?: number };

export type FromProbeWorker =
  | { type: 'ready'; backend: 'wasm' | 'cpu'; threads: number }
  /** An arm starts training on a seed; `index` of `total` (arms × seeds). */
  | { type: 'run-start'; id: number; arm: string; seed: number; index: number; total: number }
  | { type: 'progress'; id: number; arm: string; seed: number; step: number; totalSteps: number; loss: number }
  /** Training is over for this arm and seed; the probes, audit and trace are being computed. */
  | { type: 'probing'; id: number; arm: string; seed: number }
  | { type: 'done'; id: number; doc: ProbeDocument; ms: number }
  | { type: 'error'; id: number | null; message: string };
