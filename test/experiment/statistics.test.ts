import { describe, expect, it } from 'vitest';
import { Rng } from '../../src/util/rng.ts';
import {
  WILCOXON_MAX_EXACT_N,
  bootstrapInterval,
  countNonFinite,
  extrapolationGap,
  extrapolationRatio,
  interquartileMean,
  mean,
  minimumTwoSidedP,
  normalCdf,
  pairedBootstrapDifference,
  probabilityOfImprovement,
  probabilityOfImprovementUnpaired,
  quantileSorted,
  seedsNeededForSignificance,
  signedRankNullCounts,
  signedRankNullCountsExact,
  signedRankNullCountsUntied,
  signedRankNullProbabilities,
  summarize,
  wilcoxonSignedRank,
} from '../../src/experiment/statistics.ts';

/** Paired data with differences d (a = 10 + d, b = 10), so d_i = a_i - b_i exactly for small integers / halves. */
function fromDiffs(d: readonly number[]): { a: number[]; b: number[] } {
  return { a: d.map((x) => 10 + x), b: d.map(() => 10) };
}

/** Untied data of size n whose W+ equals t: positive signs on a subset of ranks 1..n summing to t (greedy from the top). */
function dataWithWPlus(n: number, t: number): { a: number[]; b: number[] } {
  let left = t;
  const d: number[] = [];
  for (let r = n; r >= 1; r--) {
    if (r <= left) {
      d.push(r);
      left -= r;
    } else d.push(-r);
  }
  if (left !== 0) throw new Error('target not reachable');
  return fromDiffs(d);
}

/** Brute force: enumerate all 2^n sign assignments of the given ranks and return P(W+ <= w) and P(W+ >= w). */
function bruteForceTails(ranks: readonly number[], w: number): { le: number; ge: number } {
  const n = ranks.length;
  let le = 0;
  let ge = 0;
  for (let mask = 0; mask < 1 << n; mask++) {
    let s = 0;
    for (let i = 0; i < n; i++) if (mask & (1 << i)) s += ranks[i]!;
    if (s <= w + 1e-9) le++;
    if (s >= w - 1e-9) ge++;
  }
  return { le: le / 2 ** n, ge: ge / 2 ** n };
}

/** Midranks of |d| computed the slow obvious way (for the brute-force check). */
function slowMidranks(abs: readonly number[]): number[] {
  return abs.map((v) => {
    const below = abs.filter((x) => x < v).length;
    const equal = abs.filter((x) => x === v).length;
    return below + (equal + 1) / 2;
  });
}

describe('mean and interquartile mean', () => {
  it('mean of a hand example and of an empty list', () => {
    // common practice
    expect(mean([1, 2, 3, 4])).toBe(2.5);
    expect(mean([])).toBeNaN();
  });

  it('IQM of 1..8 is the mean of 3..6 = 4.5 (n divisible by 4, no fractional weights)', () => {
    // hand-worked: window [2, 6] on the position line keeps x(3)..x(6) with weight 1.
    expect(interquartileMean([8, 1, 7, 2, 6, 3, 5, 4])).toBeCloseTo(4.5, 14);
  });

  it('IQM with n = 10 gives half weight to x(3) and x(8)', () => {
    // hand-worked: window [2.5, 7.5]; x(3) covers [2,3] -> weight 0.5, x(4..7) weight 1, x(8) covers [7,8] -> 0.5.
    // values 1,2,4,...,512: (0.5*4 + 8 + 16 + 32 + 64 + 0.5*128) / 5 = 186 / 5 = 37.2.
    // (A plain 25% trimmed mean dropping floor(10/4) = 2 values each side would give 252/6 = 42 instead.)
    const xs = [512, 1, 256, 2, 128, 4, 64, 8, 32, 16];
    expect(interquartileMean(xs)).toBeCloseTo(37.2, 12);
  });

  it('IQM with n = 9 gives weight 3/4 to x(3) and x(7) and ignores the outlier', () => {
    // hand-worked: window [2.25, 6.75]; (0.75*3 + 4 + 5 + 6 + 0.75*7) / 4.5 = 22.5 / 4.5 = 5.
    expect(interquartileMean([1, 2, 3, 4, 5, 6, 7, 8, 100])).toBeCloseTo(5, 12);
  });

  it('IQM for tiny n: n=1 is the value, n=2 the mean, n=3 weights 1/4,1,1/4; empty is NaN', () => {
    // hand-worked from the definition.
    expect(interquartileMean([3])).toBe(3);
    expect(interquartileMean([3, 5])).toBe(4);
    expect(interquartileMean([10, 1, 4])).toBeCloseTo((0.25 * 1 + 4 + 0.25 * 10) / 1.5, 14);
    expect(interquartileMean([])).toBeNaN();
  });

  it('quantileSorted uses linear interpolation between order statistics', () => {
    // R's default quantile (type 7): quantile(1:4, c(.25, .5)) = 1.75, 2.5 — from memory, common practice.
    expect(quantileSorted([1, 2, 3, 4], 0.25)).toBeCloseTo(1.75, 14);
    expect(quantileSorted([1, 2, 3, 4], 0.5)).toBeCloseTo(2.5, 14);
    expect(quantileSorted([1, 2, 3, 4], 0)).toBe(1);
    expect(quantileSorted([1, 2, 3, 4], 1)).toBe(4);
  });
});

describe('probability of improvement', () => {
  it('paired: fraction of seeds where A has lower error, ties 1/2', () => {
    // hand-worked: pairs (1,2) win, (2,2) tie, (3,1) loss, (4,5) win -> (1 + 0.5 + 0 + 1) / 4 = 0.625.
    expect(probabilityOfImprovement([1, 2, 3, 4], [2, 2, 1, 5])).toBe(0.625);
    expect(probabilityOfImprovement([2, 2, 1, 5], [1, 2, 3, 4])).toBe(0.375);
    expect(probabilityOfImprovement([], [])).toBeNaN();
  });

  it('unpaired: over all 16 pairs (Mann-Whitney U / (n m))', () => {
    // hand-worked: a=1 vs {2,2,1,5}: 1+1+.5+1 = 3.5; a=2: .5+.5+0+1 = 2; a=3: 1; a=4: 1 -> 7.5/16.
    expect(probabilityOfImprovementUnpaired([1, 2, 3, 4], [2, 2, 1, 5])).toBe(7.5 / 16);
  });

  it('rejects mismatched lengths and non-finite values', () => {
    expect(() => probabilityOfImprovement([1, 2], [1])).toThrow(/same length/);
    expect(() => probabilityOfImprovement([1, NaN], [1, 2])).toThrow(/NaN/);
  });
});

