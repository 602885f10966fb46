/**
 * The model catalogue: one plain record per aggregator, message kind, update
 * kind, activation, feature transform and step rule, holding every fact the
 * rest of the code states about it (its one-line hint, whether it takes a
 * temperature, hard or smooth, neutral element, idempotence, homogeneity, the
 * semiring it aligns with). The name tuples and name types are derived from
 * the records, so the schema, the sheet's pickers, the registries and the
 * audit all read one list.
 *
 * No tfjs import: the page's main thread loads this file. The implementations
 * live in aggregators.ts, semiring.ts, transforms.ts and steps.ts; a test
 * (test/model/catalogue.test.ts) checks that records and implementations agree.
 */

/** Semirings (⊕, ⊗) an aggregator or semiring message aligns with (information, read by the sheet and docs). */
export type SemiringName = 'plus-times' | 'min-plus' | 'max-plus' | 'max-min';

export interface OptionRecord {
  readonly name: string;
  /** One line for the sheet's pickers. */
  readonly hint: string;
}

export interface AggregatorRecord extends OptionRecord {
  /** Hard aggregators compute their operation exactly; smooth ones a log-sum-exp relaxation with a temperature. */
  readonly kind: 'hard' | 'smooth';
  /** Whether `aggregatorTemperature` changes it. */
  readonly takesTemperature: boolean;
  /**
   * Whether a ⊕ b is always one of a, b (max, min): then the aggregate is bit-for-bit independent of edge
   * order and chunking; otherwise floating-point accumulation makes it exact only up to rounding.
   */
  readonly selective: boolean;
  /** e with a ⊕ e = a for the pairwise `combine` and for the set aggregate (an extra message e changes nothing); null if none. */
  readonly neutral: number | null;
  /** Whether a ⊕ a = a holds. */
  readonly idempotent: boolean;
  /** Whether ⊕(λx) = λ ⊕(x) for λ > 0. */
  readonly homogeneous: boolean;
  /** The semirings whose ⊕ this aggregator is (or relaxes); empty if none. */
  readonly semirings: readonly SemiringName[];
}

export interface MessageRecord extends OptionRecord {
  readonly kind: 'hard' | 'smooth';
  /** Whether `messageTemperature` changes it. */
  readonly takesTemperature: boolean;
  /** Whether the layer is positively homogeneous when bias-free (a semiring layer adds a learned constant W). */
  readonly homogeneous: boolean;
  /** The semiring of the layer y_j = ⊕_k (x_k ⊗ W_kj); null for the MLP. */
  readonly semiring: SemiringName | null;
}

export interface UpdateRecord extends OptionRecord {
  /** Whether the update is positively homogeneous when bias-free (a gate's sigmoid and tanh are not). */
  readonly homogeneous: boolean;
}

export interface ActivationRecord extends OptionRecord {
  /** act(λx) = λ act(x) for λ > 0. */
  readonly homogeneous: boolean;
}

export interface TransformRecord extends OptionRecord {
  /** t(λx) = λ t(x) for λ > 0, so a weight-scale shift passes through unchanged. */
  readonly homogeneous: boolean;
}

export interface StepRuleRecord extends OptionRecord {
  /** Whether the step count depends on the state values (a fixed tolerance breaks homogeneity). */
  readonly valueDependent: boolean;
}

export const AGGREGATOR_RECORDS = [
  {
    name: 'sum',
    hint: 'adds incoming messages; grows with degree',
    kind: 'hard',
    takesTemperature: false,
    selective: false,
    neutral: 0,
    idempotent: false,
    homogeneous: true,
    semirings: ['plus-times'],
  },
  {
    name: 'mean',
    hint: 'averages incoming messages',
    kind: 'hard',
    takesTemperature: false,
    selective: false,
    neutral: null,
    idempotent: true,
    homogeneous: true,
    semirings: [],
  },
  {
    name: 'max',
    hint: 'keeps the largest message per channel',
    kind: 'hard',
    takesTemperature: false,
    selective: true,
    neutral: -Infinity,
    idempotent: true,
    homogeneous: true,
    semirings: ['max-plus', 'max-min'],
  },
  {
    name: 'min',
    hint: 'keeps the smallest message per channel',
    kind: 'hard',
    takesTemperature: false,
    selective: true,
    neutral: Infinity,
    idempotent: true,
    homogeneous: true,
    semirings: ['min-plus'],
  },
  {
    name: 'smooth-max',
    hint: 'log-sum-exp: a soft maximum with a temperature',
    kind: 'smooth',
    takesTemperature: true,
    selective: false,
    neutral: -Infinity,
    idempotent: false,
    homogeneous: false,
    semirings: ['max-plus'],
  },
  {
    name: 'smooth-min',
    hint: 'a soft minimum with a temperature',
    kind: 'smooth',
    takesTemperature: true,
    selective: false,
    neutral: Infinity,
    idempotent: false,
    homogeneous: false,
    semirings: ['min-plus'],
  },
] as const satisfies readonly AggregatorRecord[];

export const MESSAGE_RECORDS = [
  { name: 'mlp', hint: 'a small network of sender, receiver and edge', kind: 'hard', takesTemperature: false, homogeneous: true, semiring: null },
  { name: 'min-plus', hint: 'semiring layer: min over (input + weight)', kind: 'hard', takesTemperature: false, homogeneous: false, semiring: 'min-plus' },
  { name: 'max-plus', hint: 'semiring layer: max over (input + weight)', kind: 'hard', takesTemperature: false, homogeneous: false, semiring: 'max-plus' },
  { name: 'smooth-min-plus', hint: 'soft min-plus with a temperature', kind: 'smooth', takesTemperature: true, homogeneous: false, semiring: 'min-plus' },
  { name: 'smooth-max-plus', hint: 'soft max-plus with a temperature', kind: 'smooth', takesTemperature: true, homogeneous: false, semiring: 'max-plus' },
] as const satisfies readonly MessageRecord[];

