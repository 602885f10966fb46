/**
 * Verdicts: the one-line answer to "does arm A extrapolate better than arm B
 * at this size?", with the evidence and plain-English caveats beside it.
 *
 * Verdict rules (errors: lower is better; a and b are paired per-seed errors):
 *
 * 1. Fewer than 2 complete seed pairs -> "too few seeds to tell". A single seed
 *    never gives a verdict.
 * 2. If, with n pairs, even the most lopsided outcome could not be significant
 *    - the smallest possible two-sided exact signed-rank p, 2/2^n, is >= alpha -
 *    -> "too few seeds to tell", with a caveat giving that smallest p and the
 *    number of seeds needed (6 at alpha = 0.05; 5 pairs give at best 0.0625).
 * 3. Otherwise "A extrapolates better" only if ALL of these hold:
 *    - the two-sided Wilcoxon signed-rank p (exact for n <= 50) is < alpha,
 *    - the paired percentile bootstrap interval (level 1 - alpha) of the mean
 *      difference a - b lies entirely below 0,
 *    - the signed-rank sums point the same way (W- > W+, i.e. A's errors are
 *      lower on the larger ranks).
 *    "B extrapolates better" is the mirror image (interval entirely above 0,
 *    W+ > W-).
 * 4. Anything else -> "no clear difference".
 *
 * Pairs whose difference is exactly 0 are dropped from the signed-rank test
 * (so they can only make significance harder) but stay in the bootstrap and the
 * probability of improvement. Caveats are added for: failed or diverged runs
 * left out (with counts per arm), pairs with identical errors, a p-value from
 * the normal approximation instead of the exact distribution, fewer than 10
 * pairs (the percentile bootstrap interval then tends to be too narrow), an
 * interval for the difference wider than the arms' average error, and the
 * test and the interval disagreeing.
 */
import { Rng } from '../util/rng.ts';
import {
  type Interval,
  type WilcoxonResult,
  mean,
  minimumTwoSidedP,
  pairedBootstrapDifference,
  probabilityOfImprovement,
  seedsNeededForSignificance,
  wilcoxonSignedRank,
} from './statistics.ts';

export type VerdictKind = 'a-better' | 'b-better' | 'no-difference' | 'too-few-seeds';

/** The fixed verdict phrases, with A and B standing for the arms. */
export const VERDICT_WORDS: Readonly<Record<VerdictKind, string>> = {
  'a-better': 'A extrapolates better',
  'b-better': 'B extrapolates better',
  'no-difference': 'no clear difference',
  'too-few-seeds': 'too few seeds to tell',
};

export interface VerdictInput {
  /** Per-seed errors of arm A, aligned with `b` by seed; incomplete pairs already removed. */
  a: readonly number[];
  /** Per-seed errors of arm B. */
  b: readonly number[];
  nameA?: string;
  nameB?: string;
  /** Significance level (default 0.05). The bootstrap interval uses level 1 - alpha. */
  alpha?: number;
  /** Runs of A that failed or diverged and were left out (for the caveat). */
  failedA?: number;
  /** Runs of B that failed or diverged and were left out (for the caveat). */
  failedB?: number;
  /**
   * Resampling source; the verdict uses `rng.fork('verdict/bootstrap')` and
   * does not advance it. Default: a fixed seed, so verdicts are reproducible.
   */
  rng?: Rng;
  /** Bootstrap resamples (default 2000). */
  resamples?: number;
}

export interface Verdict {
  kind: VerdictKind;
  /** The fixed phrase, e.g. "A extrapolates better". */
  words: string;
  /** The phrase with arm names substituted, e.g. "max extrapolates better". */
  text: string;
  /** Short plain-English caveats; empty when there is nothing to flag. */
  caveats: string[];
  /** Number of seed pairs used. */
  n: number;
  alpha: number;
  meanA: number;
  meanB: number;
  /** Mean of a - b with its paired percentile bootstrap interval (level 1 - alpha). */
  meanDiff: Interval;
  /** Paired P(a_i < b_i), ties counting 1/2. */
  probabilityOfImprovement: number;
  wilcoxon: WilcoxonResult;
}

/** Short number for caveat text: 3 significant digits, no trailing zeros. */
function fmt(x: number): string {
  return String(Number(x.toPrecision(3)));
}