describe('normal distribution', () => {
  it('matches standard normal table values', () => {
    // Standard normal table values (from memory; common practice): Phi(-1.959963984540054) = 0.025,
    // Phi(-1) = 0.158655253931457, Phi(-3) = 0.00134989803163009, Phi(-5) = 2.86651571879194e-7.
    expect(normalCdf(-1.959963984540054)).toBeCloseTo(0.025, 12);
    expect(normalCdf(-1) / 0.158655253931457).toBeCloseTo(1, 10);
    expect(normalCdf(-3) / 0.00134989803163009).toBeCloseTo(1, 10);
    expect(normalCdf(-5) / 2.86651571879194e-7).toBeCloseTo(1, 9);
    expect(normalCdf(0)).toBe(0.5);
    for (const x of [0.3, 1.4, 2.2, 4.1]) expect(normalCdf(x) + normalCdf(-x)).toBeCloseTo(1, 14);
  });
});

describe('Wilcoxon signed-rank: exact null distribution', () => {
  it('counts of sign assignments per W+ for n = 3, 4, 5 match hand enumeration', () => {
    // hand-worked: n=3 subsets of {1,2,3}: sums 0,1,2,3(x2),4,5,6.
    expect(signedRankNullCountsUntied(3)).toEqual([1, 1, 1, 2, 1, 1, 1]);
    // hand-worked: n=4 subsets of {1,2,3,4} by sum 0..10.
    expect(signedRankNullCountsUntied(4)).toEqual([1, 1, 1, 2, 2, 2, 2, 2, 1, 1, 1]);
    // hand-worked: n=5 subsets of {1..5} by sum 0..15 (total 32).
    expect(signedRankNullCountsUntied(5)).toEqual([1, 1, 1, 2, 2, 3, 3, 3, 3, 3, 3, 2, 2, 1, 1, 1]);
  });

  it('untied distribution agrees with brute-force enumeration for n = 1..12', () => {
    // independent check: enumerate all 2^n sign flips.
    for (let n = 1; n <= 12; n++) {
      const counts = signedRankNullCountsUntied(n);
      expect(counts.reduce((s, c) => s + c, 0)).toBe(2 ** n);
      const ranks = Array.from({ length: n }, (_, i) => i + 1);
      let cum = 0;
      for (let w = 0; w < counts.length; w++) {
        cum += counts[w]!;
        expect(cum / 2 ** n).toBeCloseTo(bruteForceTails(ranks, w).le, 14);
      }
    }
  });

  it('two-sided alpha = 0.05 critical values match a published table for n = 6..25', () => {
    // Source: University of York, Department of Mathematics, statistical tables, "Critical Values for T in
    // the Wilcoxon Matched-Pairs Signed-Rank Test", column P = 0.05 (two-tailed), n = 5..25 (page last
    // updated May 2004); n = 6..15 and 20 also agree with the values recalled from memory in the brief.
    // Reject when T <= tabled value. Check: p(T) <= 0.05 and p(T+1) > 0.05 under our exact distribution.
    // (The same page's P = 0.10 column, labelled "approximate", disagrees with exact enumeration at
    // n = 5, 11, 14, 16, so only the P = 0.05 column is used here.)
    const table: Record<number, number> = {
      6: 0, 7: 2, 8: 3, 9: 5, 10: 8, 11: 10, 12: 13, 13: 17, 14: 21, 15: 25,
      16: 29, 17: 34, 18: 40, 19: 46, 20: 52, 21: 58, 22: 65, 23: 73, 24: 81, 25: 89,
    };
    for (const [nText, t] of Object.entries(table)) {
      const n = Number(nText);
      const at = dataWithWPlus(n, t);
      const r = wilcoxonSignedRank(at.a, at.b);
      expect(r.exact).toBe(true);
      expect(r.statistic).toBe(t);
      expect(r.pTwoSided, `n=${n} T=${t}`).toBeLessThanOrEqual(0.05);
      const next = dataWithWPlus(n, t + 1);
      expect(wilcoxonSignedRank(next.a, next.b).pTwoSided, `n=${n} T+1=${t + 1}`).toBeGreaterThan(0.05);
    }
    // n = 5 has no critical value ("-" in the table): even T = 0 is not significant.
    const five = dataWithWPlus(5, 0);
    expect(wilcoxonSignedRank(five.a, five.b).pTwoSided).toBe(0.0625);
  });

  it('one-sided alpha = 0.05 critical values match a second published table for n = 5..20', () => {
    // Source: D. Harvey, "Chemometrics Using R" (LibreTexts edition), Appendix 12.6 "Critical Values for the
    // Wilcoxson Signed Rank Test", table 12.6.1 (alpha = 0.05), one-tailed column. Reject when T <= value.
    // (Its two-tailed column lists 30 and 35 for n = 16 and 17, where exact enumeration and the York table
    // give 29 and 34: with T = 30, n = 16 the exact two-sided p is 0.0507. Those two cells are not used.)
    const oneTailed: Record<number, number> = {
      5: 0, 6: 2, 7: 3, 8: 5, 9: 8, 10: 10, 11: 13, 12: 17, 13: 21, 14: 25, 15: 30,
      16: 35, 17: 41, 18: 47, 19: 53, 20: 60,
    };
    for (const [nText, t] of Object.entries(oneTailed)) {
      const n = Number(nText);
      // W+ = t with the remaining ranks negative: the one-sided p for "A lower" is P(W+ <= t).
      const at = dataWithWPlus(n, t);
      expect(wilcoxonSignedRank(at.a, at.b).pLessA, `n=${n} T=${t}`).toBeLessThanOrEqual(0.05);
      const next = dataWithWPlus(n, t + 1);
      expect(wilcoxonSignedRank(next.a, next.b).pLessA, `n=${n} T+1`).toBeGreaterThan(0.05);
    }
  });

  it('hand-worked example with tied |d| uses midranks and the exact distribution of those midranks', () => {
    // hand-worked (not from a textbook): d = +1, -2, +2, +3 -> |d| ranks 1, 2.5, 2.5, 4.
    // W+ = 1 + 2.5 + 4 = 7.5, W- = 2.5. The 16 subset sums of {1, 2.5, 2.5, 4} are
    // 0, 1, 2.5, 2.5, 4, 3.5, 3.5, 5, 5, 6.5, 6.5, 6, 7.5, 7.5, 9, 10.
    // P(W+ >= 7.5) = 4/16 = 0.25, P(W+ <= 7.5) = 14/16, two-sided p = 0.5.
    const { a, b } = fromDiffs([1, -2, 2, 3]);
    const r = wilcoxonSignedRank(a, b);
    expect(r).toMatchObject({ n: 4, zeros: 0, wPlus: 7.5, wMinus: 2.5, statistic: 2.5, ties: true, exact: true });
    expect(r.pGreaterA).toBe(0.25);
    expect(r.pLessA).toBe(14 / 16);
    expect(r.pTwoSided).toBe(0.5);
    expect(r.minAchievableP).toBe(0.125);
  });

  it('drops zero differences (Wilcoxon\'s original method)', () => {
    // Same hand-worked example plus two zero differences: identical result with zeros = 2.
    const { a, b } = fromDiffs([1, 0, -2, 2, 0, 3]);
    const r = wilcoxonSignedRank(a, b);
    expect(r).toMatchObject({ n: 4, zeros: 2, wPlus: 7.5, wMinus: 2.5, pTwoSided: 0.5 });
    const allZero = wilcoxonSignedRank([1, 2, 3], [1, 2, 3]);
    expect(allZero).toMatchObject({ n: 0, zeros: 3, pTwoSided: 1, pLessA: 1, pGreaterA: 1 });
  });

  it('exact p with ties agrees with brute-force enumeration of sign flips of the midranks', () => {
    // independent check: random small-integer differences (many ties), n up to 12, all 2^n sign flips.
    const rng = new Rng(7);
    for (let trial = 0; trial < 60; trial++) {
      const n = rng.int(1, 12);
      const d = Array.from({ length: n }, () => rng.int(1, 4) * (rng.next() < 0.5 ? -1 : 1));
      const { a, b } = fromDiffs(d);
      const r = wilcoxonSignedRank(a, b);
      const ranks = slowMidranks(d.map(Math.abs));
      const wPlus = ranks.reduce((s, rank, i) => s + (d[i]! > 0 ? rank : 0), 0);
      expect(r.wPlus).toBeCloseTo(wPlus, 12);
      const tails = bruteForceTails(ranks, wPlus);
      expect(r.pLessA).toBeCloseTo(tails.le, 14);
      expect(r.pGreaterA).toBeCloseTo(tails.ge, 14);
      expect(r.pTwoSided).toBeCloseTo(Math.min(1, 2 * Math.min(tails.le, tails.ge)), 14);
    }
  });

  it('doubled-rank DP accepts arbitrary tied doubled ranks', () => {
    // hand-worked: doubled ranks {2, 5, 5, 8} (ranks 1, 2.5, 2.5, 4) -> subset sums as in the tie example.
    const counts = signedRankNullCounts([2, 5, 5, 8]);
    expect(counts.reduce((s, c) => s + c, 0)).toBe(16);
    expect(counts[15]).toBe(2); // W+ = 7.5 reached by {1, 2.5a, 4} and {1, 2.5b, 4}
    expect(counts[20]).toBe(1); // all positive
  });

  it('uses the normal approximation above the exact limit and flags it', () => {
    // Approximation check against our own exact distribution at n = 40 (not an outside source: measured
    // differences here are <= 0.001; the 0.005 tolerance only guards against a wrong variance or correction).
    const rng = new Rng(11);
    for (let trial = 0; trial < 5; trial++) {
      const d = Array.from({ length: 40 }, () => rng.normal() + 0.3);
      const { a, b } = fromDiffs(d);
      const exact = wilcoxonSignedRank(a, b);
      const approx = wilcoxonSignedRank(a, b, { maxExactN: 10 });
      expect(exact.exact).toBe(true);
      expect(approx.exact).toBe(false);
      expect(Math.abs(approx.pTwoSided - exact.pTwoSided)).toBeLessThan(0.005);
    }
    const big = fromDiffs(Array.from({ length: 80 }, (_, i) => (i % 3 === 0 ? -1 : 1) * (i + 1)));
    const r = wilcoxonSignedRank(big.a, big.b);
    expect(r.exact).toBe(false);
    expect(r.n).toBe(80);
    expect(r.pTwoSided).toBeGreaterThan(0);
    expect(r.pTwoSided).toBeLessThanOrEqual(1);
  });

  it('normal approximation applies the tie correction to the variance', () => {
    // hand-worked: all 60 |d| equal -> one tie group t = 60; variance n(n+1)(2n+1)/24 - (t^3 - t)/48
    // = n(n+1)^2/16 (every rank is (n+1)/2). With 40 positive, 20 negative: W+ = 40 * 30.5 = 1220,
    // mu = 915, sd = sqrt(60 * 61^2 / 16) = 118.13..., z (corrected) = (1220 - 915 - 0.5) / sd.
    // n = 60 is within the exact range now, so maxExactN: 50 forces the approximation.
    const d = Array.from({ length: 60 }, (_, i) => (i < 40 ? 1 : -1));
    const { a, b } = fromDiffs(d);
    const r = wilcoxonSignedRank(a, b, { maxExactN: 50 });
    expect(r.exact).toBe(false);
    expect(r.wPlus).toBe(1220);
    const sd = Math.sqrt((60 * 61 * 61) / 16);
    expect(r.pGreaterA).toBeCloseTo(1 - normalCdf((1220 - 915 - 0.5) / sd), 14);
    expect(r.pTwoSided).toBeCloseTo(2 * r.pGreaterA, 14);
  });
});

