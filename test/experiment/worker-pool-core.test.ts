/**
 * The worker pool's rules (src/experiment/worker-pool-core.ts), shared by the
 * CLI and the sheet, against scripted fake workers: no engine, no threads.
 * Ready, a worker that dies before it is ready (retried, then given up with the
 * reason), a worker that dies during a run (run failed, worker replaced), cancel
 * and a reported fault.
 */
import { describe, expect, it } from 'vitest';
import { planRuns } from '../../src/experiment/plan.ts';
import type { RunResult } from '../../src/experiment/run.ts';
import { unmeasuredResult } from '../../src/experiment/run-record.ts';
import type { EngineInfo } from '../../src/engine/backend.ts';
import type { FromWorker, ToWorker } from '../../workers/protocol.ts';
import { MAX_START_FAILURES, runPoolCore, type PoolWorker } from '../../src/experiment/worker-pool-core.ts';
import { tinySpec } from '../helpers.ts';

interface Fake {
  /** Which of the pool's workers this is (0 = first created). */
  serial: number;
  terminated: boolean;
  sent: ToWorker[];
}

type Script = (message: ToWorker, worker: Fake, reply: (m: FromWorker) => void, die: (reason: string) => void) => void;

function okResult(message: Extract<ToWorker, { type: 'run' }>): RunResult {
  return { ...unmeasuredResult(message.plan), stepsDone: 1, keptStep: 1, lossCurve: [1], parameters: 1 };
}

/** Fake workers that answer asynchronously, as real ones do; `terminate` settles a moment later. */
function fakeFactory(script: Script) {
  const created: Fake[] = [];
  const create = (): PoolWorker => {
    const fake: Fake = { serial: created.length, terminated: false, sent: [] };
    created.push(fake);
    let onMessage: (m: FromWorker) => void = () => {};
    let onDeath: (r: string) => void = () => {};
    return {
      send(message) {
        fake.sent.push(message);
        setTimeout(() => {
          if (fake.terminated) return;
          script(
            message,
            fake,
            (m) => !fake.terminated && onMessage(m),
            (r) => !fake.terminated && onDeath(r),
          );
        }, 1);
      },
      terminate() {
        fake.terminated = true;
        return new Promise<void>((resolve) => setTimeout(resolve, 5));
      },
      listen(m, d) {
        onMessage = m;
        onDeath = d;
      },
    };
  };
  return { create, created };
}

const init = { type: 'init', backend: 'wasm' } as const;
const engine: EngineInfo = { backend: 'wasm', threads: 1, simd: true };

const normal: Script = (message, _worker, reply) => {
  if (message.type === 'init') reply({ type: 'ready', ...engine });
  else if (message.type === 'run') {
    reply({ type: 'progress', id: message.id, step: 1, totalSteps: 2, loss: 0.5 });
    reply({ type: 'done', id: message.id, result: okResult(message), tensors: 0 });
  } else if (message.type === 'crash' && message.how === 'throw') {
    reply({ type: 'error', id: message.id, message: `deliberate fault injected into run ${message.id}` });
  }
};

