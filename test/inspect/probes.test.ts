/**
 * Probe curves: a network that runs Bellman-Ford exactly must follow the
 * truth across every sweep, far outside any training range; a deliberately
 * wrong one must not (so these checks can fail).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs-core';
import { initBackend } from '../../src/engine/backend.ts';
import { meanAudit } from '../../src/inspect/audit.ts';
import { meanProbe, probeSummary, type Probe } from '../../src/inspect/probe.ts';
import { DEFAULT_SCALES, scaleProbe } from '../../src/inspect/scale-sweep.ts';
import { lengthProbe } from '../../src/inspect/length-sweep.ts';
import { messageProbe } from '../../src/inspect/message-probe.ts';
import { makeSeedData } from '../../src/experiment/datasets.ts';
import type { FeatureTransforms } from '../../src/train/batch.ts';
import { tinySpec, bellmanFordNetwork } from '../helpers.ts';

const identity: FeatureTransforms = { node: ['identity'], edge: ['identity'], nodeStats: [], edgeStats: [] };
// Distances at λ = 100 reach ~10⁴; the "not reached" value must stay far above them.
const BIG = 1e6;


/** Largest |predicted − truth| / |truth| over the sweep (truth floored at 1e-9). */
function worstRelative(probe: Probe): number {
  return Math.max(...probe.points.map((p) => Math.abs(p.predicted - p.truth) / Math.max(Math.abs(p.truth), 1e-9)));
}

const spec = tinySpec();
const data = makeSeedData(spec, spec.seeds.base);

beforeAll(async () => {
  await initBackend('wasm');
});

describe('probes on a network that runs Bellman-Ford exactly (Sedgewick & Wayne, Algorithms 4th ed., §4.4: Bellman-Ford is exact for any non-negative weights and any path length)', () => {
  it('scale sweep: prediction = truth for λ from 0.01 to 100, and truth scales linearly', () => {
    const net = bellmanFordNetwork({ unreached: BIG });
    const probe = scaleProbe(net, identity, spec, { seed: 3, graphs: 6 });
    expect(probe.points.map((p) => p.x)).toEqual([...DEFAULT_SCALES]);
    expect(probe.points[0]!.x).toBe(0.01);
    expect(probe.points[6]!.x).toBe(1);
    expect(probe.points.at(-1)!.x).toBe(100);
    expect(probe.trainingRange).toEqual([1, 1]);
    for (const p of probe.points) {
      expect(Math.abs(p.predicted - p.truth) / p.truth, `λ = ${p.x}`).toBeLessThan(1e-5);
      expect(p.mae / p.truth, `λ = ${p.x}`).toBeLessThan(1e-5);
    }
    // shortest-path distances are homogeneous of degree 1 in the weights
    const at1 = probe.points[6]!.truth;
    for (const p of probe.points) expect(p.truth / at1).toBeCloseTo(p.x, 4);
    const summary = probeSummary(probe);
    expect(summary.worstInside!.x).toBe(1);
    expect(summary.worstOutside!.relative).toBeLessThan(1e-5);
    net.dispose();
  });

  it('length sweep: the far end of paths of 4..64 nodes is exact (unit weights: distance = hops)', () => {
    const net = bellmanFordNetwork({ unreached: BIG });
    const probe = lengthProbe(net, identity, spec, { train: data.train });
    expect(probe.unavailable).toBeUndefined();
    expect(probe.points.map((p) => p.x)).toEqual([3, 5, 7, 11, 15, 23, 31, 47, 63]);
    for (const p of probe.points) {
      expect(p.truth).toBe(p.x);
      expect(p.predicted).toBeCloseTo(p.truth, 4);
    }
    // trained range: depths of the training graphs (5..8-node ER graphs are shallow)
    const [lo, hi] = probe.trainingRange;
    expect(lo).toBeGreaterThanOrEqual(1);
    expect(hi).toBeLessThanOrEqual(7);
    net.dispose();
  });

  it('message probe: a leaf fed by a settled sender reads d_s + w for w up to 10× the largest training weight', () => {
    const net = bellmanFordNetwork({ unreached: BIG });
    const probe = messageProbe(net, identity, spec, { validation: data.validation });
    expect(probe.points).toHaveLength(21);
    expect(probe.points[0]!.x).toBe(0);
    expect(probe.points.at(-1)!.x).toBeCloseTo(100, 10);
    expect(probe.trainingRange).toEqual([1, 10]);
    const ds = probe.details!['senderDecoded'] as number;
    // the aligned network decodes its states exactly, so d_s is the mean exact target
    expect(ds).toBeCloseTo(probe.details!['senderExactMean'] as number, 3);
    for (const p of probe.points) {
      expect(p.truth).toBeCloseTo(ds + p.x, 4);
      expect(p.predicted, `w = ${p.x}`).toBeCloseTo(p.truth, 3);
    }
    // one delivery is already enough for an aligned network
    const once = messageProbe(net, identity, spec, { validation: data.validation, deliveries: 1 });
    expect(worstRelative(once)).toBeLessThan(1e-5);
    net.dispose();
  });

  it('probes leave no tensors behind', () => {
    const net = bellmanFordNetwork({ unreached: BIG });
    const before = tf.memory().numTensors;
    scaleProbe(net, identity, spec, { seed: 3, graphs: 2, scales: [0.1, 10] });
    lengthProbe(net, identity, spec, { lengths: [4, 8] });
    messageProbe(net, identity, spec, { validation: data.validation.slice(0, 2), points: 3 });
    expect(tf.memory().numTensors).toBe(before);
    net.dispose();
  });
});

