import { describe, expect, it } from 'vitest';
import { Rng } from '../../src/util/rng.ts';
import { VERDICT_WORDS, verdict } from '../../src/experiment/verdict.ts';

const B8 = [1.0, 1.2, 0.9, 1.1, 1.05, 0.95, 1.3, 1.15];
/** A beats B on every seed by ~0.5 with a little variation. */
const A8 = B8.map((x, i) => x - 0.5 - 0.01 * i);

describe('verdict', () => {
  it('keeps the exact verdict phrases', () => {
    // DESIGN.md "Statistics": the four verdict phrases, plus the three refusals to judge.
    expect(VERDICT_WORDS).toEqual({
      'a-better': 'A extrapolates better',
      'b-better': 'B extrapolates better',
      'no-difference': 'no clear difference',
      'too-few-seeds': 'too few seeds to tell',
      'not-fitted': 'not judged: an arm is not fitted',
      'no-skill': 'neither beats a constant',
      'not-tested': 'descriptive only',
    });
  });

  it('too few seeds with 5 pairs even when all 5 favour A, and says why', () => {
    // common practice / DESIGN.md: with 5 pairs the smallest two-sided signed-rank p is 0.0625 > 0.05.
    const v = verdict({ a: A8.slice(0, 5), b: B8.slice(0, 5), nameA: 'max', nameB: 'sum' });
    expect(v.kind).toBe('too-few-seeds');
    expect(v.words).toBe('too few seeds to tell');
    expect(v.text).toBe('too few seeds to tell');
    expect(v.probabilityOfImprovement).toBe(1);
    expect(v.wilcoxon.pTwoSided).toBe(0.0625);
    expect(v.meanDiff.high).toBeLessThan(0);
    expect(v.caveats).toContain('With 5 pairs the smallest possible two-sided signed-rank p is 0.0625; run at least 6 seeds.');
  });

  it('never gives a verdict from a single seed or from no seeds', () => {
    const one = verdict({ a: [0.1], b: [5] });
    expect(one.kind).toBe('too-few-seeds');
    expect(one.caveats.join(' ')).toMatch(/With 1 pair .* p is 1; run at least 6 seeds/);
    const none = verdict({ a: [], b: [] });
    expect(none.kind).toBe('too-few-seeds');
    expect(none.caveats).toContain('No complete seed pairs; run at least 6 seeds.');
  });

  it('A better with 8 pairs all favouring A by a clear margin', () => {
    // exact: all 8 differences negative -> two-sided p = 2/2^8 = 0.0078125 (hand-worked).
    const v = verdict({ a: A8, b: B8, nameA: 'max', nameB: 'sum' });
    expect(v.kind).toBe('a-better');
    expect(v.words).toBe('A extrapolates better');
    expect(v.text).toBe('max extrapolates better');
    expect(v.wilcoxon.pTwoSided).toBe(2 / 256);
    expect(v.wilcoxon.exact).toBe(true);
    expect(v.meanDiff.estimate).toBeCloseTo(-0.535, 12);
    expect(v.meanDiff.high).toBeLessThan(0);
    expect(v.probabilityOfImprovement).toBe(1);
    expect(v.n).toBe(8);
    expect(v.caveats).toContain('With fewer than 10 pairs the bootstrap interval tends to be too narrow.');
  });

  it('B better is the mirror image', () => {
    const v = verdict({ a: B8, b: A8, nameA: 'max', nameB: 'sum' });
    expect(v.kind).toBe('b-better');
    expect(v.text).toBe('sum extrapolates better');
    expect(v.meanDiff.low).toBeGreaterThan(0);
    expect(v.probabilityOfImprovement).toBe(0);
  });

  it('6 pairs all favouring A is enough at alpha = 0.05 (p = 0.03125)', () => {
    const v = verdict({ a: A8.slice(0, 6), b: B8.slice(0, 6) });
    expect(v.kind).toBe('a-better');
    expect(v.text).toBe('A extrapolates better');
    expect(v.wilcoxon.pTwoSided).toBe(0.03125);
  });

  it('7 pairs at alpha = 0.01 are still too few and the caveat names 8 seeds', () => {
    // hand-worked: 2/2^7 = 0.015625 >= 0.01.
    const v = verdict({ a: A8.slice(0, 7), b: B8.slice(0, 7), alpha: 0.01 });
    expect(v.kind).toBe('too-few-seeds');
    expect(v.caveats).toContain('With 7 pairs the smallest possible two-sided signed-rank p is 0.0156; run at least 8 seeds.');
  });

  it('no clear difference on hand-made noise with alternating signs', () => {
    const b = [1.0, 1.2, 0.9, 1.1, 1.05, 0.95, 1.3, 1.15, 1.0, 0.85];
    const d = [0.05, -0.07, 0.02, -0.04, 0.06, -0.03, 0.01, -0.08, 0.09, -0.05];
    const a = b.map((x, i) => x + d[i]!);
    const v = verdict({ a, b, nameA: 'max', nameB: 'sum' });
    expect(v.kind).toBe('no-difference');
    expect(v.text).toBe('no clear difference');
    expect(v.wilcoxon.pTwoSided).toBeGreaterThan(0.5);
    expect(v.meanDiff.low).toBeLessThan(0);
    expect(v.meanDiff.high).toBeGreaterThan(0);
  });

  it('no clear difference on seeded random noise (12 seeds, same distribution for both arms)', () => {
    const rng = new Rng(31);
    const a = Array.from({ length: 12 }, () => 1 + 0.1 * rng.normal());
    const b = Array.from({ length: 12 }, () => 1 + 0.1 * rng.normal());
    const v = verdict({ a, b });
    expect(v.kind).toBe('no-difference');
    expect(v.caveats).not.toContain('With fewer than 10 pairs the bootstrap interval tends to be too narrow.');
  });

  it('caveats mention the counts of runs left out', () => {
    const v = verdict({ a: A8, b: B8, nameA: 'max', nameB: 'sum', failedA: 2, failedB: 1 });
    expect(v.caveats).toContain('Left out runs that were cancelled or not run: 2 runs of max and 1 run of sum.');
    const onlyB = verdict({ a: A8, b: B8, nameA: 'max', nameB: 'sum', failedB: 3 });
    expect(onlyB.caveats).toContain('Left out runs that were cancelled or not run: 3 runs of sum.');
    const none = verdict({ a: A8, b: B8 });
    expect(none.caveats.join(' ')).not.toMatch(/failed/);
  });

  it('does not call a side when the test and the interval disagree', () => {
    // 11 seeds where A is slightly better and one seed where A is far worse: the signed-rank test is
    // significant (W+ = 12 with n = 12: P(W+ <= 12) = 70/4096 by exact enumeration, two-sided p = 0.0342),
    // but the mean difference is pulled above 0 by the outlier, so the interval is not entirely below 0.
    const b = Array.from({ length: 12 }, (_, i) => 1 + 0.01 * i);
    const d = [...Array.from({ length: 11 }, (_, i) => -0.1 - 0.01 * i), 5];
    const a = b.map((x, i) => x + d[i]!);
    const v = verdict({ a, b });
    expect(v.wilcoxon.wPlus).toBe(12);
    expect(v.wilcoxon.pTwoSided).toBe(140 / 4096);
    expect(v.meanDiff.high).toBeGreaterThan(0);
    expect(v.kind).toBe('no-difference');
    expect(v.caveats).toContain('The signed-rank test and the bootstrap interval disagree, so no side is called.');
  });

  it('flags intervals wider than the average error', () => {
    // errors around 0.1 with paired differences of +-0.2: the interval dwarfs the errors themselves.
    const b = [0.1, 0.12, 0.08, 0.11, 0.09, 0.1, 0.13, 0.07];
    const d = [0.2, -0.05, 0.25, -0.06, 0.18, -0.07, 0.22, -0.04];
    const a = b.map((x, i) => x + d[i]!);
    const v = verdict({ a, b });
    expect(v.meanDiff.high - v.meanDiff.low).toBeGreaterThan(Math.abs((v.meanA + v.meanB) / 2));
    expect(v.caveats).toContain('The interval for the difference is wider than the average error itself; the estimate is rough.');
  });

  it('flags pairs with identical errors and non-exact p-values', () => {
    const withTies = verdict({ a: [...A8, 2, 3], b: [...B8, 2, 3] });
    expect(withTies.wilcoxon.zeros).toBe(2);
    expect(withTies.caveats).toContain('2 pairs had identical errors and were left out of the signed-rank test.');
    const rng = new Rng(5);
    // The exact distribution covers every seed count a preset allows (64); beyond it the normal approximation is flagged.
    const b = Array.from({ length: 70 }, () => 1 + 0.1 * rng.normal());
    const a = b.map((x) => x - 0.05 + 0.05 * rng.normal());
    const big = verdict({ a, b, resamples: 500 });
    expect(big.wilcoxon.exact).toBe(false);
    expect(big.caveats).toContain('The p-value uses a normal approximation (70 pairs), not the exact distribution.');
    const sixtyFour = verdict({ a: a.slice(0, 64), b: b.slice(0, 64), resamples: 500 });
    expect(sixtyFour.wilcoxon.exact).toBe(true);
  });

  it('is deterministic and does not advance a supplied rng', () => {
    const one = verdict({ a: A8, b: B8 });
    const two = verdict({ a: A8, b: B8 });
    expect(two).toEqual(one);
    const rng = new Rng(77);
    const expectedNext = new Rng(77).next();
    verdict({ a: A8, b: B8, rng });
    expect(rng.next()).toBe(expectedNext);
  });

  it('rejects unpaired input and bad options', () => {
    expect(() => verdict({ a: [1, 2, 3], b: [1, 2] })).toThrow(/paired/);
    expect(() => verdict({ a: [1, 2], b: [1, NaN] })).toThrow(/NaN/);
    expect(() => verdict({ a: [1, 2], b: [1, 2], alpha: 0 })).toThrow(/alpha/);
    expect(() => verdict({ a: [1, 2], b: [1, 2], failedA: -1 })).toThrow(/failedA/);
  });

  describe('gates, baselines, adjustment and blow-ups', () => {
    // A8 beats B8 on all 8 seeds: raw exact two-sided p = 2/2^8 = 0.0078125 (both extreme sign patterns, common practice).
    it('decides from the adjusted p and reports both', () => {
      const raw = verdict({ a: A8, b: B8 });
      expect(raw.pRaw).toBe(2 / 256);
      expect(raw.kind).toBe('a-better');
      const adjusted = verdict({ a: A8, b: B8, pAdjusted: 0.06, adjustment: { method: 'holm', tests: 3 } });
      expect(adjusted.pRaw).toBe(2 / 256);
      expect(adjusted.pAdjusted).toBe(0.06);
      expect(adjusted.kind).toBe('no-difference');
      expect(adjusted.caveats.join(' ')).toMatch(/not after adjusting for 3 tests/);
      expect(() => verdict({ a: A8, b: B8, pAdjusted: 0.001 })).toThrow(/pAdjusted/);
    });

    it('counts the family size when asking whether the seeds could ever suffice', () => {
      // 6 pairs: smallest p 2/64 = 0.03125 < 0.05 alone, but 0.094 across 3 tests; 7 pairs give 2/128 < 0.05/3.
      const a6 = A8.slice(0, 6);
      const b6 = B8.slice(0, 6);
      expect(verdict({ a: a6, b: b6 }).kind).toBe('a-better');
      const three = verdict({ a: a6, b: b6, pAdjusted: Math.min(1, 3 * (2 / 64)), adjustment: { method: 'holm', tests: 3 } });
      expect(three.kind).toBe('too-few-seeds');
      expect(three.caveats.join(' ')).toMatch(/after adjusting for 3 tests; run at least 7 seeds/);
    });

    it('calls no winner when an arm is not fitted, and says why', () => {
      const v = verdict({ a: A8, b: B8, nameA: 'max', nameB: 'sum', notFitted: ['sum is not fitted: 9% above the 5% gate.'] });
      expect(v.kind).toBe('not-fitted');
      expect(v.text).toBe('not judged: an arm is not fitted');
      expect(v.caveats).toContain('sum is not fitted: 9% above the 5% gate.');
    });

    it('does not crown a winner that a constant predictor beats', () => {
      const v = verdict({ a: A8, b: B8, nameA: 'max', nameB: 'sum', beatsConstantA: false, beatsConstantB: false, constantError: 0.3 });
      expect(v.kind).toBe('no-skill');
      expect(v.caveats.join(' ')).toMatch(/max has the lower error .* does not beat the best constant predictor \(0\.3\)/);
      const winnerFine = verdict({ a: A8, b: B8, beatsConstantA: true, beatsConstantB: false });
      expect(winnerFine.kind).toBe('a-better');
    });

    it('leaves rungs outside the primary one untested', () => {
      const v = verdict({ a: A8, b: B8, tested: false });
      expect(v.kind).toBe('not-tested');
      expect(v.text).toBe('descriptive only');
    });

    it('ranks a blown-up run as the worst outcome instead of dropping it', () => {
      // B blows up on 3 seeds: those pairs count for A, so A wins all 8 pairs (p = 2/256) with no interval.
      const b = B8.map((x, i) => (i < 3 ? Infinity : x));
      const v = verdict({ a: A8, b, nameA: 'max', nameB: 'sum' });
      expect(v.nonFiniteB).toBe(3);
      expect(v.n).toBe(8);
      expect(v.pRaw).toBe(2 / 256);
      expect(v.kind).toBe('a-better');
      expect(v.meanDiff.estimate).toBe(-Infinity);
      expect(Number.isNaN(v.meanDiff.low)).toBe(true);
      expect(v.caveats.join(' ')).toMatch(/3 runs of sum blew up .* worst outcome/);
      // When A is the one that blows up on most seeds, the ranks turn against it.
      const a = A8.map((x, i) => (i < 6 ? Infinity : x));
      const w = verdict({ a, b: B8, nameA: 'max', nameB: 'sum' });
      expect(w.wilcoxon.wPlus).toBeGreaterThan(w.wilcoxon.wMinus);
      expect(w.kind).not.toBe('a-better');
    });
  });
});
