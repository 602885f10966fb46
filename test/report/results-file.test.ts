/**
 * Reading a results file for the report: JSON turns NaN and ±Infinity into
 * null, and reading them back must give the same statistics and fingerprint;
 * a file whose fingerprint disagrees with its runs is flagged; bad fields are
 * named.
 */
import { describe, expect, it } from 'vitest';
import { buildResults, type EngineInfo } from '../../src/experiment/results.ts';
import { planRuns } from '../../src/experiment/plan.ts';
import { unmeasuredResult } from '../../src/experiment/run-record.ts';
import type { RunResult } from '../../src/experiment/run-types.ts';
import { readResultsText, ResultsFileError } from '../../src/report/results-file.ts';
import { tinySpec } from '../helpers.ts';

const engine: EngineInfo = { name: 'farfield', version: '0.2.0', backend: 'wasm', threads: 1, host: 'node' };
const spec = tinySpec();

/** Made-up runs: one diverged, one with a non-finite error at a rung, the rest finished. */
function runs(): RunResult[] {
  return planRuns(spec).map((plan, i) => {
    if (i === 1) return { ...unmeasuredResult(plan, 'diverged', 'loss is NaN'), divergedAt: 12, lastFiniteLoss: 3.5 };
    const metrics = (x: number) => ({ mae: x, mre: x / 10, miss: 0.5, nodes: 40 });
    return {
      ...unmeasuredResult(plan),
      stepsDone: 20,
      keptStep: 20,
      lossCurve: [2, 1.5, NaN],
      inDistribution: metrics(0.1 + i / 100),
      ladder: spec.test.sizes.map((size, k) => ({
        family: 'er',
        size,
        scale: 1,
        metrics: i === 2 && k === 1 ? { mae: Infinity, mre: NaN, miss: 1, nodes: 40 } : metrics(0.2 * (k + 1) + i / 50),
        depthMean: 3,
        depthMax: 5,
        meanDegree: 2.5,
      })),
    };
  });
}

describe('results files for the report', () => {
  const doc = buildResults(spec, runs(), engine);
  const text = JSON.stringify(doc, null, 1);

  it('reads back non-finite values as NaN with the same verdicts, and verifies the fingerprint (non-finite counts as null in it)', () => {
    expect(text).toContain('"mae": null');
    const read = readResultsText(text, 'results.json');
    expect(read).toMatchObject({ fingerprintMismatch: null, fingerprintUnverified: false });
    expect(read.doc.fingerprint).toBe(doc.fingerprint);
    expect(read.doc.comparison.rungs.map((r) => r.pairs.map((p) => [p.verdict.kind, p.verdict.n]))).toEqual(
      doc.comparison.rungs.map((r) => r.pairs.map((p) => [p.verdict.kind, p.verdict.n])),
    );
  });

  it('keeps, marked unverified, a fingerprint an older engine took over non-finite values that JSON cannot tell apart', () => {
    const older = { ...doc, fingerprint: '0123456789ab' };
    const read = readResultsText(JSON.stringify(older), 'results.json');
    expect(read).toMatchObject({ fingerprintMismatch: null, fingerprintUnverified: true });
    expect(read.doc.fingerprint).toBe('0123456789ab');
  });

  it('flags a fingerprint that finite runs do not give, and shows the recomputed one', () => {
    const finite = buildResults(spec, runs().filter((r) => r.index !== 2), engine);
    const finiteText = JSON.stringify(finite);
    expect(readResultsText(finiteText, 'results.json')).toMatchObject({ fingerprintMismatch: null, fingerprintUnverified: false, doc: { fingerprint: finite.fingerprint } });
    const read = readResultsText(finiteText.replace(`"fingerprint":"${finite.fingerprint}"`, '"fingerprint":"000000000000"'), 'results.json');
    expect(read).toMatchObject({ fingerprintMismatch: '000000000000', fingerprintUnverified: false });
    expect(read.doc.fingerprint).toBe(finite.fingerprint);
  });

  it('names the field and what is allowed', () => {
    const bad = (change: (d: Record<string, unknown> & { runs: Array<Record<string, unknown>> }) => void) => {
      const d = JSON.parse(text);
      change(d);
      return () => readResultsText(JSON.stringify(d), 'r.json');
    };
    expect(bad((d) => (d.runs[0]!.seed = 'three'))).toThrow(/^r\.json: runs\[0\]\.seed: got "three", expected number$/);
    expect(bad((d) => (d.runs[2]!.arm = 'mean'))).toThrow(/runs\[2\]\.arm: got "mean" \(arm 0\), not an arm of the spec \(max, sum\)/);
    expect(bad((d) => ((d.spec as { test: { sizes: number[] } }).test.sizes = [5000]))).toThrow(/spec\.test\.sizes\[0\]: got 5000, allowed at most 512/);
    expect(bad((d) => (d.kind = 'something'))).toThrow(ResultsFileError);
    expect(() => readResultsText('{"kind": "farfield-results",', 'r.json')).toThrow(/^r\.json:1:\d+: /);
  });
});
