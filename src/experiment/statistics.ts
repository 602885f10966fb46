/**
 * Statistics for comparing arms over seeds. Host-agnostic pure functions: no
 * I/O, no globals, and every random draw comes from a caller-supplied `Rng`.
 *
 * Conventions used throughout:
 * - Metrics are errors: LOWER IS BETTER.
 * - `a` and `b` passed together are PAIRED by seed: `a[i]` and `b[i]` come from
 *   the same seed (same data, same test graphs). The caller removes pairs where
 *   either value is missing or NaN before calling.
 * - Failed runs (diverged training, a non-finite test error) may be passed as
 *   `+Infinity` to the rank-based functions `wilcoxonSignedRank` and
 *   `probabilityOfImprovement`, which rank such a run as the worst possible
 *   outcome (two failed runs on the same seed are a tie). Everything else
 *   (means, bootstrap intervals, the unpaired probability of improvement)
 *   needs finite values; callers skip those when `countNonFinite` > 0.
 * - Functions throw on inputs they cannot use (NaN anywhere, -Infinity
 *   anywhere, +Infinity where finite values are needed) rather than silently
 *   producing a number that looks meaningful.
 */
import type { Rng } from '../util/rng.ts';

// ---------------------------------------------------------------------------
// Input checks
// ---------------------------------------------------------------------------

function assertFinite(xs: readonly number[], what: string): void {
  for (let i = 0; i < xs.length; i++) {
    if (!Number.isFinite(xs[i])) {
      throw new Error(`experiment/statistics: ${what}[${i}] is ${xs[i]}; remove missing or failed runs before computing statistics`);
    }
  }
}

/**
 * For the rank-based functions: finite values and +Infinity (a failed run,
 * ranked worst) are accepted; NaN and -Infinity are not.
 */
function assertFiniteOrFailed(xs: readonly number[], what: string): void {
  for (let i = 0; i < xs.length; i++) {
    const x = xs[i]!;
    if (Number.isNaN(x)) {
      throw new Error(`experiment/statistics: ${what}[${i}] is NaN; remove missing runs, and pass a failed run as +Infinity`);
    }
    if (x === -Infinity) {
      throw new Error(`experiment/statistics: ${what}[${i}] is -Infinity; errors are lower-is-better, so a failed run must be +Infinity`);
    }
  }
}

/**
 * Number of entries that are not finite numbers (NaN, +Infinity or -Infinity).
 * Callers use it to decide whether a bootstrap interval can be computed at all
 * (the bootstrap refuses non-finite values) and to word caveats.
 */
export function countNonFinite(xs: readonly number[]): number {
  let k = 0;
  for (const x of xs) if (!Number.isFinite(x)) k++;
  return k;
}

function assertSameLength(a: readonly number[], b: readonly number[]): void {
  if (a.length !== b.length) {
    throw new Error(`experiment/statistics: paired samples must have the same length (got ${a.length} and ${b.length})`);
  }
}

// ---------------------------------------------------------------------------
// Point estimates
// ---------------------------------------------------------------------------

/** Arithmetic mean. Returns NaN for an empty list. */
export function mean(xs: readonly number[]): number {
  if (xs.length === 0) return NaN;
  let s = 0;
  for (const x of xs) s += x;
  return s / xs.length;
}

/**
 * Interquartile mean: the mean trimmed 25% each side, with fractional weights
 * for the boundary elements when n is not a multiple of 4.
 *
 * Exact definition used here: sort the values x(1) <= ... <= x(n) and let the
 * i-th sorted value occupy the interval [i-1, i] of the "position line" [0, n].
 * Keep the window [n/4, 3n/4] (length n/2). Each value gets weight equal to the
 * length of its interval that falls inside the window, so every weight is in
 * [0, 1] and the weights add up to n/2. IQM = sum(w_i * x(i)) / (n/2).
 *
 * Examples: n = 8 keeps x(3..6) with weight 1 each; n = 10 keeps x(4..7) with
 * weight 1 and x(3), x(8) with weight 1/2; n = 9 gives x(3), x(7) weight 3/4.
 * For n = 1 the IQM is the value itself; for n = 2 it is the mean.
 * Returns NaN for an empty list.
 *
 * Note: some libraries instead drop floor(n/4) values from each end with no
 * fractional weighting (a plain 25% trimmed mean). The two agree when n is a
 * multiple of 4 and differ slightly otherwise.
 */