/** Coefficients of prod_i (1 + x^w_i) as exact bigints: the null counts of the signed-rank sum for weights w. */
function generatingFunctionCounts(weights: readonly number[]): bigint[] {
  // Forward polynomial multiplication (a different route from the module's in-place two-limb DP).
  let poly: bigint[] = [1n];
  for (const w of weights) {
    const next = new Array<bigint>(poly.length + w).fill(0n);
    for (let i = 0; i < poly.length; i++) {
      next[i] = next[i]! + poly[i]!;
      next[i + w] = next[i + w]! + poly[i]!;
    }
    poly = next;
  }
  return poly;
}

/** sum(counts[from..to]) / 2^n, correctly rounded (Number(bigint) rounds to nearest; dividing by 2^n is exact). */
function bigTail(counts: readonly bigint[], from: number, to: number, n: number): number {
  let s = 0n;
  for (let i = from; i <= to; i++) s += counts[i]!;
  return Number(s) / 2 ** n;
}

describe('Wilcoxon signed-rank: published examples', () => {
  it('Darwin/Fisher maize height differences (no ties, no zeros): exact p = 0.041259765625', () => {
    // Source: SciPy reference guide, scipy.stats.wilcoxon, "Examples" section
    // (https://docs.scipy.org/doc/scipy/reference/generated/scipy.stats.wilcoxon.html; the same text is the
    // docstring of scipy/stats/_morestats.py in scipy >= 1.9). Data: differences in height between cross- and
    // self-fertilized corn plants, from Wilcoxon (1945), Biometrics Bulletin 1, 80-83 (Fisher's Design of
    // Experiments data). Published: two-sided statistic 24.0, p = 0.041259765625 ("The p-values above are exact");
    // alternative='greater': statistic 96.0, p = 0.0206298828125 (= 676 / 2^15).
    // (Older SciPy pages, e.g. 1.3-1.8, print 0.04088813291185591: that is the normal approximation without
    // continuity correction, not the exact value.)
    const d = [6, 8, 14, 16, 23, 24, 28, 29, 41, -48, 49, 56, 60, -67, 75];
    const { a, b } = fromDiffs(d);
    const r = wilcoxonSignedRank(a, b);
    expect(r).toMatchObject({ n: 15, zeros: 0, ties: false, exact: true, wPlus: 96, wMinus: 24, statistic: 24 });
    expect(r.pTwoSided).toBe(0.041259765625);
    expect(r.pGreaterA).toBe(0.0206298828125); // SciPy's alternative='greater' is our "A has higher error"
  });

  it('Hollander & Wolfe depression-scale data (no ties): one-sided 0.01953, two-sided 0.03906', () => {
    // Source: R package exactRankTests (T. Hothorn), man/wilcox.exact.Rd examples and the saved R 3.6.0 output
    // tests/exactRankTests-Ex.Rout.save (CRAN mirror github.com/cran/exactRankTests). Data: Hollander & Wolfe
    // (1973), Nonparametric Statistical Methods, pp. 29f: Hamilton depression scale factor IV, first (x) and
    // second (y) visit, 9 patients (also the example of R's own ?wilcox.test).
    // Published: wilcox.exact(x, y, paired = TRUE, alternative = "greater") -> V = 40, p-value = 0.01953;
    //            wilcox.exact(y, x, paired = TRUE) -> V = 5, p-value = 0.03906 (two-sided).
    const x = [1.83, 0.5, 1.62, 2.48, 1.68, 1.88, 1.55, 3.06, 1.3];
    const y = [0.878, 0.647, 0.598, 2.05, 1.06, 1.29, 1.06, 3.14, 1.29];
    const r = wilcoxonSignedRank(x, y);
    expect(r).toMatchObject({ n: 9, zeros: 0, ties: false, wPlus: 40, wMinus: 5 });
    expect(r.pGreaterA).toBeCloseTo(0.01953, 5); // exactly 10/512
    expect(r.pTwoSided).toBeCloseTo(0.03906, 5);
    const swapped = wilcoxonSignedRank(y, x);
    expect(swapped.wPlus).toBe(5);
    expect(swapped.pTwoSided).toBe(r.pTwoSided);
    expect(swapped.pLessA).toBe(r.pGreaterA);
  });

  it('serum antigen data with 4 zero differences (dropped, Wilcoxon\'s method): V = 124, p = 0.002136', () => {
    // Source: exactRankTests, man/wilcox.exact.Rd ("Data from the StatXact-4 manual, page 167, serum antigen
    // level"; "StatXact 4 for Windows: p.value=0.0021 (page 168)") and the saved output of example(sal) in
    // tests/exactRankTests-Ex.Rout.save: "Exact Wilcoxon signed rank test ... V = 124, p-value = 0.002136".
    // Convention: wilcox.exact drops zero differences before ranking (x <- x[x != 0] in R/wilcox.exact.R), as we
    // do. (Pratt's method, the default of coin::wilcoxsign_test, would keep the zeros in the ranking and give a
    // different p; it is not what we implement.)
    const pre = [149, 0, 0, 259, 106, 255, 0, 52, 340, 65, 180, 0, 84, 89, 212, 554, 500, 424, 112, 2600];
    const post = [0, 51, 0, 385, 0, 235, 0, 0, 48, 65, 77, 0, 0, 0, 53, 150, 0, 165, 98, 0];
    const r = wilcoxonSignedRank(pre, post);
    expect(r).toMatchObject({ n: 16, zeros: 4, ties: false, exact: true, wPlus: 124, wMinus: 12 });
    expect(Math.abs(r.pTwoSided - 0.002136)).toBeLessThan(5e-7); // printed to 4 significant digits
    expect(Math.abs(r.pTwoSided - 0.0021)).toBeLessThan(5e-5); // StatXact's 2-digit value
  });

  it('tied |d| and 26 zero differences, n = 47 ranked: V = 559, exact conditional p = 0.9603', () => {
    // Source: exactRankTests tests/bugfix-tests.R and its saved R 3.6.0 output tests/bugfix-tests.Rout.save
    // (data from R. Bellio, 2002): wilcox.exact(x, y, paired=TRUE) -> "Exact Wilcoxon signed rank test ...
    // V = 559, p-value = 0.9603". wilcox.exact computes the exact distribution conditional on the midranks
    // (Streitberg-Roehmel algorithm) after dropping zeros, which is our definition; its two-sided p is
    // P(|V - E V| >= |v - E V|), equal to 2 * min(one-sided) for this symmetric distribution.
    const x = [0, 87, 0, 0, 0, 0, 8, 0, 16, 0, 64, 0, 0, 37, 200, 0, 0, 32, 5, 0, 0, 14, 0, 0, 4, 0, 0, 50, 0, 0, 99,
      0, 0, 12, 36, 22, 4, 13, 0, 10, 70, 0, 0, 0, 0, 19, 0, 4, 3, 4, 23, 0, 0, 0, 0, 0, 0, 14, 4, 8, 0, 11, 42, 0, 0,
      0, 0, 0, 18, 11, 29, 0, 0];
    const y = [0, 0, 14, 0, 0, 16, 0, 145, 0, 0, 16, 0, 0, 47, 0, 0, 0, 144, 0, 2, 0, 13, 0, 0, 114, 0, 6, 0, 0, 4,
      9, 0, 0, 17, 0, 0, 42, 0, 0, 0, 0, 0, 0, 0, 25, 0, 1, 178, 0, 0, 0, 6, 0, 7, 76, 252, 0, 0, 23, 0, 0, 68, 0, 0,
      0, 24, 0, 59, 0, 0, 0, 0, 16];
    expect(x.length).toBe(73);
    const r = wilcoxonSignedRank(x, y);
    expect(r).toMatchObject({ n: 47, zeros: 26, ties: true, exact: true, wPlus: 559 });
    expect(Math.abs(r.pTwoSided - 0.9603)).toBeLessThan(5e-5);
  });

  it('small tied examples from the exactRankTests checks: 1..7,7 and 1,1,1', () => {
    // Source: exactRankTests man/wilcox.exact.Rd, \testonly block: wilcox.exact(1:8)$p.value == 0.0078125,
    // wilcox.exact(c(1:7, 7))$p.value == 0.0078125 (ties at the top), wilcox.exact(c(1, 1, 1))$p.value == 0.25.
    for (const d of [[1, 2, 3, 4, 5, 6, 7, 8], [1, 2, 3, 4, 5, 6, 7, 7]]) {
      const { a, b } = fromDiffs(d);
      expect(wilcoxonSignedRank(a, b).pTwoSided).toBe(0.0078125);
    }
    const { a, b } = fromDiffs([1, 1, 1]);
    const r = wilcoxonSignedRank(a, b);
    expect(r.ties).toBe(true);
    expect(r.wPlus).toBe(6); // three midranks of 2
    expect(r.pTwoSided).toBe(0.25);
  });

  it('differs on purpose from SciPy\'s tied example, which used the untied table', () => {
    // Source: the same SciPy docstring (scipy/stats/_morestats.py, scipy 1.9-1.12 era): d = [-0.025, 0.05, 0.05,
    // -0.05] with alternative='greater' prints WilcoxonResult(statistic=6.0, pvalue=0.4375). 0.4375 = 7/16 is
    // P(W+ >= 6) under the UNTIED ranks 1..4 (that SciPy ignored ties in its exact mode). Our p is conditional on
    // the midranks {1, 3, 3, 3}; hand-worked: W+ >= 6 needs two of the three 3s: {3,3} x3, {1,3,3} x3, {3,3,3},
    // {1,3,3,3} -> 8 of 16 sign patterns, p = 0.5.
    const { a, b } = fromDiffs([-0.025, 0.05, 0.05, -0.05]);
    const r = wilcoxonSignedRank(a, b);
    expect(r.wPlus).toBe(6);
    expect(r.ties).toBe(true);
    expect(r.pGreaterA).toBe(0.5);
    expect(r.pGreaterA).not.toBe(0.4375);
  });
});

