/**
 * Starts and stops the probe worker for <ff-probes>: one Web Worker per
 * "Probe the networks", which trains each arm on the first seed and returns the
 * ProbeDocument (probes, audit, alignment trace). Stop terminates the worker
 * (probeDocument is synchronous inside it, so a message could not reach it).
 */
import type { ReactiveController, ReactiveControllerHost } from 'lit';
import type { ExperimentSpec } from '../experiment/spec.ts';
import type { ProbeDocument } from '../inspect/probe-document.ts';
import type { FromProbeWorker, ToProbeWorker } from '../../workers/probe-protocol.ts';
import { wasmPaths } from './wasm-paths.ts';

export type ProbeState = 'idle' | 'running' | 'done' | 'stopped' | 'error';

export interface ProbeProgress {
  /** What the worker is doing now, in words. */
  phase: 'starting' | 'training' | 'probing';
  arm: string;
  seed: number;
  /** Arm-and-seed index (0-based) of `total`. */
  index: number;
  total: number;
  step: number;
  totalSteps: number;
  /** Overall fraction done, 0–1 (probing counts as the last tenth of each arm). */
  fraction: number;
}

/** Creates the worker; tests of the controller may pass their own. */
export type ProbeWorkerFactory = () => Worker;

const defaultFactory: ProbeWorkerFactory = () => new Worker(new URL('../../workers/probe-worker.ts', import.meta.url), { type: 'module', name: 'farfield-probe' });

export class ProbeController implements ReactiveController {
  state: ProbeState = 'idle';
  progress: ProbeProgress | null = null;
  doc: ProbeDocument | null = null;
  error: string | null = null;
  /** Wall time of the last finished probe, ms. */
  ms = 0;
  private worker: Worker | null = null;
  private id = 0;

  constructor(
    private readonly host: ReactiveControllerHost,
    private readonly factory: ProbeWorkerFactory = defaultFactory,
  ) {
    host.addController(this);
  }

  hostDisconnected(): void {
    this.kill();
  }

  /** Train, probe, audit and trace `spec`'s arms on its first `seeds` seed(s), off the main thread. */
  start(spec: ExperimentSpec, seeds = 1): void {
    this.kill();
    const id = ++this.id;
    this.state = 'running';
    this.doc = null;
    this.error = null;
    this.progress = { phase: 'starting', arm: spec.arms[0]?.name ?? '', seed: spec.seeds.base, index: 0, total: spec.arms.length * seeds, step: 0, totalSteps: spec.budget.steps, fraction: 0 };
    let worker: Worker;
    try {
      worker = this.factory();
    } catch (error) {
      this.fail(error instanceof Error ? error.message : String(error));
      return;
    }
    this.worker = worker;
    const send = (message: ToProbeWorker) => worker.postMessage(message);
    worker.addEventListener('message', (event: MessageEvent<FromProbeWorker>) => {
      if (id !== this.id) return;
      this.receive(event.data);
    });
    worker.addEventListener('error', (event: ErrorEvent) => {
      event.preventDefault();
      if (id === this.id) this.fail(`the probe worker crashed: ${event.message || 'its script failed to load'}`);
    });
    send({ type: 'init', wasmPaths: wasmPaths() });
    send({ type: 'probe', id, spec, seeds });
    this.host.requestUpdate();
  }

  /** Stop at once: the worker is terminated, whatever it was doing. */
  stop(): void {
    if (this.state !== 'running') return;
    this.kill();
    this.state = 'stopped';
    this.progress = null;
    this.host.requestUpdate();
  }

  private receive(message: FromProbeWorker): void {
    const p = this.progress;
    switch (message.type) {
      case 'ready':
        return;
      case 'run-start':
        this.progress = { phase: 'training', arm: message.arm, seed: message.seed, index: message.index, total: message.total, step: 0, totalSteps: p?.totalSteps ?? 0, fraction: message.index / message.total };
        break;
      case 'progress':
        if (p) {
          const within = message.totalSteps ? (0.9 * message.step) / message.totalSteps : 0;
          this.progress = { ...p, phase: 'training', step: message.step, totalSteps: message.totalSteps, fraction: (p.index + within) / p.total };
        }
        break;
      case 'probing':
        if (p) this.progress = { ...p, phase: 'probing', fraction: (p.index + 0.9) / p.total };
        break;
      case 'done':
        this.kill();
        this.doc = message.doc;
        this.ms = message.ms;
        this.state = 'done';
        this.progress = null;
        break;
      case 'error':
        this.fail(message.message);
        return;
    }
    this.host.requestUpdate();
  }

  private fail(message: string): void {
    this.kill();
    this.state = 'error';
    this.error = message;
    this.progress = null;
    this.host.requestUpdate();
  }

  private kill(): void {
    this.id++;
    this.worker?.terminate();
    this.worker = null;
  }
}