export function interquartileMean(xs: readonly number[]): number {
  const n = xs.length;
  if (n === 0) return NaN;
  const sorted = [...xs].sort((p, q) => p - q);
  const lo = n / 4;
  const hi = (3 * n) / 4;
  let s = 0;
  for (let i = 0; i < n; i++) {
    const w = Math.min(i + 1, hi) - Math.max(i, lo);
    if (w > 0) s += w * sorted[i]!;
  }
  return s / (n / 2);
}

/**
 * Quantile of an ALREADY SORTED list by linear interpolation between order
 * statistics (the "type 7" rule, the default of R's `quantile` and NumPy's
 * `percentile`): position h = (m - 1) * p on the 0-based index line.
 */
export function quantileSorted(sorted: readonly number[], p: number): number {
  const m = sorted.length;
  if (m === 0) return NaN;
  if (p <= 0) return sorted[0]!;
  if (p >= 1) return sorted[m - 1]!;
  const h = (m - 1) * p;
  const i = Math.floor(h);
  const frac = h - i;
  const lo = sorted[i]!;
  const hiV = sorted[Math.min(i + 1, m - 1)]!;
  return frac === 0 ? lo : lo + frac * (hiV - lo);
}

// ---------------------------------------------------------------------------
// Bootstrap
// ---------------------------------------------------------------------------

/** A point estimate with a two-sided interval. */
export interface Interval {
  estimate: number;
  low: number;
  high: number;
}

export interface BootstrapOptions {
  /** Source of every resampling draw. The function advances this generator. */
  rng: Rng;
  /** Number of bootstrap resamples (default 2000). */
  resamples?: number;
  /** Two-sided coverage level of the interval (default 0.95). */
  level?: number;
}

function checkBootstrapOptions(resamples: number, level: number): void {
  if (!Number.isInteger(resamples) || resamples < 1) {
    throw new Error(`experiment/statistics: resamples must be a positive integer (got ${resamples})`);
  }
  if (!(level > 0 && level < 1)) {
    throw new Error(`experiment/statistics: level must be strictly between 0 and 1 (got ${level})`);
  }
}

/**
 * Percentile bootstrap interval for `statistic(xs)`.
 *
 * Draws `resamples` samples of size n with replacement (indices from
 * `rng.int(0, n-1)`, in order, so the result is a pure function of the data
 * and the generator's state), evaluates the statistic on each, and returns the
 * (1-level)/2 and (1+level)/2 quantiles of those values (linear
 * interpolation, see `quantileSorted`). `estimate` is the statistic on the
 * original data.
 *
 * Honest limits: the percentile bootstrap of a mean undercovers at small n,
 * because it uses the plug-in spread and normal-like rather than t quantiles.
 * For normal data a nominal 95% interval covers about 93% at n = 20, 90% at
 * n = 10, 89% at n = 8 and 85% at n = 5 (measured here; it matches
 * P(|t_{n-1}| <= 1.96 * sqrt((n-1)/n))).
 *
 * Edge cases: empty input gives NaN for all three; a single value gives a
 * zero-width interval at that value (the bootstrap cannot see spread it was
 * not shown). Throws on non-finite inputs.
 */
export function bootstrapInterval(
  xs: readonly number[],
  statistic: (sample: readonly number[]) => number,
  options: BootstrapOptions,
): Interval {
  const resamples = options.resamples ?? 2000;
  const level = options.level ?? 0.95;
  checkBootstrapOptions(resamples, level);
  assertFinite(xs, 'xs');
  const n = xs.length;
  if (n === 0) return { estimate: NaN, low: NaN, high: NaN };
  const estimate = statistic(xs);
  const replicates = new Array<number>(resamples);
  const sample = new Array<number>(n);
  for (let r = 0; r < resamples; r++) {
    for (let i = 0; i < n; i++) sample[i] = xs[options.rng.int(0, n - 1)]!;
    const v = statistic(sample);
    if (Number.isNaN(v)) throw new Error('experiment/statistics: statistic returned NaN on a bootstrap resample');
    replicates[r] = v;
  }
  replicates.sort((p, q) => p - q);
  const tail = (1 - level) / 2;
  return { estimate, low: quantileSorted(replicates, tail), high: quantileSorted(replicates, 1 - tail) };
}