describe('Wilcoxon signed-rank: exact distribution up to n = 64', () => {
  it('exact for every n up to 64 by default; maxExactN is capped at 64', () => {
    expect(WILCOXON_MAX_EXACT_N).toBe(64);
    const at64 = dataWithWPlus(64, 1000);
    expect(wilcoxonSignedRank(at64.a, at64.b).exact).toBe(true);
    const at65 = dataWithWPlus(65, 1000);
    expect(wilcoxonSignedRank(at65.a, at65.b).exact).toBe(false);
    expect(() => wilcoxonSignedRank([1], [2], { maxExactN: 65 })).toThrow(/maxExactN/);
    expect(() => signedRankNullCounts(Array.from({ length: 65 }, (_, i) => 2 * (i + 1)))).toThrow(/n <= 64/);
  });

  it('n = 64 untied: every count equals the generating function prod (1 + x^k), k = 1..64, exactly', () => {
    // Source of the identity: OEIS A226330 (critical values of the Wilcoxon T test), formula line "G.f. for
    // partitions limited to sample size is product_{r=1..s} (1 + x^r)". Computed here with bigints by forward
    // polynomial multiplication. The central counts are ~4.9e16 > 2^53, beyond exact double counting.
    const reference = generatingFunctionCounts(Array.from({ length: 64 }, (_, i) => i + 1));
    const doubled = Array.from({ length: 64 }, (_, i) => 2 * (i + 1));
    const exact = signedRankNullCountsExact(doubled);
    expect(exact.length).toBe(2 * reference.length - 1);
    for (let w = 0; w < reference.length; w++) {
      expect(exact[2 * w]).toBe(reference[w]);
      if (w + 1 < reference.length) expect(exact[2 * w + 1]).toBe(0n);
    }
    expect(reference[1040]! > 2n ** 53n).toBe(true); // the regime the old double counts could not hold
    expect(exact.reduce((s, c) => s + c, 0n)).toBe(2n ** 64n);
  });

  it('n = 64 untied: probabilities sum to 1, are symmetric, and the extremes are 2^-64', () => {
    const probs = signedRankNullProbabilities(Array.from({ length: 64 }, (_, i) => 2 * (i + 1)));
    const total = probs.length - 1; // doubled units: 2 * 2080
    expect(total).toBe(4160);
    let sum = 0;
    for (const p of probs) sum += p;
    expect(Math.abs(sum - 1)).toBeLessThan(1e-14);
    for (let s = 0; s <= total; s++) expect(probs[s]).toBe(probs[total - s]);
    expect(probs[0]).toBe(2 ** -64);
    expect(probs[2]).toBe(2 ** -64); // W+ = 1: only {1}
    expect(probs[6]).toBe(2 * 2 ** -64); // W+ = 3: {3} and {1, 2}
    // All 64 differences favour A: the smallest possible two-sided p, 2 / 2^64.
    const allA = dataWithWPlus(64, 0);
    const r = wilcoxonSignedRank(allA.a, allA.b);
    expect(r.exact).toBe(true);
    expect(r.pLessA).toBe(2 ** -64);
    expect(r.pTwoSided).toBe(2 ** -63);
    expect(r.minAchievableP).toBe(2 ** -63);
  });

  it('n = 64 untied: tail p-values are the correctly rounded exact bigint ratios', () => {
    // Independent check with bigint arithmetic: p = sum(counts) / 2^64 rounded once, so equality is required.
    const reference = generatingFunctionCounts(Array.from({ length: 64 }, (_, i) => i + 1));
    for (const w of [0, 1, 10, 100, 350, 500, 700, 833, 1000, 1040, 1200, 1500, 2079]) {
      const { a, b } = dataWithWPlus(64, w);
      const r = wilcoxonSignedRank(a, b);
      expect(r.wPlus).toBe(w);
      expect(r.pLessA, `W+=${w}`).toBe(bigTail(reference, 0, w, 64));
      expect(r.pGreaterA, `W+=${w}`).toBe(bigTail(reference, w, 2080, 64));
    }
  });

  it('n = 64 untied: the tail against the normal approximation, as a published study describes it', () => {
    // Source: abstract of "Extended Tables of the Wilcoxon Matched Pair Signed Rank Statistic" (tables for
    // N = 4..100; abstract read at https://paperexplained.cn/articles/paper/detail/b6a7e597e4268e490137cff345423aa86c3bfbb0;
    // author and journal from memory: R. L. McCornack, JASA 60 (1965), 864-871): "Normal approximation
    // probabilities were found to be biased, too small at the .05 level but too large at the .005 and .0005
    // probability levels. Approximation errors were less than 10% for all N > 35 for the .05, .025, and .005
    // one-tail probability levels". The abstract does not say whether a continuity correction was used, so both
    // forms are checked at the exact one-tailed critical values for n = 64.
    const n = 64;
    const mu = 1040;
    const sd = Math.sqrt(22360); // n(n+1)(2n+1)/24
    const probs = signedRankNullProbabilities(Array.from({ length: n }, (_, i) => 2 * (i + 1)));
    const critical = (level: number): { t: number; p: number } => {
      let cum = 0;
      let best = { t: -1, p: 0 };
      for (let w = 0; 2 * w < probs.length; w++) {
        cum += probs[2 * w]!;
        if (cum > level) break;
        best = { t: w, p: cum };
      }
      return best;
    };
    for (const level of [0.05, 0.025, 0.005, 0.0005]) {
      const { t, p } = critical(level);
      const { a, b } = dataWithWPlus(n, t);
      expect(wilcoxonSignedRank(a, b).pLessA).toBeCloseTo(p, 15); // p here is a sum of rounded point probabilities
      for (const cc of [0, 0.5]) {
        const approx = normalCdf((t - mu + cc) / sd);
        const rel = (approx - p) / p;
        if (level === 0.05) expect(rel, `level ${level}, cc ${cc}`).toBeLessThan(0);
        if (level <= 0.005) expect(rel, `level ${level}, cc ${cc}`).toBeGreaterThan(0);
        if (level >= 0.005) expect(Math.abs(rel), `level ${level}, cc ${cc}`).toBeLessThan(0.1);
      }
    }
    // And the absolute gap to the continuity-corrected approximation stays small across the body of the
    // distribution (measured at most 1.21e-3, near W+ = 900); the tolerance guards against a wrong distribution.
    for (const w of [700, 760, 800, 850, 900, 960, 1000, 1040]) {
      const { a, b } = dataWithWPlus(n, w);
      const exact = wilcoxonSignedRank(a, b);
      expect(Math.abs(exact.pLessA - normalCdf((w - mu + 0.5) / sd)), `W+=${w}`).toBeLessThan(1.5e-3);
    }
  });

  it('critical values for n = 6..62 match a published table (OEIS A226330, one-tailed 2.5%)', () => {
    // Source: OEIS A226330, "Critical values of Wilcoxon T test at a 2.5% level of significance (one-tail test)",
    // offset 6 (https://oeis.org/A226330), computed after P. Mitic, "Critical Values for the Wilcoxon Signed
    // Rank Statistic", Mathematica Journal 6(3). Its program returns the largest T with P(W+ <= T) <= 0.025.
    // n = 51..62 were normal-approximation territory before; n = 6..25 also agree with the York table above.
    const table = [0, 2, 3, 5, 8, 10, 13, 17, 21, 25, 29, 34, 40, 46, 52, 58, 65, 73, 81, 89, 98, 107, 116,
      126, 137, 147, 159, 170, 182, 195, 208, 221, 235, 249, 264, 279, 294, 310, 327, 343,
      361, 378, 396, 415, 434, 453, 473, 494, 514, 536, 557, 579, 602, 625, 648, 672, 697];
    expect(table.length).toBe(57);
    table.forEach((t, i) => {
      const n = 6 + i;
      const at = dataWithWPlus(n, t);
      const r = wilcoxonSignedRank(at.a, at.b);
      expect(r.exact).toBe(true);
      expect(r.pLessA, `n=${n} T=${t}`).toBeLessThanOrEqual(0.025);
      const next = dataWithWPlus(n, t + 1);
      expect(wilcoxonSignedRank(next.a, next.b).pLessA, `n=${n} T+1=${t + 1}`).toBeGreaterThan(0.025);
    });
  });

  it('n = 64 all tied: counts are the binomial coefficients C(64, k), exactly', () => {
    // hand-worked: every |d| equal -> every midrank is 32.5 (doubled 65), so W+ = 32.5 * K with K ~ Bin(64, 1/2).
    // C(64, 32) = 1832624140942590534 > 2^53.
    const counts = signedRankNullCountsExact(Array.from({ length: 64 }, () => 65));
    let c = 1n;
    for (let k = 0; k <= 64; k++) {
      expect(counts[65 * k], `k=${k}`).toBe(c);
      c = (c * BigInt(64 - k)) / BigInt(k + 1);
    }
    expect(counts[65 * 32]).toBe(1832624140942590534n);
    expect(counts.filter((x) => x !== 0n).length).toBe(65);
    // 40 of 64 positive: pGreaterA = P(K >= 40) from the same binomials.
    const d = Array.from({ length: 64 }, (_, i) => (i < 40 ? 1 : -1));
    const { a, b } = fromDiffs(d);
    const r = wilcoxonSignedRank(a, b);
    expect(r.wPlus).toBe(40 * 32.5);
    const binom = generatingFunctionCounts(Array.from({ length: 64 }, () => 1)); // C(64, k) by polynomial product
    expect(r.pGreaterA).toBe(bigTail(binom, 40, 64, 64));
    expect(r.pLessA).toBe(bigTail(binom, 0, 40, 64));
  });

  it('n = 64 with ties: p-values equal the bigint reference and take well under 50 ms', () => {
    const rng = new Rng(64);
    for (let trial = 0; trial < 4; trial++) {
      // Small integer |d| in 1..9: heavy ties, midranks on half-integers.
      const d = Array.from({ length: 64 }, () => rng.int(1, 9) * (rng.next() < 0.4 ? -1 : 1));
      const { a, b } = fromDiffs(d);
      const r = wilcoxonSignedRank(a, b);
      expect(r.exact).toBe(true);
      expect(r.ties).toBe(true);
      const doubled = slowMidranks(d.map(Math.abs)).map((x) => 2 * x);
      const reference = generatingFunctionCounts(doubled);
      const plus2 = doubled.reduce((s, x, i) => s + (d[i]! > 0 ? x : 0), 0);
      expect(r.wPlus * 2).toBe(plus2);
      expect(r.pLessA).toBe(bigTail(reference, 0, plus2, 64));
      expect(r.pGreaterA).toBe(bigTail(reference, plus2, reference.length - 1, 64));
    }
    // Timing: median of 7 calls (measured about 2 ms on the shared 2-core machine).
    const d = Array.from({ length: 64 }, (_, i) => ((i * 7) % 5 === 0 ? -1 : 1) * (1 + (i % 9)));
    const { a, b } = fromDiffs(d);
    const times: number[] = [];
    for (let k = 0; k < 7; k++) {
      const t0 = performance.now();
      wilcoxonSignedRank(a, b);
      times.push(performance.now() - t0);
    }
    times.sort((p, q) => p - q);
    expect(times[3]).toBeLessThan(50);
  });

  it('counts as doubles stay exact up to n = 53 and agree with the bigint counts', () => {
    const doubled = Array.from({ length: 53 }, (_, i) => 2 * (i + 1));
    const asNumbers = signedRankNullCounts(doubled);
    const asBig = signedRankNullCountsExact(doubled);
    for (let s = 0; s < asBig.length; s++) expect(BigInt(asNumbers[s]!)).toBe(asBig[s]);
  });
});

