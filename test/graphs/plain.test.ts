/** Plain form and the scale shift. */
import { describe, expect, it } from 'vitest';
import { Rng } from '../../src/util/rng.ts';
import { getFamily } from '../../src/graphs/registry.ts';
import { fromPlainGraph, scaleWeights, toPlainGraph } from '../../src/graphs/plain.ts';

describe('toPlainGraph / fromPlainGraph', () => {
  it('round-trips edges, direction and positions', () => {
    for (const id of ['er', 'geometric', 'dag', 'points']) {
      const g = getFamily(id).generate({ nodes: 12, weightRange: [1, 3], rng: new Rng(5) });
      const plain = toPlainGraph(g);
      expect(plain.nodes).toBe(12);
      expect(plain.directed).toBe(id === 'dag');
      expect(plain.edges.length).toBe(g.size);
      expect(plain.positions !== undefined).toBe(getFamily(id).hasPositions);
      expect(toPlainGraph(fromPlainGraph(plain))).toEqual(plain);
    }
  });
});

describe('scaleWeights', () => {
  it('multiplies weights, leaves the original alone, keeps geometric positions', () => {
    const g = getFamily('geometric').generate({ nodes: 15, weightRange: [1, 3], rng: new Rng(2) });
    const s = scaleWeights(g, 4);
    const a = toPlainGraph(g);
    const b = toPlainGraph(s);
    b.edges.forEach(([u, v, w], i) => {
      expect([u, v]).toEqual([a.edges[i]![0], a.edges[i]![1]]);
      expect(w).toBeCloseTo(4 * a.edges[i]![2], 12);
    });
    expect(b.positions).toEqual(a.positions);
    expect(s.getAttribute('weightScale')).toBe(4);
  });

  it('scales points positions with the weights, so weight = distance still holds', () => {
    const g = getFamily('points').generate({ nodes: 8, weightRange: [1, 1], rng: new Rng(3) });
    const s = scaleWeights(g, 0.25);
    s.forEachEdge((_e, a, u, v) => {
      const p = s.getNodeAttributes(u);
      const q = s.getNodeAttributes(v);
      expect(a['weight']).toBeCloseTo(Math.hypot(p['x'] - q['x'], p['y'] - q['y']), 12);
    });
  });

  it('refuses a non-positive factor', () => {
    const g = getFamily('path').generate({ nodes: 3, weightRange: [1, 1], rng: new Rng(3) });
    expect(() => scaleWeights(g, 0)).toThrow('graphs/scaleWeights: factor must be a finite number > 0');
  });
});