function plural(count: number, one: string, many: string): string {
  return `${count} ${count === 1 ? one : many}`;
}

/** Decide a verdict for paired per-seed errors a (arm A) and b (arm B). See the module comment for the rules. */
export function verdict(input: VerdictInput): Verdict {
  const { a, b } = input;
  const nameA = input.nameA ?? 'A';
  const nameB = input.nameB ?? 'B';
  const alpha = input.alpha ?? 0.05;
  const failedA = input.failedA ?? 0;
  const failedB = input.failedB ?? 0;
  if (!(alpha > 0 && alpha < 1)) throw new Error(`experiment/verdict: alpha must be strictly between 0 and 1 (got ${alpha})`);
  for (const [label, v] of [['failedA', failedA], ['failedB', failedB]] as const) {
    if (!Number.isInteger(v) || v < 0) throw new Error(`experiment/verdict: ${label} must be a non-negative integer (got ${v})`);
  }
  if (a.length !== b.length) {
    throw new Error(`experiment/verdict: a and b must be paired by seed (got ${a.length} and ${b.length} values)`);
  }

  const n = a.length;
  const rng = (input.rng ?? new Rng(0x5eed)).fork('verdict/bootstrap');
  const wilcoxon = wilcoxonSignedRank(a, b);
  const meanDiff = pairedBootstrapDifference(a, b, { rng, resamples: input.resamples ?? 2000, level: 1 - alpha });
  const meanA = mean(a);
  const meanB = mean(b);
  const poi = probabilityOfImprovement(a, b);

  const caveats: string[] = [];
  if (failedA > 0 || failedB > 0) {
    const parts: string[] = [];
    if (failedA > 0) parts.push(`${plural(failedA, 'run', 'runs')} of ${nameA}`);
    if (failedB > 0) parts.push(`${plural(failedB, 'run', 'runs')} of ${nameB}`);
    caveats.push(`Left out failed or diverged runs: ${parts.join(' and ')}.`);
  }

  const needed = seedsNeededForSignificance(alpha);
  let kind: VerdictKind;
  if (n < 2 || minimumTwoSidedP(n) >= alpha) {
    kind = 'too-few-seeds';
    if (n === 0) {
      caveats.push(`No complete seed pairs; run at least ${needed} seeds.`);
    } else {
      caveats.push(
        `With ${plural(n, 'pair', 'pairs')} the smallest possible two-sided signed-rank p is ${fmt(minimumTwoSidedP(n))}; run at least ${needed} seeds.`,
      );
    }
  } else {
    const significant = wilcoxon.pTwoSided < alpha;
    const below = meanDiff.high < 0;
    const above = meanDiff.low > 0;
    if (significant && below && wilcoxon.wMinus > wilcoxon.wPlus) kind = 'a-better';
    else if (significant && above && wilcoxon.wPlus > wilcoxon.wMinus) kind = 'b-better';
    else kind = 'no-difference';

    if (kind === 'no-difference' && (significant || below || above)) {
      caveats.push('The signed-rank test and the bootstrap interval disagree, so no side is called.');
    }
    if (n < 10) caveats.push(`With fewer than 10 pairs the bootstrap interval tends to be too narrow.`);
    const typical = Math.abs((meanA + meanB) / 2);
    if (meanDiff.high - meanDiff.low > typical) {
      caveats.push('The interval for the difference is wider than the average error itself; the estimate is rough.');
    }
  }

  if (wilcoxon.zeros > 0) {
    caveats.push(`${plural(wilcoxon.zeros, 'pair had', 'pairs had')} identical errors and ${wilcoxon.zeros === 1 ? 'was' : 'were'} left out of the signed-rank test.`);
  }
  if (!wilcoxon.exact) {
    caveats.push(`The p-value uses a normal approximation (${wilcoxon.n} pairs), not the exact distribution.`);
  }

  const words = VERDICT_WORDS[kind];
  const text = kind === 'a-better' ? `${nameA} extrapolates better` : kind === 'b-better' ? `${nameB} extrapolates better` : words;
  return { kind, words, text, caveats, n, alpha, meanA, meanB, meanDiff, probabilityOfImprovement: poi, wilcoxon };
}
