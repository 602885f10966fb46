/**
 * The six semirings as plain arithmetic on numbers: zero (⊕'s neutral element,
 * "no path"), one (⊗'s neutral element, the empty path), ⊕ and ⊗, and the
 * factors each accepts. or-and holds booleans as 0 and 1.
 *
 * The selective ⊕ (min, max) keeps the left operand unless the right one is
 * strictly better, exactly as the built-in solvers compare (`cand < next`), so
 * ties and signed zeros resolve the same way and the targets agree bit for bit.
 */
import type { RecurrenceSemiring } from './options.ts';

export interface SemiringOps {
  zero: number;
  one: number;
  add(a: number, b: number): number;
  mul(a: number, b: number): number;
  /** The factors ⊗ accepts, for the error message; null when any finite number will do. */
  factorRange: string | null;
  /** Whether a factor is admissible. */
  admits(factor: number): boolean;
}

const keepSmaller = (a: number, b: number): number => (b < a ? b : a);
const keepLarger = (a: number, b: number): number => (b > a ? b : a);
const plus = (a: number, b: number): number => a + b;
const times = (a: number, b: number): number => a * b;
const finite = (w: number): boolean => Number.isFinite(w);

export const SEMIRINGS: Record<RecurrenceSemiring, SemiringOps> = {
  'min-plus': { zero: Infinity, one: 0, add: keepSmaller, mul: plus, factorRange: null, admits: finite },
  'max-min': { zero: -Infinity, one: Infinity, add: keepLarger, mul: Math.min, factorRange: null, admits: finite },
  'max-plus': { zero: -Infinity, one: 0, add: keepLarger, mul: plus, factorRange: null, admits: finite },
  'or-and': { zero: 0, one: 1, add: keepLarger, mul: Math.min, factorRange: '{0, 1}', admits: (w) => w === 0 || w === 1 },
  'plus-times': { zero: 0, one: 1, add: plus, mul: times, factorRange: null, admits: finite },
  'max-times': { zero: 0, one: 1, add: keepLarger, mul: times, factorRange: '(0, 1]', admits: (w) => w > 0 && w <= 1 },
};
