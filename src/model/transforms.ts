/**
 * Input feature transforms, applied to raw task inputs before they reach the
 * network. They run on plain numbers (not tensors): inputs are constants, so
 * no gradient is needed, and every backend sees identical values.
 *
 * Safety on zero and negative inputs (documented clamps, never NaN):
 *   identity        x
 *   log1p           sign(x) * ln(1 + |x|)            (odd extension; exact ln(1+x) for x >= 0)
 *   reciprocal      1 / x, with |x| clamped to >= 1e-6, sign kept (0 -> 1e6)
 *   inverse-square  1 / x^2, with x^2 clamped to >= 1e-12
 *   square          x^2
 *   sqrt            sign(x) * sqrt(|x|)               (odd extension)
 *   standardize     (x - mean) / std over the training set, std floored at 1e-6
 */
import type { TransformName } from './catalogue.ts';

export const RECIPROCAL_FLOOR = 1e-6;
export const SQUARE_FLOOR = 1e-12;

export interface FeatureStats {
  mean: number;
  std: number;
}

export function applyTransform(name: TransformName, x: number, stats?: FeatureStats): number {
  switch (name) {
    case 'identity':
      return x;
    case 'log1p':
      return Math.sign(x) * Math.log1p(Math.abs(x));
    case 'reciprocal': {
      const mag = Math.max(Math.abs(x), RECIPROCAL_FLOOR);
      return (x < 0 ? -1 : 1) / mag;
    }
    case 'inverse-square':
      return 1 / Math.max(x * x, SQUARE_FLOOR);
    case 'square':
      return x * x;
    case 'sqrt':
      return Math.sign(x) * Math.sqrt(Math.abs(x));
    case 'standardize': {
      if (!stats) throw new Error('model/transforms: standardize needs training statistics');
      return (x - stats.mean) / Math.max(stats.std, 1e-6);
    }
  }
}

/** Resolve a one-for-all or per-feature transform choice to one name per feature. */
export function transformsFor(choice: TransformName | readonly TransformName[], features: number, where: string): TransformName[] {
  if (typeof choice === 'string') return new Array<TransformName>(features).fill(choice);
  if (choice.length !== features) {
    throw new Error(`${where}: got ${choice.length} transforms, but the task has ${features} feature(s); give one name or exactly ${features}`);
  }
  return [...choice];
}

/** Mean and standard deviation of each column over all rows of all sets. */
export function columnStats(rowsList: ReadonlyArray<ReadonlyArray<ReadonlyArray<number>>>, width: number): FeatureStats[] {
  const sum = new Float64Array(width);
  const sq = new Float64Array(width);
  let count = 0;
  for (const rows of rowsList) {
    for (const row of rows) {
      for (let j = 0; j < width; j++) {
        const v = row[j] ?? 0;
        sum[j]! += v;
        sq[j]! += v * v;
      }
      count++;
    }
  }
  const out: FeatureStats[] = [];
  for (let j = 0; j < width; j++) {
    const mean = count ? sum[j]! / count : 0;
    const variance = count ? Math.max(sq[j]! / count - mean * mean, 0) : 0;
    out.push({ mean, std: Math.sqrt(variance) });
  }
  return out;
}