/**
 * Paired bootstrap for the difference a - b (lower error is better, so a
 * negative difference favours A).
 *
 * Works on the per-seed differences d_i = a_i - b_i: `estimate` is
 * `statistic(d)` (default: the mean difference) and the interval is the
 * percentile bootstrap over resampled PAIRS (resampling d_i is the same as
 * resampling whole seed pairs). Same options, determinism and limits as
 * `bootstrapInterval`. Throws if the lengths differ or a value is not finite,
 * including +Infinity from a failed run: a mean difference with a failed run
 * in it is not a number, so callers skip the interval when `countNonFinite`
 * of either arm is > 0 (the signed-rank test still ranks such pairs).
 */
export function pairedBootstrapDifference(
  a: readonly number[],
  b: readonly number[],
  options: BootstrapOptions & { statistic?: (sample: readonly number[]) => number },
): Interval {
  assertSameLength(a, b);
  assertFinite(a, 'a');
  assertFinite(b, 'b');
  const d = a.map((x, i) => x - b[i]!);
  return bootstrapInterval(d, options.statistic ?? mean, options);
}

// ---------------------------------------------------------------------------
// Probability of improvement
// ---------------------------------------------------------------------------

/**
 * Paired probability that A beats B: the fraction of seed pairs i with
 * a_i < b_i (lower error wins), counting exact ties as 1/2.
 * 0.5 means no tendency, 1 means A wins on every seed. NaN for empty input.
 *
 * A failed run may be passed as +Infinity: it loses to any finite error, and
 * two failed runs on the same seed are a tie (1/2). NaN and -Infinity throw.
 */
export function probabilityOfImprovement(a: readonly number[], b: readonly number[]): number {
  assertSameLength(a, b);
  assertFiniteOrFailed(a, 'a');
  assertFiniteOrFailed(b, 'b');
  if (a.length === 0) return NaN;
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i]! < b[i]! ? 1 : a[i] === b[i] ? 0.5 : 0;
  return s / a.length;
}

/**
 * Unpaired probability that A beats B: over ALL pairs (i, j), the fraction with
 * a_i < b_j, ties counting 1/2. This is the Mann-Whitney U statistic divided by
 * n_a * n_b (the "common-language effect size"). It ignores the seed pairing,
 * so use it only where runs are not paired; the arrays may differ in length.
 * NaN if either is empty.
 */
export function probabilityOfImprovementUnpaired(a: readonly number[], b: readonly number[]): number {
  assertFinite(a, 'a');
  assertFinite(b, 'b');
  if (a.length === 0 || b.length === 0) return NaN;
  let s = 0;
  for (const x of a) for (const y of b) s += x < y ? 1 : x === y ? 0.5 : 0;
  return s / (a.length * b.length);
}

// ---------------------------------------------------------------------------
// Normal distribution (for the large-n approximation)
// ---------------------------------------------------------------------------

/** Complementary error function for z >= 0, accurate to ~1e-15 relative. */
function erfcNonNegative(z: number): number {
  if (z < 2) {
    // erf(z) = 2/sqrt(pi) * exp(-z^2) * sum_k (2 z^2)^k z / (1*3*...*(2k+1)); all terms positive.
    let term = z;
    let sum = z;
    const z2 = 2 * z * z;
    for (let k = 1; k < 200; k++) {
      term *= z2 / (2 * k + 1);
      sum += term;
      if (term < sum * 1e-17) break;
    }
    return 1 - (2 / Math.sqrt(Math.PI)) * Math.exp(-z * z) * sum;
  }
  // Continued fraction erfc(z) = exp(-z^2)/sqrt(pi) / (z + (1/2)/(z + (2/2)/(z + (3/2)/(z + ...)))),
  // evaluated from the tail; 80 levels is far more than needed for z >= 2.
  let f = z;
  for (let k = 80; k >= 1; k--) f = z + k / 2 / f;
  return Math.exp(-z * z) / (Math.sqrt(Math.PI) * f);
}

