/**
 * `charge-potential`: electric potential at each point charge due to all the
 * others, by Coulomb's law: V_i = k * sum over j != i of q_j / r_ij.
 *
 * - Model units: k = 1 (`coulombPotential`). SI: `coulombPotentialSI` uses the
 *   CODATA 2018 Coulomb constant k_e = 8.9875517923e9 N m^2 C^-2.
 * - Only on `points` (complete graph over positions in the unit square).
 * - Charges: drawn by the task, uniform in [0.5, 1.5] (all positive, so
 *   potentials do not cancel toward 0; no scale shift applied to charges).
 * - Inputs: node [charge]; edge [distance] (the Euclidean distance between the
 *   two positions, which equals the `points` edge weight). The aligned model
 *   sums messages charge_j * (1 / distance): the reciprocal is the feature
 *   transform a practitioner would reach for.
 * - Scale shift: distances live in the graph (positions and weights), so the
 *   caller scales the graph with `scaleWeights`, which scales `points`
 *   positions together with the weights (`scaleShift: 'graph'`); the task does
 *   not apply `options.weightScale` again. Potentials scale by 1 / factor.
 *   So the shift does not scale all inputs and the target together: at scale c
 *   the distances (edge input) are c × (up to float rounding of the square
 *   root), the charges (node input) stay as they are (they are not in distance
 *   units, and scaling them too would change the physics, V ∝ q / r), and the
 *   target is 1/c ×. The shift is a degree -1 change in distances, not the
 *   degree-1 homogeneity a bias-free network has; that is the point of this
 *   task's scale rungs (does the network learn 1/r?).
 * - Mask: every node counts. depth: 1 (direct summation over neighbours).
 */
import type Graph from 'graphology';
import type { Task, TaskInstance, TaskOptions } from './types.ts';
import { checkNodeKeys, checkRounds } from './common.ts';

const WHERE = 'tasks/charge-potential';

/** Coulomb constant k_e in N m^2 C^-2, CODATA 2018 recommended value (k_e = 1 / (4 pi epsilon_0)). */
export const COULOMB_CONSTANT_SI = 8.9875517923e9;

/** Charge range drawn by the task (model units). */
export const CHARGE_RANGE: readonly [number, number] = [0.5, 1.5];

/**
 * Direct summation V_i = k * sum_{j != i} q_j / |p_i - p_j| over points of any
 * dimension. Throws when two points coincide or inputs disagree in length.
 */
export function coulombPotential(
  positions: readonly (readonly number[])[],
  charges: readonly number[],
  k = 1,
): number[] {
  const n = positions.length;
  if (charges.length !== n) throw new Error(`${WHERE}: ${n} positions but ${charges.length} charges`);
  const potential = new Array<number>(n).fill(0);
  for (let i = 0; i < n; i++) {
    let sum = 0;
    for (let j = 0; j < n; j++) {
      if (j === i) continue;
      const r = distance(positions[i]!, positions[j]!);
      if (!(r > 0)) throw new Error(`${WHERE}: points ${i} and ${j} coincide (distance ${r})`);
      sum += charges[j]! / r;
    }
    potential[i] = k * sum;
  }
  return potential;
}

/** Potential in volts at each charge (positions in metres, charges in coulombs), CODATA 2018 k_e. */
export function coulombPotentialSI(positionsMetres: readonly (readonly number[])[], chargesCoulombs: readonly number[]): number[] {
  return coulombPotential(positionsMetres, chargesCoulombs, COULOMB_CONSTANT_SI);
}

function distance(a: readonly number[], b: readonly number[]): number {
  if (a.length !== b.length) throw new Error(`${WHERE}: positions of different dimension`);
  let s = 0;
  for (let d = 0; d < a.length; d++) s += (a[d]! - b[d]!) ** 2;
  return Math.sqrt(s);
}

function positionsOf(graph: Graph, n: number): Array<[number, number]> {
  const positions: Array<[number, number]> = [];
  for (let i = 0; i < n; i++) {
    const { x, y } = graph.getNodeAttributes(String(i));
    if (typeof x !== 'number' || typeof y !== 'number') {
      throw new Error(`${WHERE}: node ${i} has no numeric x/y position (use the 'points' family)`);
    }
    positions.push([x, y]);
  }
  return positions;
}

function instance(graph: Graph, options: TaskOptions): TaskInstance {
  if (graph.type !== 'undirected') throw new Error(`${WHERE}: needs an undirected complete graph, got a ${graph.type} graph`);
  const n = checkNodeKeys(graph, WHERE);
  const positions = positionsOf(graph, n);
  const charges = Array.from({ length: n }, () => options.rng.uniform(CHARGE_RANGE[0], CHARGE_RANGE[1]));
  const messageSrc: number[] = [];
  const messageDst: number[] = [];
  const edgeInputs: number[][] = [];
  graph.forEachEdge((_e, _a, s, t) => {
    const u = Number(s);
    const v = Number(t);
    const r = distance(positions[u]!, positions[v]!);
    messageSrc.push(u, v);
    messageDst.push(v, u);
    edgeInputs.push([r], [r]);
  });
  if (messageSrc.length !== n * (n - 1)) {
    throw new Error(`${WHERE}: the graph must be complete (every pair interacts); got ${graph.size} of ${(n * (n - 1)) / 2} edges`);
  }
  return {
    nodes: n,
    nodeInputs: charges.map((q) => [q]),
    messageSrc,
    messageDst,
    edgeInputs,
    target: coulombPotential(positions, charges),
    mask: new Array<number>(n).fill(1),
    depth: 1,
    extras: { charges },
  };
}

/** Round 0: nothing summed (0 everywhere); round >= 1: the full direct sum over message edges. */
function iterate(_graph: Graph, inst: TaskInstance, rounds: number): number[] {
  checkRounds(rounds, WHERE);
  const v = new Array<number>(inst.nodes).fill(0);
  if (rounds === 0) return v;
  for (let e = 0; e < inst.messageSrc.length; e++) {
    v[inst.messageDst[e]!]! += inst.nodeInputs[inst.messageSrc[e]!]![0]! / inst.edgeInputs[e]![0]!;
  }
  return v;
}

export const chargePotential: Task = {
  id: 'charge-potential',
  title: 'Electric potential from point charges (Coulomb, k = 1)',
  describe: 'Sum over the other charges of charge / distance (Coulomb potential with k = 1).',
  alignedAggregator: 'sum',
  alignedStructure: 'V(i) = sum over j of q_j * (1 / r_ij): sum of charge times the reciprocal of the distance',
  nodeFeatureNames: ['charge'],
  edgeFeatureNames: ['distance'],
  families: ['points'],
  maskPolicy: 'Every node counts.',
  scaleShift: 'graph',
  instance,
  iterate,
};
