import { expect } from 'vitest';
import { validateSpec } from '../src/experiment/check.ts';
import { SpecError, modelSchema, type ExperimentSpec, type SpecInput } from '../src/experiment/spec.ts';
import { MessagePassingNetwork } from '../src/model/network.ts';
import { Rng } from '../src/util/rng.ts';
import type Graph from 'graphology';
import { dijkstra as graphologyDijkstra } from 'graphology-shortest-path';

/** A small, fast spec for tests; override any part. */
export function tinySpec(overrides: Partial<SpecInput> = {}): ExperimentSpec {
  const base: SpecInput = {
    farfield: 1,
    question: 'test: does max beat sum on tiny graphs?',
    task: 'shortest-path',
    train: { family: 'er', sizes: [5, 8], graphs: 32 },
    test: { sizes: [8, 12], graphsPerRung: 4, validationGraphs: 8 },
    budget: { steps: 20, batchGraphs: 8, learningRate: 0.003, clipNorm: 1, loss: 'huber', validateEvery: 10 },
    seeds: { count: 2, base: 3 },
    model: { hidden: 8, steps: { rule: 'nodes', trainJitter: 2 } },
    arms: [
      { name: 'max', model: { aggregator: 'max' } },
      { name: 'sum', model: { aggregator: 'sum' } },
    ],
  };
  return validateSpec({ ...base, ...overrides });
}

/**
 * Bellman-Ford as a network: one channel holding the distance estimate. The
 * shortest-path node input is 0 at the source and a median edge weight (≥ the
 * smallest weight) elsewhere, so encoding it as unreached × input starts the
 * source at 0 and every other node at least `unreached` away; min-plus messages
 * d(u) + weightGain·w, min aggregation and the state ⊕ message update.
 * `weightGain` 1 is exact; anything else is a deliberately wrong network.
 */
export function bellmanFordNetwork(options: { weightGain?: number; unreached?: number } = {}): MessagePassingNetwork {
  const { weightGain = 1, unreached = 1e4 } = options;
  const net = new MessagePassingNetwork(
    modelSchema.parse({ hidden: 1, aggregator: 'min', message: 'min-plus', update: 'aggregate', bias: true, steps: { rule: 'nodes', trainJitter: 0 } }),
    1,
    1,
    new Rng(1),
  );
  net.params.set('encode.w', [unreached]);
  net.params.set('encode.b', [0]);
  net.params.set('message.semiring', [0]);
  net.params.set('message.we', [weightGain]);
  net.params.set('message.b', [0]);
  net.params.set('decode.w', [1]);
  net.params.set('decode.b', [0]);
  return net;
}

/**
 * Two lists of float arrays are equal bit for bit (Object.is: NaN equals NaN,
 * −0 differs from 0); on failure shows the first differing [array, index, a, b].
 */
export function expectSameBits(actual: number[][], expected: number[][]): void {
  expect(actual.length).toBe(expected.length);
  for (let t = 0; t < actual.length; t++) {
    const a = actual[t]!;
    const b = expected[t]!;
    expect(a.length).toBe(b.length);
    const differing = a.map((v, i) => (Object.is(v, b[i]) ? -1 : i)).filter((i) => i >= 0);
    expect(differing.slice(0, 5).map((i) => [t, i, a[i], b[i]])).toEqual([]);
  }
}

/** The message of the SpecError a spec is refused with; fails the test if the spec is accepted. */
export function specRefusal(input: unknown): string {
  try {
    validateSpec(input);
  } catch (error) {
    expect(error).toBeInstanceOf(SpecError);
    return (error as Error).message;
  }
  throw new Error('spec was accepted');
}

/**
 * Shortest-path distances per node from graphology-shortest-path 2.1's
 * Dijkstra (`singleSource`): the `weight` attributes summed along each
 * returned path; Infinity where the source reaches no path.
 */
export function graphologyDistances(graph: Graph, source: number): number[] {
  const paths = graphologyDijkstra.singleSource(graph, String(source));
  return Array.from({ length: graph.order }, (_, i) => {
    const p = paths[String(i)];
    if (!p) return Infinity;
    let d = 0;
    for (let k = 1; k < p.length; k++) d += graph.getEdgeAttribute(graph.edge(p[k - 1]!, p[k]!)!, 'weight') as number;
    return d;
  });
}
