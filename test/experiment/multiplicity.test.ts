import { describe, expect, it } from 'vitest';
import { Rng } from '../../src/util/rng.ts';
import { bonferroniAdjust, holmAdjust } from '../../src/experiment/multiplicity.ts';

/** Element-wise |got - want| <= 1e-15 * max(want, 1e-300): agreement to about the last few bits. */
function expectCloseAll(got: readonly number[], want: readonly number[]): void {
  expect(got.length).toBe(want.length);
  for (let i = 0; i < want.length; i++) {
    expect(Math.abs(got[i]! - want[i]!), `index ${i}: got ${got[i]}, want ${want[i]}`).toBeLessThanOrEqual(1e-15 * Math.max(want[i]!, 1e-300));
  }
}

describe('Holm adjustment against published values', () => {
  // Source for the next three tests: statsmodels, statsmodels/stats/tests/test_multi.py (github.com/statsmodels/
  // statsmodels, file version 0123770f843f5d1f20912249ee2510ffad2fbed1). Its module docstring says the 'h' (Holm)
  // and 'b' (Bonferroni) columns "are tested against R:multtest" (mt.rawp2adjp), whose output rows are sorted by
  // the raw p-value; the tables are res_multtest1, res_multtest2 and res_multtest3 (columns rawp, Bonferroni,
  // Holm, ...). Below, the inputs are given in statsmodels' pval0 order (or shuffled) and the expected values are
  // the table rows mapped back to that order, since our functions return the input order.

  it('ten p-values (statsmodels res_multtest1, from R multtest), unsorted input', () => {
    const pval0 = [
      0.838541367553, 0.642193923795, 0.680845947633, 0.967833824309, 0.71626938238, 0.177096952723,
      5.23656777208e-5, 0.0202732688798, 0.00028140506198, 0.0149877310796,
    ];
    // Table rows (rawp -> Holm): 5.23656777208e-5 -> 5.2365677720800005e-4, 2.8140506198e-4 -> 2.5326455578199999e-3,
    // 0.0149877310796 -> 0.11990184863680001, 0.0202732688798 -> 0.14191288215860001, all larger ones -> 1.
    expectCloseAll(holmAdjust(pval0), [1, 1, 1, 1, 1, 1, 5.2365677720800005e-4, 0.14191288215860001, 2.5326455578199999e-3, 0.11990184863680001]);
    // Bonferroni column: 10 * p capped at 1.
    expectCloseAll(bonferroniAdjust(pval0), [1, 1, 1, 1, 1, 1, 5.2365677720800005e-4, 0.20273268879799999, 2.8140506197999998e-3, 0.149877310796]);
  });

  it('six small p-values where the running maximum matters (statsmodels res_multtest2)', () => {
    // rawp 0.002 .. 0.012; Holm 0.012, 0.02, 0.024, 0.024, 0.024, 0.024 (3 * 0.008 = 0.024, then 2 * 0.01 = 0.02
    // and 0.012 are lifted to 0.024 by the running maximum); Bonferroni 6 * p.
    const raw = [0.002, 0.004, 0.006, 0.008, 0.01, 0.012];
    expectCloseAll(holmAdjust(raw), [0.012, 0.02, 0.024, 0.024, 0.024, 0.024]);
    expectCloseAll(bonferroniAdjust(raw), [0.012, 0.024, 0.036, 0.048, 0.06, 0.072]);
    // Reversed input order gives the same values, reversed.
    expectCloseAll(holmAdjust([...raw].reverse()), [0.024, 0.024, 0.024, 0.024, 0.02, 0.012]);
  });

  it('ten p-values with a gap (statsmodels res_multtest3), shuffled input', () => {
    // rawp 0.001 .. 0.005, 0.05 .. 0.09; Holm 0.01, 0.018, 0.024, 0.028, 0.03, then 0.25 for the last five.
    const raw = [0.001, 0.002, 0.003, 0.004, 0.005, 0.05, 0.06, 0.07, 0.08, 0.09];
    const holm = [0.01, 0.018, 0.024, 0.028, 0.03, 0.25, 0.25, 0.25, 0.25, 0.25];
    const perm = [7, 2, 9, 0, 5, 3, 8, 1, 6, 4];
    expectCloseAll(holmAdjust(perm.map((i) => raw[i]!)), perm.map((i) => holm[i]!));
  });

  it('the four-hypothesis worked example: reject H1 and H4 at alpha = 0.05', () => {
    // Source: Wikipedia, "Holm–Bonferroni method", worked example (also reproduced by GeeksforGeeks,
    // "Holm-Bonferroni Method"): unadjusted p = 0.01, 0.04, 0.03, 0.005 (H1..H4), alpha = 0.05. 0.005 < 0.05/4 and
    // 0.01 < 0.05/3 are rejected; 0.03 is not < 0.05/2, so testing stops: H1 and H4 rejected, H2 and H3 not.
    // Adjusted values (hand-worked from the same steps): 4*0.005 = 0.02, 3*0.01 = 0.03, 2*0.03 = 0.06,
    // max(0.06, 1*0.04) = 0.06.
    const adjusted = holmAdjust([0.01, 0.04, 0.03, 0.005]);
    expectCloseAll(adjusted, [0.03, 0.06, 0.06, 0.02]);
    expect(adjusted.map((p) => p <= 0.05)).toEqual([true, false, false, true]);
    // Bonferroni (4p = 0.04, 0.16, 0.12, 0.02) happens to reject the same two here.
    expect(bonferroniAdjust([0.01, 0.04, 0.03, 0.005]).map((p) => p <= 0.05)).toEqual([true, false, false, true]);
  });
});

