/**
 * The recurrence task's solver, one semiring at a time, against outside
 * references: graphology-shortest-path 2.1 (Dijkstra, breadth-first lengths),
 * hand-worked published examples (source named beside each, "from memory"
 * where recalled), and brute force over simple paths on small graphs. Then the
 * refusals where no fixed point exists, and the alignment suggestions.
 */
import { describe, expect, it } from 'vitest';
import Graph from 'graphology';
import { dijkstra, unweighted } from 'graphology-shortest-path';
import { Rng } from '../../src/util/rng.ts';
import { getFamily } from '../../src/graphs/registry.ts';
import { getTask } from '../../src/tasks/registry.ts';
import { solveRecurrence, type RecurrenceSystem } from '../../src/tasks/recurrence/solver.ts';
import { recurrenceAlignment } from '../../src/tasks/recurrence/alignment.ts';
import type { RecurrenceSemiring, RecurrenceSpec } from '../../src/tasks/recurrence/options.ts';
import { SEMIRINGS } from '../../src/tasks/recurrence/algebra.ts';
import type { TaskInstance } from '../../src/tasks/types.ts';
import { buildInstance } from '../../src/tasks/sample.ts';
import { rungScaling, scaleLikeRung } from '../../src/tasks/rung-scaling.ts';
import { fileInstance } from '../../src/tasks/file-instance.ts';
import { readGraphFile } from '../../src/graphs/files/read.ts';
import { readFileSync } from 'node:fs';
import { graphologyDistances } from '../helpers.ts';

const spec = (semiring: RecurrenceSemiring, over: Partial<RecurrenceSpec> = {}): RecurrenceSpec => ({
  semiring,
  source: 'drawn',
  others: 'edge-weights',
  direction: 'forward',
  ...over,
});

function directed(n: number, edges: Array<[number, number, number]>): Graph {
  const g = new Graph({ type: 'directed' });
  for (let i = 0; i < n; i++) g.addNode(String(i));
  for (const [u, v, w] of edges) g.addEdge(String(u), String(v), { weight: w });
  return g;
}

/** A system from a directed edge list, one source at the semiring's one. */
function system(semiring: RecurrenceSemiring, n: number, edges: Array<[number, number, number]>, source: number): RecurrenceSystem {
  const ops = SEMIRINGS[semiring];
  const start = new Array<number>(n).fill(ops.zero);
  start[source] = ops.one;
  return { n, src: edges.map((e) => e[0]), dst: edges.map((e) => e[1]), factor: edges.map((e) => e[2]), start };
}

/** The value per node the instance's exact solver gives (non-finite where masked). */
function values(inst: TaskInstance): number[] {
  return inst.target.map((t, i) => (inst.mask[i] ? t : NaN));
}

/** Every simple path from `source` (node lists), for brute force on small graphs. */
function simplePaths(n: number, out: Array<Array<[number, number]>>, source: number): Array<{ end: number; factors: number[] }> {
  const found: Array<{ end: number; factors: number[] }> = [{ end: source, factors: [] }];
  const visit = (u: number, seen: Set<number>, factors: number[]) => {
    for (const [v, w] of out[u]!) {
      if (seen.has(v)) continue;
      found.push({ end: v, factors: [...factors, w] });
      visit(v, new Set([...seen, v]), [...factors, w]);
    }
  };
  visit(source, new Set([source]), []);
  return found.filter((p) => p.end < n);
}

function outLists(inst: TaskInstance): Array<Array<[number, number]>> {
  const out: Array<Array<[number, number]>> = Array.from({ length: inst.nodes }, () => []);
  inst.messageSrc.forEach((u, e) => out[u]!.push([inst.messageDst[e]!, inst.edgeInputs[e]![0]!]));
  return out;
}