describe('probes catch a wrong network', () => {
  it('halving the edge weight in the message: every sweep deviates from the truth', () => {
    const net = bellmanFordNetwork({ weightGain: 0.5, unreached: BIG });
    const scale = scaleProbe(net, identity, spec, { seed: 3, graphs: 6 });
    expect(worstRelative(scale)).toBeGreaterThan(0.3);
    expect(probeSummary(scale).worstOutside!.relative).toBeGreaterThan(0.3);
    const length = lengthProbe(net, identity, spec);
    expect(worstRelative(length)).toBeCloseTo(0.5, 3);
    const message = messageProbe(net, identity, spec, { validation: data.validation });
    // predicted d_s + w/2 against d_s + w: the gap grows with w
    const last = message.points.at(-1)!;
    expect(last.truth - last.predicted).toBeCloseTo(last.x / 2, 2);
    net.dispose();
  });

  it('probeSummary splits the worst deviation inside and outside the training range (a curve right only where it was trained)', () => {
    const net = bellmanFordNetwork({ unreached: BIG });
    const probe = messageProbe(net, identity, spec, { validation: data.validation });
    const ds = probe.details!['senderDecoded'] as number;
    // The same curve, saturating at the largest training weight (10): right inside, wrong beyond.
    const saturating: Probe = {
      ...probe,
      points: probe.points.map((p) => {
        const predicted = Math.min(p.predicted, ds + 10);
        return { ...p, predicted, mae: Math.abs(predicted - p.truth) };
      }),
    };
    const s = probeSummary(saturating);
    expect(s.worstInside!.relative).toBeLessThan(1e-5);
    expect(s.worstOutside!.relative).toBeGreaterThan(0.5);
    expect(s.worstOutside!.x).toBeCloseTo(100, 6);
    net.dispose();
  });
});

describe('probe bookkeeping', () => {
  it('length probe is marked unavailable for tasks that do not accept path graphs', () => {
    const net = bellmanFordNetwork({ unreached: BIG });
    const dagSpec = tinySpec({ task: 'earliest-finish', train: { family: 'dag', sizes: [5, 8], graphs: 8 } });
    const probe = lengthProbe(net, identity, dagSpec);
    expect(probe.unavailable).toMatch(/does not accept the 'path' family/);
    expect(probe.points).toEqual([]);
    expect(messageProbe(net, identity, dagSpec, { validation: [] }).unavailable).toMatch(/no edge weight/);
    net.dispose();
  });

  it('meanProbe averages pointwise; meanAudit keeps the worst and needs every seed to pass', () => {
    const base: Probe = { kind: 'scale', title: 't', xLabel: 'x', yLabel: 'y', xScale: 'log', trainingRange: [1, 1], note: 'n', points: [{ x: 1, predicted: 1, truth: 2, mae: 1 }] };
    const other: Probe = { ...base, points: [{ x: 1, predicted: 3, truth: 2, mae: 1 }] };
    expect(meanProbe([base, other])!.points[0]).toEqual({ x: 1, predicted: 2, truth: 2, mae: 1 });
    const row = { check: 'c', component: 'aggregator' as const, subject: 's', measure: 'relative' as const, samples: 1, expected: 'exactly 0' };
    const merged = meanAudit([[{ ...row, mean: 0, worst: 0, pass: true }], [{ ...row, mean: 2, worst: 4, pass: false }]]);
    expect(merged[0]).toMatchObject({ mean: 1, worst: 4, pass: false, samples: 2 });
  });

  it('probeSummary divides by the own truth of each point, even on a log-scale sweep', () => {
    const probe: Probe = {
      kind: 'scale', title: 't', xLabel: 'x', yLabel: 'y', xScale: 'log', trainingRange: [1, 1], note: 'n',
      points: [
        { x: 0.01, predicted: 0.02, truth: 0.01, mae: 0.01 },
        { x: 1, predicted: 1.1, truth: 1, mae: 0.1 },
        { x: 100, predicted: 110, truth: 100, mae: 10 },
      ],
    };
    const s = probeSummary(probe);
    expect(s.worstOutside).toEqual({ x: 0.01, relative: 1 });
    expect(s.worstInside!.relative).toBeCloseTo(0.1, 12);
  });
});
