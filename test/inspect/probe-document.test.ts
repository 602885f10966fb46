/**
 * The probe document takes its runs from the run planner: the same run (index,
 * seed, arm) `farfield run` would train, so a probed network is the network
 * the experiment scored.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { initBackend } from '../../src/engine/backend.ts';
import { probeDocument } from '../../src/inspect/probe-document.ts';
import { planRuns } from '../../src/experiment/plan.ts';
import { executeRun } from '../../src/experiment/run.ts';
import { tinySpec } from '../helpers.ts';

beforeAll(async () => {
  await initBackend('wasm');
});

describe('probe document runs come from planRuns', () => {
  it('selected arms, the first N seeds (also past the spec count), each the planned run of that arm and seed', () => {
    const spec = tinySpec({ seeds: { count: 2, base: 3 } });
    const started: string[] = [];
    const doc = probeDocument(spec, { seeds: 3, arms: ['sum'], graphs: 2, onRunStart: ({ arm, seed }) => started.push(`${arm}/${seed}`) });
    expect(doc.seeds).toEqual([3, 4, 5]);
    expect(started).toEqual(['sum/3', 'sum/4', 'sum/5']);
    expect(doc.arms.map((a) => [a.arm, a.armIndex])).toEqual([['sum', 1]]);
    const runs = doc.arms[0]!.runs;
    expect(runs.map((r) => [r.seed, r.status])).toEqual([
      [3, 'ok'],
      [4, 'ok'],
      [5, 'ok'],
    ]);
    // The probed network is the planned run's network: same in-distribution score as executeRun on that plan entry.
    const planned = planRuns(spec).find((r) => r.arm === 'sum' && r.seed === 4)!;
    expect(planned.index).toBe(3);
    expect(runs[1]!.inDistribution).toEqual(executeRun(spec, planned).inDistribution);
  });
});