describe('Wilcoxon signed-rank and probability of improvement with failed runs (+Infinity)', () => {
  it('a failed run ranks above every finite difference, with the sign of the arm that failed', () => {
    // hand-worked: d = +Inf, -5, -6, -1e300 -> |d| ranks 5:1, 6:2, 1e300:3, Inf:4; W+ = 4, W- = 6.
    const r = wilcoxonSignedRank([Infinity, 5, 4, 0], [3, 10, 10, 1e300]);
    expect(r).toMatchObject({ n: 4, zeros: 0, infinite: 1, bothInfinite: 0, wPlus: 4, wMinus: 6, ties: false });
    // Same ranks as the untied n = 4 table: P(W+ >= 4) = 11/16.
    expect(r.pGreaterA).toBe(11 / 16);
  });

  it('several infinite |d| tie among themselves (midranks); both failed is a dropped zero', () => {
    // hand-worked: pairs (Inf, 1) -> +Inf, (2, Inf) -> -Inf, (11, 10) -> +1, (10, 13) -> -3, (Inf, Inf) -> zero,
    // (5, 5) -> zero. |d| ranks: 1 -> 1, 3 -> 2, Inf, Inf -> 3.5 each. W+ = 3.5 + 1 = 4.5, W- = 2 + 3.5 = 5.5.
    // Subset sums of {1, 2, 3.5, 3.5}: 0,1,2,3,3.5,3.5,4.5,4.5,5.5,5.5,6.5,6.5,7,8,9,10 ->
    // P(W+ <= 4.5) = 8/16, P(W+ >= 4.5) = 10/16, two-sided min(1, 2 * 0.5) = 1.
    const a = [Infinity, 2, 11, 10, Infinity, 5];
    const b = [1, Infinity, 10, 13, Infinity, 5];
    const r = wilcoxonSignedRank(a, b);
    expect(r).toMatchObject({ n: 4, zeros: 2, bothInfinite: 1, infinite: 2, wPlus: 4.5, wMinus: 5.5, ties: true });
    expect(r.pLessA).toBe(0.5);
    expect(r.pGreaterA).toBe(0.625);
    expect(r.pTwoSided).toBe(1);
    expect(bruteForceTails([3.5, 3.5, 1, 2], 4.5)).toEqual({ le: 0.5, ge: 0.625 });
  });

  it('arm A failing on every one of 6 seeds is as significant as 6 seeds can be (for B)', () => {
    // hand-worked: all d = +Inf, one tie group of 6 midranks 3.5: W+ = 21 is the single most extreme sign pattern.
    const r = wilcoxonSignedRank(Array.from({ length: 6 }, () => Infinity), [1, 2, 3, 4, 5, 6]);
    expect(r).toMatchObject({ n: 6, infinite: 6, wPlus: 21, wMinus: 0, ties: true });
    expect(r.pGreaterA).toBe(1 / 64);
    expect(r.pTwoSided).toBe(1 / 32);
    const mirrored = wilcoxonSignedRank([1, 2, 3, 4, 5, 6], Array.from({ length: 6 }, () => Infinity));
    expect(mirrored.pLessA).toBe(1 / 64);
    expect(mirrored.wMinus).toBe(21);
  });

  it('exact p with infinities agrees with brute-force enumeration of the midranks', () => {
    // independent check: small-integer differences plus random failures on either side, n up to 12.
    const rng = new Rng(19);
    for (let trial = 0; trial < 40; trial++) {
      const m = rng.int(2, 12);
      const a: number[] = [];
      const b: number[] = [];
      for (let i = 0; i < m; i++) {
        const u = rng.next();
        a.push(u < 0.15 ? Infinity : 10 + rng.int(0, 3));
        b.push(u > 0.85 || u < 0.05 ? Infinity : 10 + rng.int(0, 3));
      }
      const r = wilcoxonSignedRank(a, b);
      const d = a.map((x, i) => (x === b[i] ? 0 : x - b[i]!)).filter((x) => x !== 0);
      expect(r.n).toBe(d.length);
      if (d.length === 0) continue;
      const ranks = slowMidranks(d.map(Math.abs));
      const wPlus = ranks.reduce((s, rank, i) => s + (d[i]! > 0 ? rank : 0), 0);
      expect(r.wPlus).toBe(wPlus);
      const tails = bruteForceTails(ranks, wPlus);
      expect(r.pLessA).toBeCloseTo(tails.le, 14);
      expect(r.pGreaterA).toBeCloseTo(tails.ge, 14);
    }
  });

  it('normal approximation (n > 64) treats the infinite group as one tie group', () => {
    // hand-worked: 60 finite d = -1..-60 (ranks 1..60) and 10 failures of A (+Inf, ranks 61..70 -> midrank 65.5).
    // W+ = 655, mu = 70*71/4 = 1242.5, var = 70*71*141/24 - (10^3 - 10)/48.
    const a = [...Array.from({ length: 60 }, (_, i) => 100 - (i + 1)), ...Array.from({ length: 10 }, () => Infinity)];
    const b = Array.from({ length: 70 }, () => 100);
    const r = wilcoxonSignedRank(a, b);
    expect(r).toMatchObject({ n: 70, infinite: 10, exact: false, wPlus: 655 });
    const sd = Math.sqrt((70 * 71 * 141) / 24 - 990 / 48);
    expect(r.pLessA).toBeCloseTo(normalCdf((655 - 1242.5 + 0.5) / sd), 14);
  });

  it('NaN and -Infinity still throw with a clear message', () => {
    expect(() => wilcoxonSignedRank([1, NaN], [1, 2])).toThrow(/a\[1\] is NaN/);
    expect(() => wilcoxonSignedRank([1, 2], [NaN, 2])).toThrow(/b\[0\] is NaN/);
    expect(() => wilcoxonSignedRank([-Infinity, 2], [1, 2])).toThrow(/a\[0\] is -Infinity.*\+Infinity/);
    expect(() => wilcoxonSignedRank([1, 2], [1, -Infinity])).toThrow(/b\[1\] is -Infinity/);
    expect(() => probabilityOfImprovement([1, 2], [-Infinity, 2])).toThrow(/-Infinity/);
    expect(() => probabilityOfImprovement([NaN], [1])).toThrow(/NaN/);
  });

  it('probability of improvement: a failed run loses to any finite error; two failures tie', () => {
    // hand-worked: (Inf vs 2) loss 0, (1 vs Inf) win 1, (Inf vs Inf) tie 0.5, (2 vs 3) win 1 -> 2.5 / 4.
    expect(probabilityOfImprovement([Infinity, 1, Infinity, 2], [2, Infinity, Infinity, 3])).toBe(0.625);
    expect(probabilityOfImprovement([2, Infinity, Infinity, 3], [Infinity, 1, Infinity, 2])).toBe(0.375);
  });

  it('bootstrap functions keep refusing non-finite values; countNonFinite counts them', () => {
    expect(() => pairedBootstrapDifference([1, Infinity], [1, 2], { rng: new Rng(1) })).toThrow(/Infinity/);
    expect(() => pairedBootstrapDifference([1, 2], [Infinity, 2], { rng: new Rng(1) })).toThrow(/Infinity/);
    expect(() => summarize([1, Infinity], new Rng(1))).toThrow(/Infinity/);
    expect(() => probabilityOfImprovementUnpaired([1, Infinity], [1])).toThrow(/Infinity/);
    expect(countNonFinite([1, Infinity, NaN, -Infinity, 2])).toBe(3);
    expect(countNonFinite([0, -1, 1e308])).toBe(0);
    expect(countNonFinite([])).toBe(0);
  });
});

