/** hop-count against graphology-shortest-path (unweighted) and graphology-traversal (BFS depth). */
import { describe, expect, it } from 'vitest';
import { singleSourceLength } from 'graphology-shortest-path';
import { bfsFromNode } from 'graphology-traversal';
import { Rng } from '../../src/util/rng.ts';
import { getFamily } from '../../src/graphs/registry.ts';
import { bfsHops, hopCount } from '../../src/tasks/hop-count.ts';

describe('hop-count against graphology', () => {
  for (const family of hopCount.families) {
    it(`matches unweighted shortest paths and BFS depth on 40 random '${family}' graphs`, () => {
      const rng = new Rng(77).fork(family);
      for (let k = 0; k < 40; k++) {
        const n = rng.int(Math.max(4, getFamily(family).minNodes), 40);
        const graph = getFamily(family).generate({ nodes: n, weightRange: [1, 10], rng: rng.fork(k) });
        const inst = hopCount.instance(graph, { rng: rng.fork(`t${k}`), weightScale: 1 });
        const source = inst.source!;
        // Reference 1: graphology-shortest-path 2.1 singleSourceLength (unweighted).
        const lengths = singleSourceLength(graph, String(source));
        // Reference 2: graphology-traversal 0.3 bfsFromNode, whose callback receives each node's BFS depth.
        const bfsDepth = new Map<string, number>();
        bfsFromNode(graph, String(source), (key, _attr, depth) => {
          bfsDepth.set(key, depth);
        });
        const hops = bfsHops(graph, source);
        for (let i = 0; i < graph.order; i++) {
          const ref = lengths[String(i)];
          expect(bfsDepth.get(String(i))).toBe(ref);
          if (ref === undefined) {
            expect(hops[i]).toBe(Infinity);
            expect(inst.mask[i]).toBe(0);
          } else {
            expect(hops[i]).toBe(ref);
            expect(inst.target[i]).toBe(ref);
            expect(inst.mask[i]).toBe(1);
          }
        }
        expect(inst.depth).toBe(Math.max(...bfsDepth.values()));
        expect(inst.edgeInputs.every((f) => f.length === 1 && f[0] === 1)).toBe(true);
        // iterate: after k frontier rounds exactly the nodes within k hops are known.
        for (let r = 0; r <= inst.depth; r++) {
          expect(hopCount.iterate!(graph, inst, r)).toEqual(hops.map((h) => (h <= r ? h : Infinity)));
        }
      }
    });
  }

  it('is unchanged by the scale shift', () => {
    const g = getFamily('grid').generate({ nodes: 16, weightRange: [1, 10], rng: new Rng(1) });
    const a = hopCount.instance(g, { rng: new Rng(2), weightScale: 1 });
    const b = hopCount.instance(g, { rng: new Rng(2), weightScale: 100 });
    expect(b.target).toEqual(a.target);
  });
});
