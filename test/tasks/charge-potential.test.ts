/** charge-potential against Coulomb's law with the CODATA 2018 constant, and direct summation. */
import { describe, expect, it } from 'vitest';
import { Rng } from '../../src/util/rng.ts';
import { getFamily } from '../../src/graphs/registry.ts';
import { scaleWeights } from '../../src/graphs/plain.ts';
import {
  CHARGE_RANGE,
  COULOMB_CONSTANT_SI,
  chargePotential,
  coulombPotential,
  coulombPotentialSI,
} from '../../src/tasks/charge-potential.ts';

describe('Coulomb potential in SI units', () => {
  it('uses the CODATA 2018 Coulomb constant', () => {
    // Source: CODATA 2018 recommended values (E. Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021));
    // k_e = 1/(4 pi epsilon_0) = 8.9875517923(14) x 10^9 N m^2 C^-2.
    expect(COULOMB_CONSTANT_SI).toBe(8.9875517923e9);
    // Cross-check from epsilon_0 = 8.8541878128e-12 F/m (CODATA 2018; from memory).
    expect(1 / (4 * Math.PI * 8.8541878128e-12)).toBeCloseTo(COULOMB_CONSTANT_SI, -1);
  });

  it('two 1 uC charges 1 m apart: 8.9875517923e3 V each, force 8.988e-3 N', () => {
    // Textbook exercise style (e.g. Halliday, Resnick & Walker, Fundamentals of
    // Physics, ch. "Electric Potential": V = k q / r; ch. "Coulomb's Law":
    // F = k q1 q2 / r^2); numbers hand-computed with the CODATA 2018 k_e.
    const V = coulombPotentialSI([[0, 0, 0], [1, 0, 0]], [1e-6, 1e-6]);
    expect(V[0]).toBeCloseTo(8.9875517923e3, 6);
    expect(V[1]).toBeCloseTo(8.9875517923e3, 6);
    const force = (1e-6 * V[0]!) / 1; // F = q2 * (k q1 / r) / r
    expect(force).toBeCloseTo(8.988e-3, 6);
  });

  it('three charges on a 3-4-5 right triangle (hand computed)', () => {
    // q1 = +1 uC at (0,0), q2 = +2 uC at (3,0), q3 = -3 uC at (0,4) m; r12 = 3, r13 = 4, r23 = 5 m.
    // V1 = k (2/3 - 3/4) uC/m = -k/12 uC/m = -748.9626494 V
    // V2 = k (1/3 - 3/5) uC/m = -4k/15 uC/m = -2396.680478 V
    // V3 = k (1/4 + 2/5) uC/m = 0.65 k uC/m = 5841.908665 V
    // Hand computation (common practice: superposition of point-charge potentials) with the CODATA 2018 k_e.
    const V = coulombPotentialSI([[0, 0], [3, 0], [0, 4]], [1e-6, 2e-6, -3e-6]);
    expect(V[0]).toBeCloseTo(-748.9626494, 6);
    expect(V[1]).toBeCloseTo(-2396.680478, 5);
    expect(V[2]).toBeCloseTo(5841.908665, 5);
  });

  it('refuses coincident points', () => {
    expect(() => coulombPotential([[0, 0], [0, 0]], [1, 1])).toThrow('tasks/charge-potential: points 0 and 1 coincide');
  });
});

describe('charge-potential task', () => {
  it('targets equal direct summation over all other charges with k = 1', () => {
    const rng = new Rng(31);
    for (let k = 0; k < 40; k++) {
      const n = rng.int(2, 24);
      const graph = getFamily('points').generate({ nodes: n, weightRange: [1, 1], rng: rng.fork(k) });
      const inst = chargePotential.instance(graph, { rng: rng.fork(`t${k}`), weightScale: 1 });
      const q = inst.extras!['charges'] as number[];
      q.forEach((c) => {
        expect(c).toBeGreaterThanOrEqual(CHARGE_RANGE[0]);
        expect(c).toBeLessThanOrEqual(CHARGE_RANGE[1]);
      });
      for (let i = 0; i < n; i++) {
        const pi = graph.getNodeAttributes(String(i));
        let V = 0; // Coulomb's law, k = 1 (common practice), written out again here
        for (let j = 0; j < n; j++) {
          if (j === i) continue;
          const pj = graph.getNodeAttributes(String(j));
          V += q[j]! / Math.hypot(pi['x'] - pj['x'], pi['y'] - pj['y']);
        }
        expect(inst.target[i]).toBeCloseTo(V, 9);
      }
      expect(inst.messageSrc.length).toBe(n * (n - 1));
      expect(inst.depth).toBe(1);
      // Edge input = distance = the points edge weight.
      for (let e = 0; e < inst.messageSrc.length; e++) {
        const w = graph.getEdgeAttribute(graph.edge(String(inst.messageSrc[e]), String(inst.messageDst[e]))!, 'weight');
        expect(inst.edgeInputs[e]![0]).toBeCloseTo(w, 12);
      }
      const it1 = chargePotential.iterate!(graph, inst, 1);
      it1.forEach((v, i) => expect(v).toBeCloseTo(inst.target[i]!, 9));
    }
  });

  it('a scaled graph (positions and distances x s) gives potentials / s', () => {
    const graph = getFamily('points').generate({ nodes: 10, weightRange: [1, 1], rng: new Rng(8) });
    const a = chargePotential.instance(graph, { rng: new Rng(9), weightScale: 1 });
    const b = chargePotential.instance(scaleWeights(graph, 4), { rng: new Rng(9), weightScale: 4 });
    b.target.forEach((t, i) => expect(t).toBeCloseTo(a.target[i]! / 4, 10));
  });
});
