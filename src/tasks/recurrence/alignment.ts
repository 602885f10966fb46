/**
 * Which aggregator and message layer a recurrence suggests, read from the
 * model catalogue's records (`semirings` per aggregator, `semiring` per message
 * kind); nothing here restates what those records say. Two semirings have no
 * record of their own and are read through an exact correspondence:
 * or-and is max-min on {0, 1} (or = max, and = min), and max-times is max-plus
 * after a logarithm (log(a·b) = log a + log b, and log keeps the order).
 * Information only: nothing enforces the suggestion.
 */
import { AGGREGATOR_RECORDS, MESSAGE_RECORDS, type AggregatorName, type MessageName, type SemiringName } from '../../model/catalogue.ts';
import type { RecurrenceSemiring } from './options.ts';

const OPERATIONS: Record<RecurrenceSemiring, string> = {
  'min-plus': '⊕ = min, ⊗ = +',
  'max-min': '⊕ = max, ⊗ = min',
  'max-plus': '⊕ = max, ⊗ = +',
  'or-and': '⊕ = or, ⊗ = and',
  'plus-times': '⊕ = +, ⊗ = ×',
  'max-times': '⊕ = max, ⊗ = ×',
};

/** The catalogue semiring each recurrence is read as, and why when it is not itself. */
const READ_AS: Record<RecurrenceSemiring, { semiring: SemiringName; why: string | null }> = {
  'min-plus': { semiring: 'min-plus', why: null },
  'max-min': { semiring: 'max-min', why: null },
  'max-plus': { semiring: 'max-plus', why: null },
  'plus-times': { semiring: 'plus-times', why: null },
  'or-and': { semiring: 'max-min', why: 'or-and is max-min on {0, 1}' },
  'max-times': { semiring: 'max-plus', why: 'max-times is max-plus on log-factors (log turns × into + and keeps the order)' },
};

export interface RecurrenceAlignment {
  /** "⊕ = min, ⊗ = +". */
  operations: string;
  /** The first hard aggregator whose record lists the semiring (the task's `alignedAggregator`). */
  aggregator: AggregatorName;
  /** Every aggregator whose record lists it (hard first, then smooth relaxations), in catalogue order. */
  aggregators: AggregatorName[];
  /** Message kinds whose record names it; empty when none computes ⊗ itself. */
  messages: MessageName[];
  /** One line for `farfield check` and the sheet. */
  line: string;
}

export function recurrenceAlignment(semiring: RecurrenceSemiring): RecurrenceAlignment {
  const read = READ_AS[semiring];
  const matching = AGGREGATOR_RECORDS.filter((r) => (r.semirings as readonly SemiringName[]).includes(read.semiring));
  const aggregators = [...matching.filter((r) => r.kind === 'hard'), ...matching.filter((r) => r.kind !== 'hard')].map((r) => r.name);
  const aggregator = aggregators[0];
  if (!aggregator) throw new Error(`tasks/recurrence: no aggregator in the catalogue lists semiring ${read.semiring}`);
  const messages = MESSAGE_RECORDS.filter((r) => r.semiring === read.semiring).map((r) => r.name);
  const layer = messages.length
    ? `message layer ${messages.map((m) => `"${m}"`).join(' or ')}`
    : `no message layer in the catalogue computes ⊗ here, so "mlp" must learn it`;
  const line =
    `${semiring} (${OPERATIONS[semiring]}): aggregator ${aggregators.map((a) => `"${a}"`).join(' or ')} for ⊕, ${layer}` +
    (read.why ? `; ${read.why}` : '') +
    ' (a suggestion only: nothing enforces it)';
  return { operations: OPERATIONS[semiring], aggregator, aggregators, messages, line };
}