describe('how many seeds can reach significance', () => {
  it('minimum two-sided p is 2/2^n: 0.0625 for n = 5', () => {
    // common practice (and DESIGN.md): with 5 pairs the smallest two-sided signed-rank p is 0.0625.
    expect(minimumTwoSidedP(5)).toBe(0.0625);
    expect(minimumTwoSidedP(6)).toBe(0.03125);
    expect(minimumTwoSidedP(1)).toBe(1);
    expect(minimumTwoSidedP(0)).toBe(1);
    const fiveAllA = dataWithWPlus(5, 0);
    expect(wilcoxonSignedRank(fiveAllA.a, fiveAllA.b).minAchievableP).toBe(0.0625);
  });

  it('seedsNeededForSignificance: 6 at 0.05, 8 at 0.01, 5 at 0.10', () => {
    // hand-worked: 2/2^5 = 0.0625 >= 0.05 > 2/2^6; 2/2^7 = 0.0156 >= 0.01 > 2/2^8; 2/2^4 = 0.125 >= 0.1 > 0.0625.
    expect(seedsNeededForSignificance()).toBe(6);
    expect(seedsNeededForSignificance(0.05)).toBe(6);
    expect(seedsNeededForSignificance(0.01)).toBe(8);
    expect(seedsNeededForSignificance(0.1)).toBe(5);
  });
});

