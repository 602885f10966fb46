/**
 * Checks of a recurrence against the spec's weights, before any graph is drawn:
 * max-times reads its factors as reliabilities and needs every one in (0, 1],
 * at training scale and at every weight-scale rung. Plain values in, so the
 * tasks layer imports nothing from experiment/.
 */
import type { RecurrenceSpec } from './options.ts';

export function recurrenceWeightProblems(
  spec: RecurrenceSpec,
  sizes: { train: { weightRange: readonly [number, number] }; test: { weightScales: readonly number[] } },
): string[] {
  if (spec.semiring !== 'max-times' || spec.others === 'unit') return [];
  const [lo, hi] = sizes.train.weightRange;
  const problems: string[] = [];
  if (!(lo > 0 && hi <= 1)) {
    return [`train.weightRange: got [${lo}, ${hi}], allowed within (0, 1] for semiring "max-times" (the factors are reliabilities)`];
  }
  sizes.test.weightScales.forEach((scale, i) => {
    // Drawn factors lie below hi, and w·c ≤ hi·c in floating point too, so this bound is the one that matters.
    if (hi * scale > 1) {
      problems.push(`test.weightScales[${i}]: got ${scale}, which takes factors up to ${hi * scale}; max-times allows at most 1 (use scales ≤ ${1 / hi})`);
    }
  });
  return problems;
}
