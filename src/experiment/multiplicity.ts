/**
 * Multiplicity adjustment for a family of p-values.
 *
 * Why: one comparison runs a signed-rank test for every size rung and every
 * pair of arms, so a single report holds many tests at once. Judged one by one
 * at alpha = 0.05, roughly one in twenty comparisons with no real difference
 * would still come out "significant". Holm's step-down method keeps the
 * family-wise error rate (the chance of at least one false "X is better"
 * anywhere in the family) at alpha, whatever the dependence between the tests,
 * and it rejects everything Bonferroni rejects, and sometimes more.
 *
 * Both functions return ADJUSTED p-values in the input order: reject test i at
 * family-wise level alpha exactly when adjusted[i] <= alpha (for Holm this is
 * the same decision as the sequential procedure). Pure functions; p-values
 * must be numbers in [0, 1] (NaN or anything outside throws); empty input
 * gives an empty array.
 */

function checkPValues(pValues: readonly number[]): void {
  for (let i = 0; i < pValues.length; i++) {
    const p = pValues[i]!;
    if (typeof p !== 'number' || Number.isNaN(p) || p < 0 || p > 1) {
      throw new Error(`experiment/multiplicity: pValues[${i}] is ${p}; p-values must be numbers in [0, 1]`);
    }
  }
}

/**
 * Holm–Bonferroni adjusted p-values (Holm 1979, step-down).
 *
 * Sort the m p-values ascending, p(1) <= ... <= p(m) (equal values keep their
 * input order). The k-th smallest gets min(1, max over j <= k of
 * (m - j + 1) * p(j)): the running maximum makes the adjusted values
 * non-decreasing in the raw order, so a smaller raw p never gets a larger
 * adjusted p. This is the rule of R's `p.adjust(p, "holm")`.
 */
export function holmAdjust(pValues: readonly number[]): number[] {
  checkPValues(pValues);
  const m = pValues.length;
  // Array.prototype.sort is stable, so ties keep their input order.
  const order = pValues.map((_, i) => i).sort((i, j) => pValues[i]! - pValues[j]!);
  const adjusted = new Array<number>(m);
  let running = 0;
  for (let k = 0; k < m; k++) {
    const i = order[k]!;
    running = Math.max(running, Math.min(1, (m - k) * pValues[i]!));
    adjusted[i] = running;
  }
  return adjusted;
}

/**
 * Bonferroni adjusted p-values: min(1, m * p) for each of the m p-values.
 * Simpler and never less conservative than `holmAdjust`; here for comparison.
 */
export function bonferroniAdjust(pValues: readonly number[]): number[] {
  checkPValues(pValues);
  const m = pValues.length;
  return pValues.map((p) => Math.min(1, m * p));
}