/** Standard normal cumulative distribution function Phi(x). */
export function normalCdf(x: number): number {
  if (Number.isNaN(x)) return NaN;
  const z = x / Math.SQRT2;
  // Phi(x) = erfc(-x/sqrt2)/2
  return z <= 0 ? 0.5 * erfcNonNegative(-z) : 1 - 0.5 * erfcNonNegative(z);
}

// ---------------------------------------------------------------------------
// Wilcoxon signed-rank test
// ---------------------------------------------------------------------------

export interface WilcoxonResult {
  /** Number of non-zero differences actually ranked. */
  n: number;
  /**
   * Number of pairs with a_i - b_i exactly 0, dropped before ranking. Includes
   * pairs where both runs failed (+Infinity on both sides), see `bothInfinite`.
   */
  zeros: number;
  /** Pairs where both values were +Infinity (both runs failed); counted in `zeros`. */
  bothInfinite: number;
  /**
   * Ranked pairs whose difference is infinite: exactly one of the two runs
   * failed (+Infinity). They share the largest ranks (midranks among them).
   */
  infinite: number;
  /** Sum of (mid)ranks of |d| over pairs with a_i > b_i. */
  wPlus: number;
  /** Sum of (mid)ranks of |d| over pairs with a_i < b_i. */
  wMinus: number;
  /** W = min(wPlus, wMinus), the statistic printed tables are indexed by. */
  statistic: number;
  /** Two-sided p-value: min(1, 2 * min(pLessA, pGreaterA)). */
  pTwoSided: number;
  /** One-sided p-value for the alternative "A has lower error than B": P(W+ <= observed). */
  pLessA: number;
  /** One-sided p-value for the alternative "A has higher error than B": P(W+ >= observed). */
  pGreaterA: number;
  /** True when p-values come from the exact permutation distribution. */
  exact: boolean;
  /** True when some non-zero |d| were tied (midranks used). */
  ties: boolean;
  /** Smallest two-sided p-value this n could possibly give (2 / 2^n when exact). */
  minAchievableP: number;
}

export interface WilcoxonOptions {
  /**
   * Largest n for which the exact distribution is used (default and maximum
   * 64, the seed cap). Above it the normal approximation is used and the
   * result says `exact: false`.
   */
  maxExactN?: number;
}

/**
 * Largest n the exact signed-rank distribution supports (the seed cap). At
 * n = 64 single counts of sign assignments reach about 4.9e16 untied and
 * C(64, 32) ~ 1.8e18 when all |d| are tied, beyond the 2^53 ~ 9.0e15 up to
 * which doubles count exactly, so counts are kept in two 32-bit limbs (see
 * `LimbCounts`).
 */
export const WILCOXON_MAX_EXACT_N = 64;

const LIMB = 2 ** 32;

/**
 * Exact null counts held in two double "limbs": the number of sign assignments
 * with doubled positive-rank sum s is hi[s] * 2^32 + lo[s], with lo[s] an
 * integer in [0, 2^32). With n <= 64 every hi[s] is an integer <= 2^32, so
 * every addition below is exact in doubles.
 */
interface LimbCounts {
  n: number;
  hi: Float64Array;
  lo: Float64Array;
}

/** Total of the doubled ranks, after checking n and that every entry is a non-negative integer. */
function checkDoubledRanks(doubledRanks: readonly number[]): number {
  if (doubledRanks.length > WILCOXON_MAX_EXACT_N) {
    throw new Error(`experiment/statistics: exact signed-rank distribution supports n <= ${WILCOXON_MAX_EXACT_N}`);
  }
  let total = 0;
  for (const r of doubledRanks) {
    if (!Number.isInteger(r) || r < 0) throw new Error('experiment/statistics: doubled ranks must be non-negative integers');
    total += r;
  }
  return total;
}

/**
 * Subset-sum dynamic programming over the doubled ranks, O(n * sum of ranks),
 * with exact two-limb counts. n = 64 untied (doubled sum 4160) is about
 * 87 000 limb additions: a few milliseconds at most.
 */
function limbNullCounts(doubledRanks: readonly number[]): LimbCounts {
  const total = checkDoubledRanks(doubledRanks);
  const hi = new Float64Array(total + 1);
  const lo = new Float64Array(total + 1);
  lo[0] = 1;
  let reach = 0;
  for (const r of doubledRanks) {
    reach += r;
    // Descending s so that counts[s - r] is still the value before this rank was added
    // (for r = 0 it is the same cell, read before it is written: every count doubles).
    for (let s = reach; s >= r; s--) {
      let l = lo[s]! + lo[s - r]!;
      let h = hi[s]! + hi[s - r]!;
      if (l >= LIMB) {
        l -= LIMB;
        h += 1;
      }
      lo[s] = l;
      hi[s] = h;
    }
  }
  return { n: doubledRanks.length, hi, lo };
}