describe('bootstrap', () => {
  it('is deterministic under the rng seed', () => {
    const xs = [0.3, 1.2, 0.8, 2.5, 0.1, 0.9, 1.7];
    const one = bootstrapInterval(xs, mean, { rng: new Rng(42) });
    const two = bootstrapInterval(xs, mean, { rng: new Rng(42) });
    const other = bootstrapInterval(xs, mean, { rng: new Rng(43) });
    expect(two).toEqual(one);
    expect(other).not.toEqual(one);
    expect(one.estimate).toBeCloseTo(mean(xs), 14);
    expect(one.low).toBeLessThan(one.estimate);
    expect(one.high).toBeGreaterThan(one.estimate);
  });

  it('95% percentile interval of the mean covers the true mean about 93% of the time at n = 20', () => {
    // Percentile bootstrap undercovers at small n (common practice): for normal data its coverage is close to
    // P(|t_19| <= 1.96 * sqrt(19/20)) ~= 0.93 rather than 0.95. 400 replicates give a binomial sd of ~0.013,
    // so [0.89, 0.97] is about +-3 sd around 0.93 — an honest tolerance, not a 95% claim.
    const rng = new Rng(2024);
    let covered = 0;
    const replicates = 400;
    for (let r = 0; r < replicates; r++) {
      const xs = Array.from({ length: 20 }, () => rng.normal());
      const iv = bootstrapInterval(xs, mean, { rng: rng.fork(r), resamples: 1000 });
      if (iv.low <= 0 && iv.high >= 0) covered++;
    }
    const rate = covered / replicates;
    expect(rate).toBeGreaterThanOrEqual(0.89);
    expect(rate).toBeLessThanOrEqual(0.97);
  });

  it('edge cases: empty gives NaN, one value a zero-width interval; bad options throw', () => {
    expect(bootstrapInterval([], mean, { rng: new Rng(1) })).toEqual({ estimate: NaN, low: NaN, high: NaN });
    expect(bootstrapInterval([2.5], mean, { rng: new Rng(1) })).toEqual({ estimate: 2.5, low: 2.5, high: 2.5 });
    expect(() => bootstrapInterval([1, 2], mean, { rng: new Rng(1), level: 1 })).toThrow(/level/);
    expect(() => bootstrapInterval([1, 2], mean, { rng: new Rng(1), resamples: 0 })).toThrow(/resamples/);
    expect(() => bootstrapInterval([1, Infinity], mean, { rng: new Rng(1) })).toThrow(/Infinity/);
  });

  it('paired difference resamples pairs: a constant shift gives a zero-width interval', () => {
    // hand-worked: a_i = b_i - 0.25 for every seed, so every resampled mean difference is exactly -0.25;
    // resampling the arms separately would give a wide interval because b varies a lot between seeds.
    const b = [1, 5, 2, 9, 3, 7, 4, 8];
    const a = b.map((x) => x - 0.25);
    const iv = pairedBootstrapDifference(a, b, { rng: new Rng(3) });
    expect(iv.estimate).toBeCloseTo(-0.25, 14);
    expect(iv.low).toBeCloseTo(-0.25, 14);
    expect(iv.high).toBeCloseTo(-0.25, 14);
    expect(() => pairedBootstrapDifference([1, 2], [1], { rng: new Rng(3) })).toThrow(/same length/);
  });

  it('paired difference interval brackets the mean difference and narrows with level', () => {
    const a = [1.0, 1.3, 0.7, 1.1, 0.9, 1.4, 0.8, 1.2];
    const b = [1.2, 1.2, 1.0, 1.5, 0.9, 1.6, 1.3, 1.1];
    const iv95 = pairedBootstrapDifference(a, b, { rng: new Rng(5) });
    const iv80 = pairedBootstrapDifference(a, b, { rng: new Rng(5), level: 0.8 });
    expect(iv95.estimate).toBeCloseTo(mean(a) - mean(b), 14);
    expect(iv95.low).toBeLessThanOrEqual(iv80.low);
    expect(iv95.high).toBeGreaterThanOrEqual(iv80.high);
  });
});

