/** The CLI's progress line promises no ETA before a run has finished (an early guess said 1966 s for a 20 s run). */
import { describe, expect, it } from 'vitest';
import { ProgressLine } from '../../src/cli/progress.ts';
import { planRuns } from '../../src/experiment/plan.ts';
import { unmeasuredResult } from '../../src/experiment/run-record.ts';
import { tinySpec } from '../helpers.ts';

function fakeTty() {
  const written: string[] = [];
  const stream = { isTTY: true, columns: 400, write: (s: string) => (written.push(s), true) } as unknown as NodeJS.WriteStream;
  return { stream, written };
}

describe('ProgressLine', () => {
  it('shows no ETA until the first run has finished, then a number', () => {
    const plans = planRuns(tinySpec());
    const { stream, written } = fakeTty();
    const line = new ProgressLine(plans.length, stream);
    line.start(plans[0]!);
    line.progress(plans[0]!, 5, 20, 1.5);
    const before = written.join('');
    expect(before).toMatch(/ETA after the first run/);
    expect(before).not.toMatch(/ETA \d/);
    line.result(unmeasuredResult(plans[0]!));
    expect(written.join('').slice(before.length)).toMatch(/ETA \d+ s/);
  });
});