describe('Holm adjustment: rules and edge cases', () => {
  it('equals the sequential step-down decision at every alpha, and is bracketed by raw p and Bonferroni', () => {
    // Independent check: the textbook sequential procedure (sort, compare p(k) with alpha / (m - k + 1), stop at
    // the first failure) must reject exactly the tests with adjusted p <= alpha.
    const rng = new Rng(1979);
    for (let trial = 0; trial < 200; trial++) {
      const m = rng.int(1, 12);
      const p = Array.from({ length: m }, () => (rng.next() < 0.2 ? rng.int(0, 4) / 100 : rng.next() * 0.2));
      const adj = holmAdjust(p);
      const bon = bonferroniAdjust(p);
      for (let i = 0; i < m; i++) {
        expect(adj[i]!).toBeGreaterThanOrEqual(p[i]!);
        expect(adj[i]!).toBeLessThanOrEqual(bon[i]!);
        for (let j = 0; j < m; j++) if (p[i]! <= p[j]!) expect(adj[i]!).toBeLessThanOrEqual(adj[j]!);
      }
      for (const alpha of [0.01, 0.05, 0.1]) {
        const order = p.map((_, i) => i).sort((i, j) => p[i]! - p[j]!);
        const rejected = new Array<boolean>(m).fill(false);
        for (let k = 0; k < m; k++) {
          // p(k) <= alpha / (m - k + 1), written as a product so boundary cases round as in the adjustment.
          if ((m - k) * p[order[k]!]! <= alpha) rejected[order[k]!] = true;
          else break;
        }
        expect(adj.map((x) => x <= alpha), `trial ${trial} alpha ${alpha} p ${p.join(',')}`).toEqual(rejected);
      }
    }
  });

  it('ties, a single test, zeros and ones, and the cap at 1', () => {
    expectCloseAll(holmAdjust([0.01, 0.01]), [0.02, 0.02]); // hand-worked: 2*0.01, then max(0.02, 0.01)
    expect(holmAdjust([0.3])).toEqual([0.3]);
    expect(holmAdjust([0, 1, 0])).toEqual([0, 1, 0]);
    expect(holmAdjust([0.4, 0.5, 0.6])).toEqual([1, 1, 1]); // 3 * 0.4 = 1.2 -> 1
    expect(bonferroniAdjust([0.4, 0.1])).toEqual([0.8, 0.2]);
    expect(holmAdjust([])).toEqual([]);
    expect(bonferroniAdjust([])).toEqual([]);
  });

  it('does not modify its input', () => {
    const p = [0.04, 0.01, 0.03];
    holmAdjust(p);
    bonferroniAdjust(p);
    expect(p).toEqual([0.04, 0.01, 0.03]);
  });

  it('throws on NaN and values outside [0, 1]', () => {
    expect(() => holmAdjust([0.1, NaN])).toThrow(/pValues\[1\] is NaN/);
    expect(() => holmAdjust([-0.01])).toThrow(/\[0, 1\]/);
    expect(() => holmAdjust([1.5])).toThrow(/\[0, 1\]/);
    expect(() => holmAdjust([Infinity])).toThrow(/Infinity/);
    expect(() => bonferroniAdjust([0.2, NaN])).toThrow(/NaN/);
  });
});
