import { describe, expect, it } from 'vitest';
import { Rng } from '../../src/util/rng.ts';
import {
  bootstrapInterval,
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
  signedRankNullCountsUntied,
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
    const d = Array.from({ length: 60 }, (_, i) => (i < 40 ? 1 : -1));
    const { a, b } = fromDiffs(d);
    const r = wilcoxonSignedRank(a, b);
    expect(r.exact).toBe(false);
    expect(r.wPlus).toBe(1220);
    const sd = Math.sqrt((60 * 61 * 61) / 16);
    expect(r.pGreaterA).toBeCloseTo(1 - normalCdf((1220 - 915 - 0.5) / sd), 14);
    expect(r.pTwoSided).toBeCloseTo(2 * r.pGreaterA, 14);
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