describe('min-plus against graphology-shortest-path', () => {
  it('equals Dijkstra path lengths on 30 er and 30 dag graphs each, forward and backward', () => {
    const rng = new Rng(41);
    for (const family of ['er', 'dag']) {
      for (let k = 0; k < 30; k++) {
        const n = rng.int(4, 30);
        const graph = getFamily(family).generate({ nodes: n, weightRange: [0.1, 10], rng: rng.fork(`${family}${k}`) });
        for (const direction of ['forward', 'backward'] as const) {
          const inst = getTask({ recurrence: spec('min-plus', { direction }) }).instance(graph, { rng: rng.fork(`t${family}${k}${direction}`), weightScale: 1 });
          // Reference: graphology-shortest-path 2.1 dijkstra.singleSource; backward = the same on the reversed graph.
          const distance = graphologyDistances(direction === 'forward' ? graph : reversed(graph), inst.source!);
          for (let i = 0; i < n; i++) {
            expect(inst.mask[i]).toBe(distance[i] === Infinity ? 0 : 1);
            if (distance[i] !== Infinity) expect(inst.target[i]).toBeCloseTo(distance[i]!, 9);
          }
        }
      }
    }
  });

  it('unit factors equal breadth-first path lengths (graphology-shortest-path unweighted.singleSourceLength)', () => {
    const rng = new Rng(42);
    for (let k = 0; k < 30; k++) {
      const graph = getFamily('geometric').generate({ nodes: rng.int(4, 40), weightRange: [1, 10], rng: rng.fork(k) });
      const inst = getTask({ recurrence: spec('min-plus', { others: 'unit' }) }).instance(graph, { rng: rng.fork(`t${k}`), weightScale: 1 });
      const lengths = unweighted.singleSourceLength(graph, String(inst.source));
      expect(values(inst)).toEqual(Array.from({ length: graph.order }, (_, i) => lengths[String(i)] ?? NaN));
    }
  });

  it('reproduces the Bellman-Ford example with negative edges', () => {
    // Source: T. H. Cormen, C. E. Leiserson, R. L. Rivest, C. Stein, Introduction to Algorithms,
    // 3rd ed. (MIT Press, 2009), §24.1, Figure 24.4: vertices s, t, x, y, z; FROM MEMORY.
    const [s, t, x, y, z] = [0, 1, 2, 3, 4];
    const edges: Array<[number, number, number]> = [
      [s, t, 6], [s, y, 7], [t, x, 5], [t, y, 8], [t, z, -4], [x, t, -2], [y, x, -3], [y, z, 9], [z, s, 2], [z, x, 7],
    ];
    const { value } = solveRecurrence('min-plus', system('min-plus', 5, edges, s), 'test');
    expect(value).toEqual([0, 2, 4, 7, -2]); // book: d = 0, 2, 4, 7, −2 for s, t, x, y, z (from memory)
  });

  it('refuses a negative cycle reachable from the source by name', () => {
    const edges: Array<[number, number, number]> = [[0, 1, 1], [1, 2, -3], [2, 1, 1], [2, 3, 1]];
    expect(() => solveRecurrence('min-plus', system('min-plus', 4, edges, 0), 'test')).toThrow(/min-plus has no fixed point here: a negative cycle is reachable from the source/);
    // The same cycle out of the source's reach is no obstacle.
    expect(solveRecurrence('min-plus', system('min-plus', 4, edges, 3), 'test').value).toEqual([Infinity, Infinity, Infinity, 0]);
  });
});

function reversed(graph: Graph): Graph {
  const r = new Graph({ type: 'directed' });
  graph.forEachNode((key) => r.addNode(key));
  graph.forEachEdge((_e, attr, s, t, _sa, _ta, undirected) => {
    r.addDirectedEdge(t, s, { ...attr });
    if (undirected) r.addDirectedEdge(s, t, { ...attr });
  });
  return r;
}