/**
 * P(from <= 2W+ <= to) = (sum of counts) / 2^n, correctly rounded: the limb
 * sums are exact (sum of hi <= 2^32; sum of lo < (to - from + 1) * 2^32, below
 * 2^45 for midranks of n <= 64, whose doubled sum is at most 4160), and the
 * result is hiSum * 2^(32-n) + loSum * 2^-n with both products exact, so the
 * only rounding is the final addition.
 */
function limbProbability(c: LimbCounts, from: number, to: number): number {
  let h = 0;
  let l = 0;
  const last = Math.min(to, c.hi.length - 1);
  for (let s = Math.max(0, from); s <= last; s++) {
    h += c.hi[s]!;
    l += c.lo[s]!;
  }
  const carry = Math.floor(l / LIMB);
  h += carry;
  l -= carry * LIMB;
  return h * 2 ** (32 - c.n) + l * 2 ** -c.n;
}

/** Orders numbers including +Infinity (subtraction would give NaN for Infinity - Infinity). */
function compareNumbers(p: number, q: number): number {
  return p < q ? -1 : p > q ? 1 : 0;
}

/**
 * Ranks of |d| (all entries non-zero, possibly +Infinity), doubled so that
 * midranks stay integers: a group of tied values occupying 1-based positions
 * i..j gets midrank (i+j)/2, i.e. doubled rank i + j. Returned in the original
 * order. Infinite values sort last and tie with each other.
 */
function doubledMidranks(absValues: readonly number[]): number[] {
  const n = absValues.length;
  const order = absValues.map((_, i) => i).sort((p, q) => compareNumbers(absValues[p]!, absValues[q]!));
  const ranks = new Array<number>(n);
  let start = 0;
  while (start < n) {
    let end = start;
    while (end + 1 < n && absValues[order[end + 1]!] === absValues[order[start]!]) end++;
    const doubled = start + 1 + (end + 1); // (i + j) for 1-based i = start+1, j = end+1
    for (let k = start; k <= end; k++) ranks[order[k]!] = doubled;
    start = end + 1;
  }
  return ranks;
}

/**
 * Exact null distribution of the doubled signed-rank statistic 2*W+ for the
 * given doubled ranks: `counts[s]` is the number of the 2^n equally likely sign
 * assignments whose positive ranks add up to s (in doubled units). Computed by
 * subset-sum dynamic programming over the ranks, O(n * sum of ranks), n <= 64.
 *
 * The counts are computed exactly (see `signedRankNullCountsExact`) and then
 * returned as doubles: exact whenever a count is below 2^53, which always
 * holds for n <= 53; above that, large counts are the nearest double.
 */
export function signedRankNullCounts(doubledRanks: readonly number[]): number[] {
  const c = limbNullCounts(doubledRanks);
  return Array.from(c.hi, (h, s) => h * LIMB + c.lo[s]!);
}

/** As `signedRankNullCounts`, but every count exact as a bigint (they sum to 2^n). */
export function signedRankNullCountsExact(doubledRanks: readonly number[]): bigint[] {
  const c = limbNullCounts(doubledRanks);
  return Array.from(c.hi, (h, s) => (BigInt(h) << 32n) + BigInt(c.lo[s]!));
}

/**
 * Exact null probabilities P(2W+ = s) = counts[s] / 2^n, each correctly
 * rounded to a double (relative error <= 2^-53). Same input rules as
 * `signedRankNullCounts`.
 */
export function signedRankNullProbabilities(doubledRanks: readonly number[]): number[] {
  const c = limbNullCounts(doubledRanks);
  return Array.from(c.hi, (_, s) => limbProbability(c, s, s));
}

/**
 * Exact null counts of W+ for n untied observations (ranks 1..n), indexed by
 * W+ = 0..n(n+1)/2. Convenience for tables and tests; doubles, so exact for
 * n <= 53 (see `signedRankNullCounts`).
 */
