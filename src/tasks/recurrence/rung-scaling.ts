/**
 * What a weight-scale rung (factor c) does to a recurrence's inputs and target,
 * as powers of c (see tasks/rung-scaling.ts). Factors read from weights (edge or
 * node weights) scale by c, and so do the node inputs derived from them (the
 * start and its median stand-ins) and the target under min-plus, max-plus and
 * max-min (sums and bottlenecks of factors). Unit factors do not scale at all.
 * Under plus-times and max-times the target is a sum of products of as many
 * factors as a path has edges, so no single power describes it: NaN says so,
 * and `scalesEverythingTogether` is then false.
 */
import type { RecurrenceSpec } from './options.ts';

export interface RecurrencePowers {
  node: number[];
  edge: number[];
  target: number;
}

export function recurrenceRungScaling(spec: RecurrenceSpec): RecurrencePowers {
  if (spec.others === 'unit') return { node: [0], edge: [0], target: 0 };
  const products = spec.semiring === 'plus-times' || spec.semiring === 'max-times';
  // With edge weights a product semiring's start is the 0/1 of one and zero; node weights are the start itself.
  const node = products && spec.others === 'edge-weights' ? 0 : 1;
  return { node: [node], edge: [1], target: products ? Number.NaN : 1 };
}
