/**
 * The exact solver of the recurrence task: fixed-point iteration in a semiring,
 *
 *     x₀ = b,   x_{k+1}(v) = b(v) ⊕ ⊕_{u→v} x_k(u) ⊗ f(u→v),
 *
 * run synchronously until nothing changes. x_k(v) is the ⊕ over all walks of at
 * most k edges ending at v of (start ⊗ factors), so the fixed point is the path
 * problem's answer wherever one exists. Why synchronous Jacobi rounds rather
 * than a heap: the same loop gives the exact answer, the depth (rounds that
 * changed something) and the alignment trace's per-round states, in every
 * semiring alike.
 *
 * Where no fixed point exists the solver refuses by name: a cycle reachable
 * from a start under max-plus or plus-times (checked on the structure, before
 * iterating), a negative cycle under min-plus (still changing after n rounds),
 * and a factor outside the semiring's range (max-times needs (0, 1]).
 */
import { roundsToFixedPoint, runRounds } from '../common.ts';
import { SEMIRINGS, type SemiringOps } from './algebra.ts';
import { ACYCLIC_ONLY, type RecurrenceSemiring } from './options.ts';

/** A recurrence on n nodes: message edges src[e] → dst[e] with ⊗ factor factor[e], and the start b. */
export interface RecurrenceSystem {
  n: number;
  src: readonly number[];
  dst: readonly number[];
  factor: readonly number[];
  start: readonly number[];
}

/** One synchronous round: b(v) ⊕ ⊕ over message edges u→v of state(u) ⊗ f, edges in order. */
export function recurrenceRound(ops: SemiringOps, system: RecurrenceSystem, state: readonly number[]): number[] {
  const next = system.start.slice();
  for (let e = 0; e < system.src.length; e++) {
    const v = system.dst[e]!;
    next[v] = ops.add(next[v]!, ops.mul(state[system.src[e]!]!, system.factor[e]!));
  }
  return next;
}

function checkSystem(semiring: RecurrenceSemiring, system: RecurrenceSystem, where: string): void {
  const { n, src, dst, factor, start } = system;
  if (start.length !== n) throw new Error(`${where}: start has ${start.length} entries for ${n} nodes`);
  if (src.length !== dst.length || src.length !== factor.length) {
    throw new Error(`${where}: ${src.length} sources, ${dst.length} targets and ${factor.length} factors; they must match`);
  }
  const ops = SEMIRINGS[semiring];
  for (let e = 0; e < src.length; e++) {
    for (const end of [src[e]!, dst[e]!]) {
      if (!Number.isInteger(end) || end < 0 || end >= n) throw new Error(`${where}: message edge ${e} has node ${end}, allowed 0..${n - 1}`);
    }
    if (!ops.admits(factor[e]!)) {
      throw new Error(
        `${where}: the factor of edge ${src[e]}→${dst[e]} is ${factor[e]}; ${semiring} allows ${ops.factorRange ?? 'finite numbers'}` +
          (semiring === 'max-times' ? ' (a reliability above 1 would make cycles pay off)' : ''),
      );
    }
  }
}

/**
 * Refuses a cycle among the nodes reachable from a start that is not the zero:
 * under max-plus and plus-times, going round it again changes the value every
 * time, so no fixed point exists. Kahn's algorithm on the reachable part.
 */
function checkAcyclicFromStarts(semiring: RecurrenceSemiring, system: RecurrenceSystem, where: string): void {
  const { n, src, dst, start } = system;
  const zero = SEMIRINGS[semiring].zero;
  const out: number[][] = Array.from({ length: n }, () => []);
  for (let e = 0; e < src.length; e++) out[src[e]!]!.push(dst[e]!);
  const reached = new Array<boolean>(n).fill(false);
  const stack: number[] = [];
  const reach = (v: number): void => {
    if (reached[v]) return;
    reached[v] = true;
    stack.push(v);
  };
  for (let v = 0; v < n; v++) if (!Object.is(start[v], zero)) reach(v);
  while (stack.length > 0) for (const w of out[stack.pop()!]!) reach(w);
  const indegree = new Array<number>(n).fill(0);
  for (let e = 0; e < src.length; e++) if (reached[src[e]!]) indegree[dst[e]!]!++;
  const ready: number[] = [];
  for (let v = 0; v < n; v++) if (reached[v] && indegree[v] === 0) ready.push(v);
  let done = 0;
  while (ready.length > 0) {
    done++;
    for (const w of out[ready.pop()!]!) if (--indegree[w]! === 0) ready.push(w);
  }
  const total = reached.filter(Boolean).length;
  if (done < total) {
    const onCycle = indegree.findIndex((d, v) => reached[v] && d > 0);
    throw new Error(
      `${where}: ${semiring} has no fixed point here: a directed cycle (through node ${onCycle}) is reachable from the start, ` +
        `and every turn round it changes the value (an undirected edge is a cycle u→v→u); ${semiring} needs an acyclic graph such as family "dag"`,
    );
  }
}

/**
 * The exact fixed point and the number of rounds that changed something.
 * Non-finite entries are as the algebra holds them (+∞ unreached under
 * min-plus, −∞ under max-plus and max-min, +∞ at a max-min source).
 */
export function solveRecurrence(semiring: RecurrenceSemiring, system: RecurrenceSystem, where: string): { value: number[]; rounds: number } {
  checkSystem(semiring, system, where);
  if (ACYCLIC_ONLY.has(semiring)) checkAcyclicFromStarts(semiring, system, where);
  const ops = SEMIRINGS[semiring];
  // Every admissible system settles within n − 1 rounds (a best walk never needs to repeat a node);
  // one more that still changes something means an improving cycle.
  try {
    const { state, rounds } = roundsToFixedPoint(system.start.slice(), (s) => recurrenceRound(ops, system, s), Math.max(0, system.n - 1), where);
    return { value: state, rounds };
  } catch (cause) {
    const why = semiring === 'min-plus' ? 'a negative cycle is reachable from the source, so distances fall without bound' : 'the values keep changing';
    throw new Error(`${where}: ${semiring} has no fixed point here: ${why} (still changing after ${system.n} rounds)`, { cause });
  }
}

/** The state after exactly `rounds` synchronous rounds (the alignment trace and step-wise supervision). */
export function recurrenceRounds(semiring: RecurrenceSemiring, system: RecurrenceSystem, rounds: number, where: string): number[] {
  const ops = SEMIRINGS[semiring];
  return runRounds(system.start.slice(), (s) => recurrenceRound(ops, system, s), rounds, where);
}
