/** widest-path against brute-force path enumeration and the Schulze method's worked example. */
import { describe, expect, it } from 'vitest';
import Graph from 'graphology';
import { Rng } from '../../src/util/rng.ts';
import { getFamily } from '../../src/graphs/registry.ts';
import { widestPath, widestPathTask } from '../../src/tasks/widest-path.ts';

/** Brute force: the best bottleneck over all simple paths from `source` (common practice: definition of the widest path). */
function bruteForceWidest(graph: Graph, source: number): number[] {
  const n = graph.order;
  const best = new Array<number>(n).fill(-Infinity);
  const onPath = new Array<boolean>(n).fill(false);
  const walk = (u: number, bottleneck: number): void => {
    best[u] = Math.max(best[u]!, bottleneck);
    onPath[u] = true;
    graph.forEachOutboundEdge(String(u), (_e, attr, s, t) => {
      const v = Number(s) === u ? Number(t) : Number(s);
      if (!onPath[v]) walk(v, Math.min(bottleneck, attr['weight'] as number));
    });
    onPath[u] = false;
  };
  walk(source, Infinity);
  return best;
}

describe('widest-path against brute force', () => {
  for (const family of widestPathTask.families) {
    it(`matches simple-path enumeration on 40 small '${family}' graphs`, () => {
      const rng = new Rng(5).fork(family);
      for (let k = 0; k < 40; k++) {
        const n = rng.int(Math.max(4, getFamily(family).minNodes), 9);
        const graph = getFamily(family).generate({ nodes: n, weightRange: [1, 20], rng: rng.fork(k) });
        const inst = widestPathTask.instance(graph, { rng: rng.fork(`t${k}`), weightScale: 1 });
        const s = inst.source!;
        const brute = bruteForceWidest(graph, s);
        const fast = widestPath(graph, s);
        for (let i = 0; i < graph.order; i++) {
          expect(fast[i]).toBe(brute[i]); // same min/max operations, so exact equality
          if (i !== s) expect(inst.target[i]).toBe(brute[i]);
        }
        // Source target: its widest incident edge (documented in the task).
        let widestIncident = -Infinity;
        graph.forEachEdge(String(s), (_e, a) => (widestIncident = Math.max(widestIncident, a['weight'] as number)));
        expect(inst.target[s]).toBe(widestIncident);
        // Node input: the same widest incident weight at the source (the recursion's starting value), 0 elsewhere.
        expect(inst.nodeInputs).toEqual(Array.from({ length: graph.order }, (_, i) => [i === s ? widestIncident : 0]));
        expect(inst.mask.every((m) => m === 1)).toBe(true);
        // The max-min rule holds at every node, the source included.
        for (let v = 0; v < graph.order; v++) {
          let rule = -Infinity;
          for (let e = 0; e < inst.messageSrc.length; e++) {
            if (inst.messageDst[e] === v) rule = Math.max(rule, Math.min(inst.target[inst.messageSrc[e]!]!, inst.edgeInputs[e]![0]!));
          }
          expect(rule).toBe(inst.target[v]);
        }
        // iterate reaches the targets after `depth` rounds.
        expect(widestPathTask.iterate!(graph, inst, inst.depth)).toEqual(inst.target);
      }
    });
  }
});

describe('widest-path: Schulze method worked example', () => {
  // Source: the Schulze method's standard five-candidate example (45 voters,
  // candidates A-E), as given in M. Schulze, "A new monotonic, clone-independent,
  // reversal symmetric, and Condorcet-consistent single-winner election method",
  // Social Choice and Welfare 36 (2011), and in the method's Wikipedia article
  // ("Schulze method", Example section): the pairwise-preference matrix d[X,Y]
  // and the strongest-path strengths p[X,Y]. Both matrices are FROM MEMORY.
  // The strongest path between X and Y is a widest path in the digraph with an
  // edge X->Y of weight d[X,Y] whenever d[X,Y] > d[Y,X].
  const d = [
    [0, 20, 26, 30, 22],
    [25, 0, 16, 33, 18],
    [19, 29, 0, 17, 24],
    [15, 12, 28, 0, 14],
    [23, 27, 21, 31, 0],
  ];
  const p = [
    [0, 28, 28, 30, 24],
    [25, 0, 28, 33, 24],
    [25, 29, 0, 29, 24],
    [25, 28, 28, 0, 24],
    [25, 28, 28, 31, 0],
  ];

  it('reproduces the strongest-path matrix (and brute force agrees)', () => {
    // Consistency of the remembered d: every pair of opposite entries sums to the 45 voters.
    for (let x = 0; x < 5; x++) for (let y = x + 1; y < 5; y++) expect(d[x]![y]! + d[y]![x]!).toBe(45);
    const g = new Graph({ type: 'directed' });
    for (let i = 0; i < 5; i++) g.addNode(String(i));
    for (let x = 0; x < 5; x++) for (let y = 0; y < 5; y++) if (x !== y && d[x]![y]! > d[y]![x]!) g.addEdge(String(x), String(y), { weight: d[x]![y]! });
    for (let x = 0; x < 5; x++) {
      const w = widestPath(g, x);
      const brute = bruteForceWidest(g, x);
      for (let y = 0; y < 5; y++) {
        if (x === y) continue;
        expect(w[y]).toBe(p[x]![y]); // published p[X,Y] (from memory)
        expect(brute[y]).toBe(p[x]![y]);
      }
    }
    // The example's winner is E: p[E,Y] >= p[Y,E] for every Y.
    for (let y = 0; y < 4; y++) expect(p[4]![y]!).toBeGreaterThanOrEqual(p[y]![4]!);
  });
});
