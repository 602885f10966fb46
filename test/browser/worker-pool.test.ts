/**
 * The browser pool's bookkeeping with scripted fake workers (no browser, no
 * engine): every run ends in exactly one result, a worker that reports an
 * error or dies fails only its own run, a dead worker is replaced, cancel
 * stops everything at once.
 */
import { describe, expect, it } from 'vitest';
import { planRuns } from '../../src/experiment/plan.ts';
import type { RunResult } from '../../src/experiment/run.ts';
import { unmeasuredResult } from '../../src/experiment/run-record.ts';
import type { FromWorker, ToWorker } from '../../workers/protocol.ts';
import { runWorkerPool, type PoolWorker } from '../../src/ui/worker-pool.ts';
import { tinySpec } from '../helpers.ts';

type Script = (message: ToWorker, reply: (m: FromWorker) => void, die: (reason: string) => void) => void;

function okResult(message: Extract<ToWorker, { type: 'run' }>): RunResult {
  return { ...unmeasuredResult(message.plan), stepsDone: 1, keptStep: 1, lossCurve: [1], parameters: 1 };
}

/** A fake worker that answers asynchronously, as a real one does. */
function fakeFactory(script: Script) {
  const created: Array<{ terminated: boolean }> = [];
  const create = (): PoolWorker => {
    const record = { terminated: false };
    created.push(record);
    let onMessage: (m: FromWorker) => void = () => {};
    let onDeath: (r: string) => void = () => {};
    return {
      send(message) {
        setTimeout(() => {
          if (record.terminated) return;
          script(message, (m) => !record.terminated && onMessage(m), (r) => !record.terminated && onDeath(r));
        }, 1);
      },
      terminate() {
        record.terminated = true;
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

const normal: Script = (message, reply) => {
  if (message.type === 'init') reply({ type: 'ready', backend: 'wasm', threads: 1, simd: true });
  else if (message.type === 'run') {
    reply({ type: 'progress', id: message.id, step: 1, totalSteps: 1, loss: 0.5 });
    reply({ type: 'done', id: message.id, result: okResult(message), tensors: 0 });
  } else if (message.type === 'crash') {
    if (message.how === 'throw') reply({ type: 'error', id: message.id, message: `deliberate fault injected into run ${message.id}` });
  }
};

describe('browser worker pool', () => {
  const spec = tinySpec({ seeds: { count: 3, base: 1 } });
  const plans = planRuns(spec);

  it('runs every plan once and reports results in run order', async () => {
    const { create, created } = fakeFactory(normal);
    const started: number[] = [];
    const results = await runWorkerPool(spec, plans, { workers: 2, createWorker: create, init, events: { onStart: (p) => started.push(p.index) } }).done;
    expect(results.map((r) => r.index)).toEqual(plans.map((p) => p.index));
    expect(results.every((r) => r.status === 'ok')).toBe(true);
    expect([...started].sort()).toEqual(plans.map((p) => p.index));
    expect(created).toHaveLength(2);
    expect(created.every((w) => w.terminated)).toBe(true);
  });

  it('fails only the run whose worker throws or dies, and replaces a dead worker', async () => {
    const dying: Script = (message, reply, die) => {
      if (message.type === 'crash' && message.how === 'exit') die('worker crashed: deliberate worker death');
      else normal(message, reply, die);
    };
    const { create, created } = fakeFactory(dying);
    const faults = new Map([
      [1, 'throw' as const],
      [3, 'exit' as const],
    ]);
    const results = await runWorkerPool(spec, plans, { workers: 2, createWorker: create, init, faults }).done;
    expect(results).toHaveLength(plans.length);
    expect(results[1]!.status).toBe('failed');
    expect(results[1]!.reason).toMatch(/deliberate fault injected into run 1/);
    expect(results[3]!.status).toBe('failed');
    expect(results[3]!.reason).toMatch(/worker crashed/);
    expect(results.filter((r) => r.status === 'ok')).toHaveLength(plans.length - 2);
    expect(created.length).toBe(3);
  });

  it('fails the queue with the reason when workers cannot start', async () => {
    const broken: Script = (message, reply) => {
      if (message.type === 'init') reply({ type: 'error', id: null, message: 'no WASM here' });
    };
    const { create } = fakeFactory(broken);
    const results = await runWorkerPool(spec, plans, { workers: 2, createWorker: create, init }).done;
    expect(results).toHaveLength(plans.length);
    expect(results.every((r) => r.status === 'failed' && /no WASM here/.test(r.reason ?? ''))).toBe(true);
  });

  it('gives up on workers that die before starting instead of respawning forever', async () => {
    const stillborn: Script = (_message, _reply, die) => die('worker crashed: script failed to load');
    const { create, created } = fakeFactory(stillborn);
    const results = await runWorkerPool(spec, plans, { workers: 2, createWorker: create, init }).done;
    expect(results.every((r) => r.status === 'failed')).toBe(true);
    expect(created.length).toBeLessThanOrEqual(4);
  });

  it('cancel terminates every worker at once and records nothing more', async () => {
    const slow: Script = (message, reply) => {
      if (message.type === 'init') reply({ type: 'ready', backend: 'wasm', threads: 1, simd: true });
      // 'run' never answers: the runs are "in flight" until cancelled.
    };
    const { create, created } = fakeFactory(slow);
    const onResult: RunResult[] = [];
    const pool = runWorkerPool(spec, plans, { workers: 2, createWorker: create, init, events: { onResult: (r) => onResult.push(r) } });
    await new Promise((r) => setTimeout(r, 20));
    pool.cancel();
    const results = await pool.done;
    expect(results).toEqual([]);
    expect(onResult).toEqual([]);
    expect(created.every((w) => w.terminated)).toBe(true);
  });
});