describe('extrapolation and summary', () => {
  it('extrapolation gap is a difference, ratio a quotient', () => {
    // common practice (our definition): gap = error at size - in-distribution error.
    expect(extrapolationGap(0.5, 0.125)).toBe(0.375);
    expect(extrapolationRatio(0.5, 0.125)).toBe(4);
  });

  it('summarize gives mean and IQM with intervals, deterministically, without advancing the rng', () => {
    const values = [0.9, 1.1, 1.0, 5.0, 0.95, 1.05, 1.2, 0.8];
    const rng = new Rng(9);
    const before = rng.next();
    const s1 = summarize(values, new Rng(9));
    const s2 = summarize(values, new Rng(9));
    expect(s2).toEqual(s1);
    const probe = new Rng(9);
    summarize(values, probe);
    expect(probe.next()).toBe(before);
    expect(s1.n).toBe(8);
    expect(s1.mean).toBeCloseTo(mean(values), 14);
    expect(s1.iqm).toBeCloseTo(interquartileMean(values), 14);
    expect(s1.iqm).toBeLessThan(s1.mean); // the outlier 5.0 is trimmed
    expect(s1.meanLow).toBeLessThanOrEqual(s1.mean);
    expect(s1.meanHigh).toBeGreaterThanOrEqual(s1.mean);
    expect(s1.iqmLow).toBeLessThanOrEqual(s1.iqm);
    expect(s1.iqmHigh).toBeGreaterThanOrEqual(s1.iqm);
    expect(s1.values).toEqual(values);
    expect(summarize([], new Rng(1)).n).toBe(0);
  });
});