export function signedRankNullCountsUntied(n: number): number[] {
  const doubled = signedRankNullCounts(Array.from({ length: n }, (_, i) => 2 * (i + 1)));
  return doubled.filter((_, s) => s % 2 === 0);
}

/**
 * Wilcoxon signed-rank test on paired samples a, b (differences d = a - b).
 *
 * - Zero differences are DROPPED before ranking (Wilcoxon's original method,
 *   not Pratt's); `n` counts the remaining pairs and `zeros` the dropped ones.
 * - Tied |d| get midranks. The exact p-value is then the exact permutation
 *   distribution of W+ over the 2^n sign flips of THOSE midranks (not the
 *   untied table), computed by dynamic programming on doubled ranks with
 *   exact integer counts; each p-value is correctly rounded.
 * - Exact for n <= maxExactN (default and maximum 64). Above that: normal
 *   approximation with mean n(n+1)/4, variance n(n+1)(2n+1)/24 - sum(t^3 - t)/48
 *   over tie groups of size t, and a continuity correction of 1/2; `exact` is
 *   false.
 * - Failed runs: either sample may contain +Infinity (a run that diverged or
 *   gave a non-finite test error). Then d = +Infinity - finite = +Infinity
 *   (worst for A), finite - Infinity = -Infinity (worst for B), and
 *   Infinity - Infinity counts as a zero difference (both failed: a tie,
 *   dropped like other zeros; also counted in `bothInfinite`). Infinite |d|
 *   get the largest ranks, tied among themselves (midranks); `infinite`
 *   counts them. A finite difference that overflows (|a - b| > ~1.8e308) is
 *   infinite too and ranks with them.
 * - Ties in |d| and zero differences are decided by exact floating-point
 *   equality.
 * - With no non-zero differences, all p-values are 1.
 *
 * Throws if the lengths differ, or on NaN or -Infinity in either sample.
 */
export function wilcoxonSignedRank(a: readonly number[], b: readonly number[], options: WilcoxonOptions = {}): WilcoxonResult {
  assertSameLength(a, b);
  assertFiniteOrFailed(a, 'a');
  assertFiniteOrFailed(b, 'b');
  const maxExactN = options.maxExactN ?? WILCOXON_MAX_EXACT_N;
  if (!Number.isInteger(maxExactN) || maxExactN < 0 || maxExactN > WILCOXON_MAX_EXACT_N) {
    throw new Error(`experiment/statistics: maxExactN must be an integer in [0, ${WILCOXON_MAX_EXACT_N}]`);
  }
  const diffs: number[] = [];
  let zeros = 0;
  let bothInfinite = 0;
  let infinite = 0;
  for (let i = 0; i < a.length; i++) {
    const x = a[i]!;
    const y = b[i]!;
    // Equal values (including +Infinity on both sides, where x - y would be NaN) are a zero difference.
    if (x === y) {
      zeros++;
      if (x === Infinity) bothInfinite++;
      continue;
    }
    const d = x - y;
    if (!Number.isFinite(d)) infinite++;
    diffs.push(d);
  }
  const n = diffs.length;
  const ranks = doubledMidranks(diffs.map(Math.abs));
  let plus2 = 0;
  let minus2 = 0;
  for (let i = 0; i < n; i++) {
    if (diffs[i]! > 0) plus2 += ranks[i]!;
    else minus2 += ranks[i]!;
  }
  const ties = new Set(ranks).size < n;
  const wPlus = plus2 / 2;
  const wMinus = minus2 / 2;
  const base = { n, zeros, bothInfinite, infinite, wPlus, wMinus, statistic: Math.min(wPlus, wMinus), ties };
  if (n === 0) {
    return { ...base, pTwoSided: 1, pLessA: 1, pGreaterA: 1, exact: true, minAchievableP: 1 };
  }

  if (n <= maxExactN) {
    const counts = limbNullCounts(ranks);
    const pLessA = limbProbability(counts, 0, plus2);
    const pGreaterA = limbProbability(counts, plus2, counts.hi.length - 1);
    return {
      ...base,
      pLessA,
      pGreaterA,
      pTwoSided: Math.min(1, 2 * Math.min(pLessA, pGreaterA)),
      exact: true,
      minAchievableP: minimumTwoSidedP(n),
    };
  }

  // Normal approximation with tie and continuity corrections.
  const mu = (n * (n + 1)) / 4;
  let tieTerm = 0;
  const groups = new Map<number, number>();
  for (const r of ranks) groups.set(r, (groups.get(r) ?? 0) + 1);
  for (const t of groups.values()) tieTerm += t * t * t - t;
  const sigma = Math.sqrt((n * (n + 1) * (2 * n + 1)) / 24 - tieTerm / 48);
  const pLessA = Math.min(1, normalCdf((wPlus - mu + 0.5) / sigma));
  const pGreaterA = Math.min(1, normalCdf((mu - wPlus + 0.5) / sigma));
  const extreme = Math.min(1, 2 * normalCdf((0 - mu + 0.5) / sigma));
  return {
    ...base,
    pLessA,
    pGreaterA,
    pTwoSided: Math.min(1, 2 * Math.min(pLessA, pGreaterA)),
    exact: false,
    minAchievableP: extreme,
  };
}

