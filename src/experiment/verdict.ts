/**
 * Verdicts: the one-line answer to "does arm A extrapolate better than arm B
 * at this size?", with the evidence and plain-English caveats beside it.
 *
 * Verdict rules (errors: lower is better; a and b are paired per-seed errors,
 * and a run that blew up enters as +Infinity, the worst outcome, never as a gap):
 *
 * 1. Fewer than 2 complete seed pairs, or so few that even the most lopsided
 *    outcome could not be significant after adjustment (the smallest possible
 *    two-sided exact signed-rank p, 2/2^n, times the number of tests in the
 *    adjustment family, is >= alpha) -> "too few seeds to tell". A single seed
 *    never gives a verdict.
 * 2. A rung outside the declared primary rung -> "descriptive only": its
 *    numbers are shown but nothing is tested there.
 * 3. An arm that missed the fit gate -> "not judged: an arm is not fitted":
 *    a network that has not learned its training distribution says nothing
 *    about extrapolation.
 * 4. Otherwise "A extrapolates better" only if ALL of these hold:
 *    - the multiplicity-adjusted p (Holm across every tested (rung, pair) of
 *      the preset, or the primary rung's pairs) is < alpha; the raw two-sided
 *      Wilcoxon signed-rank p (exact for n <= 64) is reported beside it,
 *    - the signed-rank sums point the same way (W- > W+),
 *    - when every value is finite, the paired percentile bootstrap interval
 *      (level 1 - alpha) of the mean difference a - b lies entirely below 0
 *      (with a blown-up run the mean is infinite and only the ranks speak).
 *    If the better arm does not beat the best constant predictor at the rung,
 *    the verdict is "neither beats a constant" instead: being less wrong than
 *    a useless arm is not extrapolation.
 *    "B extrapolates better" is the mirror image.
 * 5. Anything else -> "no clear difference".
 *
 * Pairs whose difference is exactly 0 (including two blown-up runs) are dropped
 * from the signed-rank test but stay in the probability of improvement.
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

export type VerdictKind = 'a-better' | 'b-better' | 'no-difference' | 'too-few-seeds' | 'not-fitted' | 'no-skill' | 'not-tested';

/** The fixed verdict phrases, with A and B standing for the arms. */
export const VERDICT_WORDS: Readonly<Record<VerdictKind, string>> = {
  'a-better': 'A extrapolates better',
  'b-better': 'B extrapolates better',
  'no-difference': 'no clear difference',
  'too-few-seeds': 'too few seeds to tell',
  'not-fitted': 'not judged: an arm is not fitted',
  'no-skill': 'neither beats a constant',
  'not-tested': 'descriptive only',
};

/** How the p-values of a preset were adjusted for the number of tests. */
export interface Adjustment {
  /** 'holm': Holm–Bonferroni over every tested (rung, pair); 'primary': only the declared primary rung is tested. */
  method: 'holm' | 'primary';
  /** Tests in the adjustment family. */
  tests: number;
}

export interface VerdictInput {
  /** Per-seed errors of arm A, aligned with `b` by seed; incomplete pairs already removed. */
  a: readonly number[];
  /** Per-seed errors of arm B. */
  b: readonly number[];
  nameA?: string;
  nameB?: string;
  /** Significance level (default 0.05). The bootstrap interval uses level 1 - alpha. */
  alpha?: number;
  /** Runs of A left out because they were cancelled or never ran (for the caveat); blown-up runs come in `a` as +Infinity instead. */
  failedA?: number;
  /** Runs of B left out likewise. */
  failedB?: number;
  /**
   * Resampling source; the verdict uses `rng.fork('verdict/bootstrap')` and
   * does not advance it. Default: a fixed seed, so verdicts are reproducible.
   */
  rng?: Rng;
  /** Bootstrap resamples (default 2000). */
  resamples?: number;
  /** The p-value after multiplicity adjustment; the decision uses it (default: the raw p, one test). */
  pAdjusted?: number;
  adjustment?: Adjustment;
  /** False on a rung that is not the declared primary one: nothing is tested there. */
  tested?: boolean;
  /** Arms that missed the fit gate, each with a plain sentence giving the numbers. */
  notFitted?: string[];
  /** Whether each arm's mean error at this rung beats the best constant predictor (default true). */
  beatsConstantA?: boolean;
  beatsConstantB?: boolean;
  /** The best constant predictor's mean error at this rung, for the caveat. */
  constantError?: number;
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
  /**
   * Mean of a - b with its paired percentile bootstrap interval (level 1 - alpha); with a
   * blown-up run the estimate is infinite (or NaN when both arms blew up on different seeds)
   * and the interval NaN.
   */
  meanDiff: Interval;
  /** Raw two-sided signed-rank p (= wilcoxon.pTwoSided) and the adjusted p the decision used. */
  pRaw: number;
  pAdjusted: number;
  adjustment: Adjustment | null;
  /** Runs of each arm in this pair that blew up and rank as the worst outcome. */
  nonFiniteA: number;
  nonFiniteB: number;
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
  const nonFiniteA = a.filter((x) => !Number.isFinite(x)).length;
  const nonFiniteB = b.filter((x) => !Number.isFinite(x)).length;
  const allFinite = nonFiniteA === 0 && nonFiniteB === 0;
  const meanDiff: Interval = allFinite
    ? pairedBootstrapDifference(a, b, { rng, resamples: input.resamples ?? 2000, level: 1 - alpha })
    : { estimate: mean(a.map((x, i) => (x === b[i] ? 0 : x - b[i]!))), low: NaN, high: NaN };
  const meanA = mean(a);
  const meanB = mean(b);
  const poi = probabilityOfImprovement(a, b);
  const adjustment = input.adjustment ?? null;
  const tests = adjustment?.tests ?? 1;
  const pRaw = wilcoxon.pTwoSided;
  const pAdjusted = input.pAdjusted ?? pRaw;
  if (!(pAdjusted >= pRaw - 1e-12 && pAdjusted <= 1)) {
    throw new Error(`experiment/verdict: pAdjusted must lie between the raw p (${pRaw}) and 1 (got ${pAdjusted})`);
  }