describe('worker pool core', () => {
  const spec = tinySpec({ seeds: { count: 3, base: 1 } });
  const plans = planRuns(spec);

  it('sends init first, reports each ready, runs every plan once with its progress, in run order', async () => {
    const { create, created } = fakeFactory(normal);
    const ready: EngineInfo[] = [];
    const progress: Array<[number, number, number, number]> = [];
    const results = await runPoolCore(spec, plans, {
      workers: 2,
      createWorker: create,
      init,
      events: { onReady: (info) => ready.push(info), onProgress: (plan, step, total, loss) => progress.push([plan.index, step, total, loss]) },
    }).done;
    expect(plans.length).toBeGreaterThan(2);
    expect(results.map((r) => r.index)).toEqual(plans.map((p) => p.index));
    expect(results.every((r) => r.status === 'ok')).toBe(true);
    expect(ready).toEqual([engine, engine]);
    expect(progress.map((p) => p[0]).sort((a, b) => a - b)).toEqual(plans.map((p) => p.index));
    expect(progress.every(([, step, total, loss]) => step === 1 && total === 2 && loss === 0.5)).toBe(true);
    expect(created).toHaveLength(2);
    expect(created.every((w) => w.sent[0]?.type === 'init' && w.terminated)).toBe(true);
  });

  it('gives up after a bounded number of workers die before ready, failing every run with the reason', async () => {
    const stillborn: Script = (_message, _worker, _reply, die) => die('worker exited with code 1');
    const { create, created } = fakeFactory(stillborn);
    const onResult: RunResult[] = [];
    const results = await runPoolCore(spec, plans, { workers: 1, createWorker: create, init, events: { onResult: (r) => onResult.push(r) } }).done;
    expect(created).toHaveLength(MAX_START_FAILURES);
    expect(results).toHaveLength(plans.length);
    expect(onResult).toHaveLength(plans.length);
    for (const r of results) {
      expect(r.status).toBe('failed');
      expect(r.reason).toBe(`workers die before they are ready (${MAX_START_FAILURES} tries): worker exited with code 1`);
    }
  });

  it('honours maxStartFailures, and with several workers stops replacing them once it gives up', async () => {
    const stillborn: Script = (_message, _worker, _reply, die) => die('worker crashed: cannot load');
    const { create, created } = fakeFactory(stillborn);
    const results = await runPoolCore(spec, plans, { workers: 2, createWorker: create, init, maxStartFailures: 5 }).done;
    // Five deaths give up; the worker that was already starting (the sixth) dies too and is not replaced.
    expect(created.length).toBe(6);
    expect(results.every((r) => r.status === 'failed' && /\(5 tries\): worker crashed: cannot load/.test(r.reason ?? ''))).toBe(true);
  });

  it('retries a worker that dies before ready and then runs everything', async () => {
    const flaky: Script = (message, worker, reply, die) => {
      if (worker.serial === 0) die('worker exited with code 1');
      else normal(message, worker, reply, die);
    };
    const { create, created } = fakeFactory(flaky);
    const results = await runPoolCore(spec, plans, { workers: 1, createWorker: create, init }).done;
    expect(created).toHaveLength(2);
    expect(results.map((r) => r.status)).toEqual(plans.map(() => 'ok'));
  });

  it('a worker that dies during a run fails that run and is replaced; the others finish', async () => {
    const dying: Script = (message, worker, reply, die) => {
      if (message.type === 'crash' && message.how === 'exit') die('worker exited with code 3');
      else normal(message, worker, reply, die);
    };
    const { create, created } = fakeFactory(dying);
    const results = await runPoolCore(spec, plans, { workers: 2, createWorker: create, init, faults: new Map([[2, 'exit' as const]]) }).done;
    expect(results.map((r) => r.index)).toEqual(plans.map((p) => p.index));
    expect(results[2]).toMatchObject({ status: 'failed', reason: 'worker exited with code 3', stepsDone: 0 });
    expect(results.filter((r) => r.status === 'ok')).toHaveLength(plans.length - 1);
    expect(created).toHaveLength(3);
  });

  it('a fault the worker reports fails only its run, with the message, and the worker carries on', async () => {
    const { create, created } = fakeFactory(normal);
    const results = await runPoolCore(spec, plans, { workers: 1, createWorker: create, init, faults: new Map([[1, 'throw' as const]]) }).done;
    expect(results[1]).toMatchObject({ status: 'failed', reason: 'worker error: deliberate fault injected into run 1' });
    expect(results.filter((r) => r.status === 'ok')).toHaveLength(plans.length - 1);
    expect(created).toHaveLength(1);
  });

  it('an engine that cannot start gives up at once with its message', async () => {
    const broken: Script = (message, _worker, reply) => {
      if (message.type === 'init') reply({ type: 'error', id: null, message: 'no WASM here' });
    };
    const { create, created } = fakeFactory(broken);
    const results = await runPoolCore(spec, plans, { workers: 1, createWorker: create, init }).done;
    expect(created).toHaveLength(1);
    expect(results.every((r) => r.status === 'failed' && r.reason === 'the worker could not start the engine: no WASM here')).toBe(true);
  });

  it('a host that cannot create workers fails every run with the reason', async () => {
    const results = await runPoolCore(spec, plans, {
      workers: 2,
      createWorker: () => {
        throw new Error('Worker is not defined');
      },
      init,
    }).done;
    expect(results).toHaveLength(plans.length);
    expect(results.every((r) => r.status === 'failed' && r.reason === 'could not start a worker: Worker is not defined')).toBe(true);
  });

  it('cancel terminates every worker, waits for them, settles done and records nothing more', async () => {
    const slow: Script = (message, _worker, reply) => {
      if (message.type === 'init') reply({ type: 'ready', ...engine });
      // 'run' never answers: the runs are in flight until cancelled.
    };
    const { create, created } = fakeFactory(slow);
    const onResult: RunResult[] = [];
    const pool = runPoolCore(spec, plans, { workers: 2, createWorker: create, init, events: { onResult: (r) => onResult.push(r) } });
    await new Promise((r) => setTimeout(r, 20));
    expect(created.every((w) => w.sent.some((m) => m.type === 'run'))).toBe(true);
    await pool.cancel();
    expect(created.every((w) => w.terminated)).toBe(true);
    expect(await pool.done).toEqual([]);
    expect(onResult).toEqual([]);
    expect(created).toHaveLength(2);
  });

  it('an empty plan settles at once without starting a worker', async () => {
    const { create, created } = fakeFactory(normal);
    expect(await runPoolCore(spec, [], { workers: 2, createWorker: create, init }).done).toEqual([]);
    expect(created).toHaveLength(0);
  });
});