export const UPDATE_RECORDS = [
  { name: 'mlp', hint: 'residual: state plus a small network (zero-initialised)', homogeneous: true },
  { name: 'gated', hint: 'a learned gate between old state and the proposal', homogeneous: false },
  { name: 'aggregate', hint: 'the new state is the aggregate itself', homogeneous: true },
] as const satisfies readonly UpdateRecord[];

export const ACTIVATION_RECORDS = [
  { name: 'relu', hint: 'max(0, x)', homogeneous: true },
  { name: 'leaky-relu', hint: 'max(αx, x), α = 0.01', homogeneous: true },
] as const satisfies readonly ActivationRecord[];

export const TRANSFORM_RECORDS = [
  { name: 'identity', hint: 'raw value', homogeneous: true },
  { name: 'log1p', hint: 'log(1 + x)', homogeneous: false },
  { name: 'reciprocal', hint: '1 / x', homogeneous: false },
  { name: 'inverse-square', hint: '1 / x²', homogeneous: false },
  { name: 'square', hint: 'x²', homogeneous: false },
  { name: 'sqrt', hint: '√x', homogeneous: false },
  { name: 'standardize', hint: '(x − mean) / sd over the training graphs', homogeneous: false },
] as const satisfies readonly TransformRecord[];

export const STEP_RULE_RECORDS = [
  { name: 'nodes', hint: 'one message step per node: grows with the graph', valueDependent: false },
  { name: 'fixed', hint: 'the same number of steps at every size', valueDependent: false },
  { name: 'proportional', hint: 'steps = factor × nodes, rounded up', valueDependent: false },
  { name: 'until-stable', hint: 'iterate until states stop changing (capped)', valueDependent: true },
] as const satisfies readonly StepRuleRecord[];

type NamesOf<T extends readonly OptionRecord[]> = { readonly [K in keyof T]: T[K]['name'] };

function namesOf<const T extends readonly OptionRecord[]>(records: T): NamesOf<T> {
  return records.map((r) => r.name) as unknown as NamesOf<T>;
}

/** The name tuples, in record order (the schema's enums and its error messages list them in this order). */
export const AGGREGATOR_NAMES = namesOf(AGGREGATOR_RECORDS);
export const MESSAGE_NAMES = namesOf(MESSAGE_RECORDS);
export const UPDATE_NAMES = namesOf(UPDATE_RECORDS);
export const ACTIVATION_NAMES = namesOf(ACTIVATION_RECORDS);
export const TRANSFORM_NAMES = namesOf(TRANSFORM_RECORDS);
export const STEP_RULE_NAMES = namesOf(STEP_RULE_RECORDS);

export type AggregatorName = (typeof AGGREGATOR_NAMES)[number];
export type MessageName = (typeof MESSAGE_NAMES)[number];
export type UpdateName = (typeof UPDATE_NAMES)[number];
export type ActivationName = (typeof ACTIVATION_NAMES)[number];
export type TransformName = (typeof TRANSFORM_NAMES)[number];
export type StepRuleName = (typeof STEP_RULE_NAMES)[number];

type ByName<T extends readonly OptionRecord[], R> = { readonly [N in T[number]['name']]: R };

function byName<const T extends readonly OptionRecord[], R extends OptionRecord>(records: T & readonly R[]): ByName<T, R> {
  return Object.fromEntries(records.map((r) => [r.name, r])) as ByName<T, R>;
}

/** Records by name: `AGGREGATORS_BY_NAME[name].takesTemperature` etc. */
export const AGGREGATORS_BY_NAME = byName<typeof AGGREGATOR_RECORDS, AggregatorRecord>(AGGREGATOR_RECORDS);
export const MESSAGES_BY_NAME = byName<typeof MESSAGE_RECORDS, MessageRecord>(MESSAGE_RECORDS);
export const UPDATES_BY_NAME = byName<typeof UPDATE_RECORDS, UpdateRecord>(UPDATE_RECORDS);
export const ACTIVATIONS_BY_NAME = byName<typeof ACTIVATION_RECORDS, ActivationRecord>(ACTIVATION_RECORDS);
export const TRANSFORMS_BY_NAME = byName<typeof TRANSFORM_RECORDS, TransformRecord>(TRANSFORM_RECORDS);
export const STEP_RULES_BY_NAME = byName<typeof STEP_RULE_RECORDS, StepRuleRecord>(STEP_RULE_RECORDS);

/** The record of an aggregator; throws on an unknown name (names from untrusted input must be validated first). */
export function aggregatorRecord(name: AggregatorName): AggregatorRecord {
  const found: AggregatorRecord | undefined = AGGREGATORS_BY_NAME[name];
  if (!found) throw new Error(`model/catalogue: unknown aggregator "${String(name)}"; known: ${AGGREGATOR_NAMES.join(', ')}`);
  return found;
}

/** The record of a message kind; throws on an unknown name. */
export function messageRecord(name: MessageName): MessageRecord {
  const found: MessageRecord | undefined = MESSAGES_BY_NAME[name];
  if (!found) throw new Error(`model/catalogue: unknown message kind "${String(name)}"; known: ${MESSAGE_NAMES.join(', ')}`);
  return found;
}