describe('max-times, max-min, plus-times and or-and', () => {
  it('max-times equals exp(−Dijkstra) on −log reliabilities (common practice: the most reliable path is a shortest path of −log p)', () => {
    const rng = new Rng(43);
    for (let k = 0; k < 30; k++) {
      const graph = getFamily('er').generate({ nodes: rng.int(4, 30), weightRange: [0.2, 1], rng: rng.fork(k) });
      const inst = getTask({ recurrence: spec('max-times') }).instance(graph, { rng: rng.fork(`t${k}`), weightScale: 1 });
      const logs = graph.copy();
      logs.updateEachEdgeAttributes((_e, attr) => ({ ...attr, weight: -Math.log(attr['weight'] as number) }));
      const paths = dijkstra.singleSource(logs, String(inst.source));
      for (let i = 0; i < graph.order; i++) {
        const p = paths[String(i)];
        let r = p ? 1 : 0;
        for (let j = 1; p && j < p.length; j++) r *= graph.getEdgeAttribute(graph.edge(p[j - 1]!, p[j]!)!, 'weight') as number;
        expect(inst.target[i]).toBeCloseTo(r, 12);
        expect(inst.mask[i]).toBe(1); // zero 0 is finite: unreached nodes count with target 0
      }
    }
  });

  it('max-min, plus-times and max-times equal brute force over simple paths on small graphs', () => {
    const rng = new Rng(44);
    for (const [semiring, family, range] of [
      ['max-min', 'er', [1, 10]],
      ['max-times', 'er', [0.3, 1]],
      ['plus-times', 'dag', [0.5, 2]],
    ] as const) {
      for (let k = 0; k < 25; k++) {
        const graph = getFamily(family).generate({ nodes: rng.int(4, 9), weightRange: range, rng: rng.fork(`${semiring}${k}`) });
        const inst = getTask({ recurrence: spec(semiring) }).instance(graph, { rng: rng.fork(`t${semiring}${k}`), weightScale: 1 });
        const ops = SEMIRINGS[semiring];
        const best = new Array<number>(inst.nodes).fill(ops.zero);
        for (const path of simplePaths(inst.nodes, outLists(inst), inst.source!)) {
          best[path.end] = ops.add(best[path.end]!, path.factors.reduce((acc, w) => ops.mul(acc, w), ops.one));
        }
        // Brute force (common practice: the path problem's value is the ⊕ over paths of the ⊗ of their factors).
        for (let i = 0; i < inst.nodes; i++) {
          if (Number.isFinite(best[i]!)) expect(inst.target[i]).toBeCloseTo(best[i]!, 9);
          else expect(inst.mask[i]).toBe(0);
        }
      }
    }
  });

  it('plus-times over unit factors counts lattice paths: C(i + j, i) (common practice: Pascal’s triangle)', () => {
    const k = 6;
    const edges: Array<[number, number, number]> = [];
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        if (i + 1 < k) edges.push([i * k + j, (i + 1) * k + j, 5]);
        if (j + 1 < k) edges.push([i * k + j, i * k + j + 1, 5]);
      }
    }
    const inst = getTask({ recurrence: spec('plus-times', { others: 'unit' }) }).instance(directed(k * k, edges), { rng: new Rng(1), weightScale: 1, source: 0 });
    const choose = (a: number, b: number): number => (b === 0 ? 1 : (choose(a - 1, b - 1) * a) / b);
    for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) expect(inst.target[i * k + j]).toBe(choose(i + j, i));
    expect(inst.target[k * k - 1]).toBe(252); // C(10, 5)
  });

  it('or-and marks exactly the nodes graphology finds reachable, forward and backward', () => {
    const rng = new Rng(45);
    for (let k = 0; k < 20; k++) {
      const graph = getFamily('dag').generate({ nodes: rng.int(4, 30), weightRange: [1, 10], rng: rng.fork(k) });
      for (const direction of ['forward', 'backward'] as const) {
        const source = rng.int(0, graph.order - 1);
        const inst = getTask({ recurrence: spec('or-and', { others: 'unit', direction }) }).instance(graph, { rng: rng.fork(`t${k}`), weightScale: 1, source });
        const lengths = unweighted.singleSourceLength(direction === 'forward' ? graph : reversed(graph), String(source));
        expect(inst.target).toEqual(Array.from({ length: graph.order }, (_, i) => (String(i) in lengths ? 1 : 0)));
      }
    }
  });
});

