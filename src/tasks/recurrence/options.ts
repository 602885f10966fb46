/**
 * What a user may write under `task: { "recurrence": { ... } }`: the allowed
 * values of its four fields, one gloss per value, and the cross-field rules.
 * Plain data with no zod and no tfjs: the spec's schema (src/experiment/spec.ts)
 * builds its enums from these lists, the checker and the task builder call
 * `recurrenceProblems`, and README.md documents the same table.
 */

/** The semirings (⊕, ⊗) whose path problems the task solves. */
export const RECURRENCE_SEMIRINGS = ['min-plus', 'max-min', 'max-plus', 'or-and', 'plus-times', 'max-times'] as const;
/** Where the recurrence starts. */
export const RECURRENCE_SOURCES = ['drawn', 'drawn-widest-edge', 'none'] as const;
/** What the other nodes and the edges carry: the ⊗ factor of each message edge. */
export const RECURRENCE_OTHERS = ['edge-weights', 'unit', 'node-weights'] as const;
/** Which way paths run along directed edges (undirected edges count both ways in either case). */
export const RECURRENCE_DIRECTIONS = ['forward', 'backward'] as const;

export type RecurrenceSemiring = (typeof RECURRENCE_SEMIRINGS)[number];
export type RecurrenceSource = (typeof RECURRENCE_SOURCES)[number];
export type RecurrenceOthers = (typeof RECURRENCE_OTHERS)[number];
export type RecurrenceDirection = (typeof RECURRENCE_DIRECTIONS)[number];

/** The `recurrence` object of a spec, every field filled (the schema supplies the defaults). */
export interface RecurrenceSpec {
  semiring: RecurrenceSemiring;
  source: RecurrenceSource;
  others: RecurrenceOthers;
  direction: RecurrenceDirection;
}

/** Defaults the schema fills in: `{ "semiring": "min-plus" }` alone is the shortest-path problem. */
export const RECURRENCE_DEFAULTS = { source: 'drawn', others: 'edge-weights', direction: 'forward' } as const satisfies Omit<RecurrenceSpec, 'semiring'>;

/** One line per value, for the sheet, `farfield check` and the docs. */
export const RECURRENCE_GLOSS: Record<RecurrenceSemiring | RecurrenceSource | RecurrenceOthers | RecurrenceDirection, string> = {
  'min-plus': 'shortest paths: ⊕ = min, ⊗ = +',
  'max-min': 'widest (bottleneck) paths: ⊕ = max, ⊗ = min',
  'max-plus': 'longest / critical paths on acyclic graphs: ⊕ = max, ⊗ = +',
  'or-and': 'reachability: ⊕ = or, ⊗ = and (1 = reached, 0 = not)',
  'plus-times': 'path counts and path sums on acyclic graphs: ⊕ = +, ⊗ = ×',
  'max-times': 'most reliable path, factors in (0, 1]: ⊕ = max, ⊗ = ×',
  drawn: 'one source node, drawn as the built-in tasks draw it, starting at the semiring’s one',
  'drawn-widest-edge': 'max-min only: a drawn source that starts at (and is scored on) its widest outgoing edge instead of +∞',
  none: 'no single source: every node starts at its own node weight (needs others "node-weights")',
  'edge-weights': 'each message edge multiplies (⊗) by its edge weight; other nodes start at the semiring’s zero',
  unit: 'each message edge multiplies by 1 (hop counts, path counts, reachability); other nodes start at the zero',
  'node-weights': 'each node carries a drawn weight (like earliest-finish’s durations); edge u→v multiplies by w(v)',
  forward: 'paths run along directed edges (messages flow from an edge’s tail to its head)',
  backward: 'paths run against directed edges (messages flow from an edge’s head to its tail)',
};

/** Semirings without a fixed point on a cycle (values grow without bound): refused unless what the start reaches is acyclic. */
export const ACYCLIC_ONLY: ReadonlySet<RecurrenceSemiring> = new Set(['max-plus', 'plus-times']);

/**
 * Cross-field problems, each naming its field under `prefix` (the spec's
 * `task.recurrence`) with the value received and what is allowed.
 */
export function recurrenceProblems(spec: RecurrenceSpec, prefix = 'task.recurrence'): string[] {
  const problems: string[] = [];
  if (spec.source === 'drawn-widest-edge' && spec.semiring !== 'max-min') {
    problems.push(`${prefix}.source: got "drawn-widest-edge" with semiring "${spec.semiring}", allowed only with semiring "max-min"; use "drawn"`);
  }
  if (spec.source === 'none' && spec.others !== 'node-weights') {
    problems.push(`${prefix}.source: got "none" with others "${spec.others}", allowed only with others "node-weights" (otherwise every node starts at the zero and stays there)`);
  }
  if (spec.others === 'node-weights' && spec.source !== 'none') {
    problems.push(`${prefix}.others: got "node-weights" with source "${spec.source}", allowed only with source "none" (every node starts at its own weight)`);
  }
  if (spec.semiring === 'or-and' && spec.others !== 'unit') {
    problems.push(`${prefix}.others: got "${spec.others}" with semiring "or-and", allowed "unit" (reachability reads only whether an edge exists)`);
  }
  return problems;
}

/** A short readable name, used as the task's id in messages, tables and traces. */
export function recurrenceLabel(spec: RecurrenceSpec): string {
  return `recurrence:${spec.semiring}/${spec.source}/${spec.others}/${spec.direction}`;
}