/**
 * Smallest two-sided exact signed-rank p-value achievable with n non-zero
 * pairs: both extreme outcomes (all differences one sign) have probability
 * 1/2^n, so it is min(1, 2/2^n). n = 5 gives 0.0625, n = 6 gives 0.03125.
 */
export function minimumTwoSidedP(n: number): number {
  if (!Number.isInteger(n) || n < 0) throw new Error(`experiment/statistics: n must be a non-negative integer (got ${n})`);
  return Math.min(1, 2 / 2 ** n);
}

/**
 * Smallest number of seed pairs n for which the two-sided signed-rank test can
 * reach significance at all, i.e. minimumTwoSidedP(n) < alpha.
 * alpha = 0.05 gives 6; alpha = 0.01 gives 8.
 */
export function seedsNeededForSignificance(alpha = 0.05): number {
  if (!(alpha > 0 && alpha <= 1)) throw new Error(`experiment/statistics: alpha must be in (0, 1] (got ${alpha})`);
  let n = 0;
  while (minimumTwoSidedP(n) >= alpha) n++;
  return n;
}

// ---------------------------------------------------------------------------
// Extrapolation
// ---------------------------------------------------------------------------

/**
 * Extrapolation gap: how much worse the error is at a larger size (or shifted
 * scale) than in distribution, as a difference: errorAtSize - inDistributionError.
 * Positive means the model got worse out of distribution. See also
 * `extrapolationRatio` for the multiplicative view.
 */
export function extrapolationGap(errorAtSize: number, inDistributionError: number): number {
  return errorAtSize - inDistributionError;
}

/**
 * Extrapolation ratio errorAtSize / inDistributionError (1 = no degradation).
 * Infinity when the in-distribution error is exactly 0 and the other is not;
 * NaN when both are 0.
 */
export function extrapolationRatio(errorAtSize: number, inDistributionError: number): number {
  return errorAtSize / inDistributionError;
}

// ---------------------------------------------------------------------------
// Summary
// ---------------------------------------------------------------------------

export interface Summary {
  n: number;
  mean: number;
  meanLow: number;
  meanHigh: number;
  iqm: number;
  iqmLow: number;
  iqmHigh: number;
  values: number[];
}

/**
 * Per-arm, per-size summary: mean and IQM with 95% percentile bootstrap
 * intervals (or `level`). Uses `rng.fork('summarize/mean')` and
 * `rng.fork('summarize/iqm')`, which depend only on the rng's seed, so the
 * given generator is not advanced and the same rng gives the same summary.
 * Pass a distinct fork per arm and size if independent resampling is wanted.
 * Empty input gives n = 0 and NaN estimates. Throws on non-finite values.
 */
export function summarize(
  values: readonly number[],
  rng: Rng,
  options: { resamples?: number; level?: number } = {},
): Summary {
  const m = bootstrapInterval(values, mean, { ...options, rng: rng.fork('summarize/mean') });
  const q = bootstrapInterval(values, interquartileMean, { ...options, rng: rng.fork('summarize/iqm') });
  return {
    n: values.length,
    mean: m.estimate,
    meanLow: m.low,
    meanHigh: m.high,
    iqm: q.estimate,
    iqmLow: q.low,
    iqmHigh: q.high,
    values: [...values],
  };
}