describe('max-plus with node weights: critical path', () => {
  it('reproduces the jobsPC schedule: finish times and the 173 makespan', () => {
    // Source: R. Sedgewick & K. Wayne, Algorithms, 4th ed. (Addison-Wesley, 2011), §4.4,
    // "Parallel job scheduling", jobsPC.txt and its start-time table; FROM MEMORY.
    const durations = [41, 51, 50, 36, 38, 45, 21, 32, 32, 29];
    const precede: Array<[number, number]> = [[0, 1], [0, 7], [0, 9], [1, 2], [6, 3], [6, 8], [7, 3], [7, 8], [8, 2], [9, 4], [9, 6]];
    const bookStart = [0, 41, 123, 91, 70, 0, 70, 41, 91, 41];
    const sys: RecurrenceSystem = { n: 10, src: precede.map((p) => p[0]), dst: precede.map((p) => p[1]), factor: precede.map((p) => durations[p[1]]!), start: durations };
    const { value } = solveRecurrence('max-plus', sys, 'test');
    expect(value).toEqual(bookStart.map((t, i) => t + durations[i]!));
    expect(Math.max(...value)).toBe(173); // book: "Finish time: 173" (from memory)
    // Backward: the longest chain of work from each job to the end (its "tail"), e.g. job 0 heads the critical path.
    const back = solveRecurrence('max-plus', { ...sys, src: sys.dst, dst: sys.src, factor: precede.map((p) => durations[p[0]]!) }, 'test').value;
    expect(back[0]).toBe(173);
  });

  it('refuses a cycle reachable from the start under max-plus and plus-times, and accepts it out of reach', () => {
    const edges: Array<[number, number, number]> = [[0, 1, 1], [1, 2, 1], [2, 1, 1], [3, 0, 1]];
    for (const semiring of ['max-plus', 'plus-times'] as const) {
      expect(() => solveRecurrence(semiring, system(semiring, 4, edges, 0), 'test')).toThrow(new RegExp(`${semiring} has no fixed point here: a directed cycle \\(through node [12]\\)`));
      const ops = SEMIRINGS[semiring];
      const start = [ops.zero, ops.zero, ops.zero, ops.zero];
      expect(solveRecurrence(semiring, { n: 4, src: [0, 1, 2, 3], dst: [1, 2, 1, 0], factor: [1, 1, 1, 1], start }, 'test').rounds).toBe(0);
    }
    // Any undirected edge is a cycle u→v→u.
    const path = getFamily('path').generate({ nodes: 5, weightRange: [1, 2], rng: new Rng(3) });
    expect(() => getTask({ recurrence: spec('max-plus') }).instance(path, { rng: new Rng(1), weightScale: 1 })).toThrow(/undirected edge is a cycle/);
  });

  it('refuses max-times factors outside (0, 1], naming the edge', () => {
    const g = directed(3, [[0, 1, 0.5], [1, 2, 1.25]]);
    expect(() => getTask({ recurrence: spec('max-times') }).instance(g, { rng: new Rng(1), weightScale: 1, source: 0 })).toThrow(/factor of edge 1→2 is 1.25; max-times allows \(0, 1\]/);
  });
});

describe('suggested aggregator and message layer come from the catalogue', () => {
  it('reads each semiring through the aggregator and message records', () => {
    expect(recurrenceAlignment('min-plus')).toMatchObject({ aggregator: 'min', aggregators: ['min', 'smooth-min'], messages: ['min-plus', 'smooth-min-plus'] });
    expect(recurrenceAlignment('max-min')).toMatchObject({ aggregator: 'max', messages: [] });
    expect(recurrenceAlignment('plus-times')).toMatchObject({ aggregator: 'sum', messages: [] });
    expect(recurrenceAlignment('or-and').aggregator).toBe('max');
    expect(recurrenceAlignment('max-times')).toMatchObject({ aggregator: 'max', messages: ['max-plus', 'smooth-max-plus'] });
    expect(recurrenceAlignment('max-times').line).toMatch(/log/);
    expect(getTask({ recurrence: spec('min-plus') }).alignedAggregator).toBe('min');
  });
});