  const caveats: string[] = [];
  if (failedA > 0 || failedB > 0) {
    const parts: string[] = [];
    if (failedA > 0) parts.push(`${plural(failedA, 'run', 'runs')} of ${nameA}`);
    if (failedB > 0) parts.push(`${plural(failedB, 'run', 'runs')} of ${nameB}`);
    caveats.push(`Left out runs that were cancelled or not run: ${parts.join(' and ')}.`);
  }
  if (!allFinite) {
    const parts: string[] = [];
    if (nonFiniteA > 0) parts.push(`${plural(nonFiniteA, 'run', 'runs')} of ${nameA}`);
    if (nonFiniteB > 0) parts.push(`${plural(nonFiniteB, 'run', 'runs')} of ${nameB}`);
    caveats.push(`${parts.join(' and ')} blew up (diverged, failed or a non-finite error); they count as the worst outcome in the signed-rank test, and the mean difference has no interval.`);
  }

  const needed = seedsNeededForSignificance(alpha / tests);
  let kind: VerdictKind;
  if (n < 2 || minimumTwoSidedP(n) * tests >= alpha) {
    kind = 'too-few-seeds';
    if (n === 0) {
      caveats.push(`No complete seed pairs; run at least ${needed} seeds.`);
    } else {
      caveats.push(
        `With ${plural(n, 'pair', 'pairs')} the smallest possible two-sided signed-rank p is ${fmt(minimumTwoSidedP(n))}${tests > 1 ? `, ${fmt(Math.min(1, minimumTwoSidedP(n) * tests))} after adjusting for ${tests} tests` : ''}; run at least ${needed} seeds.`,
      );
    }
  } else if (input.tested === false) {
    kind = 'not-tested';
  } else if (input.notFitted && input.notFitted.length > 0) {
    kind = 'not-fitted';
    caveats.push(...input.notFitted);
  } else {
    const significant = pAdjusted < alpha;
    const below = allFinite ? meanDiff.high < 0 : true;
    const above = allFinite ? meanDiff.low > 0 : true;
    if (significant && below && wilcoxon.wMinus > wilcoxon.wPlus) kind = 'a-better';
    else if (significant && above && wilcoxon.wPlus > wilcoxon.wMinus) kind = 'b-better';
    else kind = 'no-difference';

    if (kind === 'no-difference' && allFinite && (significant || meanDiff.high < 0 || meanDiff.low > 0)) {
      caveats.push(
        significant
          ? 'The signed-rank test and the bootstrap interval disagree, so no side is called.'
          : pRaw < alpha
            ? `The raw signed-rank p (${fmt(pRaw)}) is below ${alpha}, but not after adjusting for ${tests} tests (${fmt(pAdjusted)}).`
            : 'The bootstrap interval excludes 0 but the signed-rank test is not significant, so no side is called.',
      );
    }
    const winnerBeatsConstant = kind === 'a-better' ? input.beatsConstantA !== false : kind === 'b-better' ? input.beatsConstantB !== false : true;
    if (!winnerBeatsConstant) {
      const winner = kind === 'a-better' ? nameA : nameB;
      caveats.push(
        `${winner} has the lower error (adjusted p = ${fmt(pAdjusted)}), but its mean error does not beat the best constant predictor${input.constantError !== undefined ? ` (${fmt(input.constantError)})` : ''}; neither arm has learned this rung.`,
      );
      kind = 'no-skill';
    } else if (input.beatsConstantA === false && input.beatsConstantB === false) {
      caveats.push(`Neither arm beats the best constant predictor at this rung${input.constantError !== undefined ? ` (${fmt(input.constantError)})` : ''}.`);
    }
    if (n < 10 && allFinite) caveats.push(`With fewer than 10 pairs the bootstrap interval tends to be too narrow.`);
    const typical = Math.abs((meanA + meanB) / 2);
    if (allFinite && meanDiff.high - meanDiff.low > typical) {
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
  return {
    kind,
    words,
    text,
    caveats,
    n,
    alpha,
    meanA,
    meanB,
    meanDiff,
    pRaw,
    pAdjusted,
    adjustment,
    nonFiniteA,
    nonFiniteB,
    probabilityOfImprovement: poi,
    wilcoxon,
  };
}