describe('weight-scale rungs', () => {
  it('scale the inputs exactly as the recurrence rung scaling says, and the target where a power exists', () => {
    const cases: Array<[RecurrenceSpec, string, readonly [number, number], number]> = [
      [spec('min-plus'), 'er', [1, 10], 3],
      [spec('max-min', { source: 'drawn-widest-edge' }), 'grid', [1, 10], 0.5],
      [spec('max-plus', { source: 'none', others: 'node-weights', direction: 'backward' }), 'dag', [1, 10], 10],
      [spec('min-plus', { others: 'unit' }), 'tree', [1, 10], 7],
      [spec('max-times'), 'geometric', [0.2, 0.5], 2],
      [spec('plus-times'), 'dag', [0.5, 2], 2],
    ];
    const rng = new Rng(46);
    for (const [recurrence, family, weightRange, c] of cases) {
      const ref = { recurrence };
      const scaling = rungScaling(ref);
      for (let k = 0; k < 10; k++) {
        const at1 = buildInstance(ref, family, 16, rng.fork(`${family}${k}`), { weightRange }).instance;
        const atC = buildInstance(ref, family, 16, rng.fork(`${family}${k}`), { weightRange, weightScale: c }).instance;
        const expected = scaleLikeRung(at1, scaling, c);
        expect(atC.nodeInputs.flat()).toEqual(expected.nodeInputs.flat());
        expect(atC.edgeInputs.flat()).toEqual(expected.edgeInputs.flat());
        if (Number.isNaN(scaling.target)) continue; // products of path-many factors: no single power
        atC.target.forEach((t, i) => expect(t).toBeCloseTo(expected.target[i]!, 9));
      }
    }
  });

  it('max-times admits only the scales that keep every factor within (0, 1]', () => {
    const task = getTask({ recurrence: spec('max-times') });
    expect(task.admitsWeightScale?.([0.5, 0.8], 1.25)).toBe(true);
    expect(task.admitsWeightScale?.([0.5, 0.8], 1.3)).toBe(false);
    expect(getTask({ recurrence: spec('max-times', { others: 'unit' }) }).admitsWeightScale?.([0.5, 0.8], 100)).toBe(true);
  });
});

describe('on a real graph file', () => {
  // presets/graphs/us-states.csv: U.S. states sharing a border, weights in km between centroids,
  // derived from the us-atlas package (ISC; U.S. Census Bureau boundaries, public domain).
  const file = readGraphFile({ name: 'us-states.csv' }, readFileSync(new URL('../../presets/graphs/us-states.csv', import.meta.url), 'utf8'));

  it('reproduces the built-in shortest-path, widest-path and hop-count file instances bit for bit', () => {
    const pairs: Array<[string, RecurrenceSpec]> = [
      ['shortest-path', spec('min-plus')],
      ['widest-path', spec('max-min', { source: 'drawn-widest-edge' })],
      ['hop-count', spec('min-plus', { others: 'unit' })],
    ];
    for (const [builtin, recurrence] of pairs) {
      const a = fileInstance(getTask(builtin), file, { source: 'Kansas' }).instance;
      const b = fileInstance(getTask({ recurrence }), file, { source: 'Kansas' }).instance;
      expect(b.target.every((t, i) => Object.is(t, a.target[i]))).toBe(true);
      expect(b.mask).toEqual(a.mask);
    }
  });

  it('us-counties.gr (DIMACS, 3,216 counties): min-plus equals graphology-shortest-path Dijkstra lengths', () => {
    // Same derivation as us-states.csv (us-atlas, ISC; U.S. Census Bureau boundaries, public domain).
    const counties = readGraphFile({ name: 'us-counties.gr' }, readFileSync(new URL('../../presets/graphs/us-counties.gr', import.meta.url), 'utf8'));
    const { graph, instance } = fileInstance(getTask({ recurrence: spec('min-plus') }), counties, { source: '1' });
    const distance = graphologyDistances(graph, instance.source!);
    for (let i = 0; i < graph.order; i++) {
      expect(instance.mask[i]).toBe(distance[i] === Infinity ? 0 : 1);
      if (distance[i] !== Infinity) expect(instance.target[i]).toBeCloseTo(distance[i]!, 6);
    }
    expect(distance.filter((d) => d !== Infinity).length).toBeGreaterThan(3000);
  });

  it('scores reachability and refuses what the file cannot give', () => {
    const reach = fileInstance(getTask({ recurrence: spec('or-and', { others: 'unit' }) }), file, { source: 'Kansas' }).instance;
    const hops = fileInstance(getTask('hop-count'), file, { source: 'Kansas' }).instance;
    expect(reach.target).toEqual(hops.mask); // reached exactly where a hop count exists
    expect(() => fileInstance(getTask({ recurrence: spec('max-times') }), file, { source: 'Kansas' })).toThrow(/max-times allows \(0, 1\]/);
    expect(() => fileInstance(getTask({ recurrence: spec('max-plus', { source: 'none', others: 'node-weights' }) }), file)).toThrow(/cannot be scored on graph files/);
  });
});
