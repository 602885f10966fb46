import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs-core';
import { initBackend } from '../../src/engine/backend.ts';
import { AGGREGATOR_REGISTRY, type Aggregator } from '../../src/model/aggregators.ts';
import {
  ACTIVATION_NAMES,
  AGGREGATOR_NAMES,
  AGGREGATOR_RECORDS,
  MESSAGE_NAMES,
  MESSAGE_RECORDS,
  STEP_RULE_NAMES,
  TRANSFORM_NAMES,
  UPDATE_NAMES,
  aggregatorRecord,
  messageRecord,
} from '../../src/model/catalogue.ts';
import { ACTIVATIONS, AGGREGATORS, MESSAGES, STEP_RULES, TRANSFORMS, UPDATES, SpecError, modelSchema, parseSpec, stepRuleSchema } from '../../src/experiment/spec.ts';
import { OPTIONS } from '../../src/ui/catalogue.ts';

beforeAll(async () => {
  await initBackend('wasm');
});

const TAU = 0.7;

/**
 * A tiny message set, 4 nodes × 2 channels. Node 0's messages are all negative,
 * node 1's all positive, node 2's of mixed sign, node 3 has one message: a wrong
 * neutral element (0 for max, say) changes some node.
 */
const DST = [0, 0, 1, 1, 1, 2, 2, 3];
const MESSAGES_IN = [
  [-3.5, -0.25],
  [-1.25, -2],
  [0.5, 4],
  [2.75, 1.5],
  [1, 0.125],
  [-2, 3],
  [1.5, -0.75],
  [-0.5, 2.25],
];
const NODES = 4;

function aggregate(agg: Aggregator, messages: number[][], dst: number[], temperature = TAU): number[][] {
  return tf.tidy(() => {
    const counts = new Array<number>(NODES).fill(0);
    for (const d of dst) counts[d]!++;
    const hasIncoming = tf.tensor2d(
      counts.map((c) => [c > 0 ? 1 : 0]),
      [NODES, 1],
    );
    return agg
      .aggregate({ messages: tf.tensor2d(messages), dst: tf.tensor1d(dst, 'int32'), nodes: NODES, hasIncoming, temperature })
      .arraySync() as number[][];
  });
}

function combine(agg: Aggregator, a: number[][], b: number[][], temperature = TAU): number[][] {
  return tf.tidy(() => agg.combine(tf.tensor2d(a), tf.tensor2d(b), temperature).arraySync() as number[][]);
}

function maxAbsDiff(a: number[][], b: number[][]): number {
  let d = 0;
  a.forEach((row, i) => row.forEach((x, j) => (d = Math.max(d, Math.abs(x - b[i]![j]!)))));
  return d;
}

describe('every catalogue aggregator has an implementation, and vice versa', () => {
  it('the same names', () => {
    expect(Object.keys(AGGREGATOR_REGISTRY).sort()).toEqual([...AGGREGATOR_NAMES].sort());
  });
  it('names are unique', () => {
    for (const names of [AGGREGATOR_NAMES, MESSAGE_NAMES, UPDATE_NAMES, ACTIVATION_NAMES, TRANSFORM_NAMES, STEP_RULE_NAMES]) {
      expect(new Set(names).size).toBe(names.length);
    }
  });
  for (const name of AGGREGATOR_NAMES) {
    it(`${name}: the registry entry carries its record's facts`, () => {
      const agg = AGGREGATOR_REGISTRY[name];
      expect(agg.name).toBe(name);
      expect(agg.idempotent).toBe(aggregatorRecord(name).idempotent);
      expect(agg.homogeneous).toBe(aggregatorRecord(name).homogeneous);
    });
  }
  it('an unknown name is refused with the known ones', () => {
    expect(() => aggregatorRecord('median' as never)).toThrow(/unknown aggregator "median"; known: sum, mean/);
  });
});

describe('neutral elements are neutral for the implementation', () => {
  for (const rec of AGGREGATOR_RECORDS) {
    const agg = AGGREGATOR_REGISTRY[rec.name];
    if (rec.neutral === null) {
      it(`${rec.name}: has none — an extra message of 0 (or of the node's own result) changes the aggregate`, () => {
        const base = aggregate(agg, MESSAGES_IN, DST);
        const withZero = aggregate(agg, [...MESSAGES_IN, [0, 0]], [...DST, 1]);
        expect(maxAbsDiff(base, withZero)).toBeGreaterThan(0.1);
        // combine(a, e) = a for all a would need e = a: no fixed element works for two different a.
        const a = [[1, -2]];
        const e = [[0, 0]];
        expect(maxAbsDiff(combine(agg, a, e), a)).toBeGreaterThan(0.1);
      });
      continue;
    }
    const e = rec.neutral;
    it(`${rec.name}: an extra message e = ${e} at every node that has messages leaves the aggregate unchanged`, () => {
      const base = aggregate(agg, MESSAGES_IN, DST);
      const extra = [0, 1, 2, 3].map(() => [e, e]);
      const withNeutral = aggregate(agg, [...MESSAGES_IN, ...extra], [...DST, 0, 1, 2, 3]);
      expect(withNeutral).toEqual(base);
    });
    it(`${rec.name}: combine(a, e) = combine(e, a) = a`, () => {
      const a = MESSAGES_IN;
      const es = a.map((row) => row.map(() => e));
      expect(combine(agg, a, es)).toEqual(a.map((row) => row.map((x) => Math.fround(x))));
      expect(combine(agg, es, a)).toEqual(a.map((row) => row.map((x) => Math.fround(x))));
    });
  }
});

describe('idempotent and homogeneous flags match the implementation', () => {
  for (const rec of AGGREGATOR_RECORDS) {
    const agg = AGGREGATOR_REGISTRY[rec.name];
    it(`${rec.name}: a ⊕ a = a is ${rec.idempotent}`, () => {
      const gap = maxAbsDiff(combine(agg, MESSAGES_IN, MESSAGES_IN), MESSAGES_IN);
      const setGap = maxAbsDiff(aggregate(agg, [...MESSAGES_IN, ...MESSAGES_IN], [...DST, ...DST]), aggregate(agg, MESSAGES_IN, DST));
      if (rec.idempotent) {
        expect(gap).toBe(0);
        expect(setGap).toBeLessThan(1e-6);
      } else {
        expect(gap).toBeGreaterThan(0.1);
        expect(setGap).toBeGreaterThan(0.1);
      }
    });
    it(`${rec.name}: ⊕(λm) = λ⊕(m) for λ = 3 is ${rec.homogeneous}`, () => {
      const lambda = 3;
      const scaled = aggregate(agg, MESSAGES_IN.map((row) => row.map((x) => lambda * x)), DST);
      const base = aggregate(agg, MESSAGES_IN, DST).map((row) => row.map((x) => lambda * x));
      const gap = maxAbsDiff(scaled, base);
      if (rec.homogeneous) expect(gap).toBeLessThan(1e-5);
      else expect(gap).toBeGreaterThan(0.1);
    });
  }
  it('takesTemperature: a smooth aggregator changes with τ, a hard one does not', () => {
    for (const rec of AGGREGATOR_RECORDS) {
      const agg = AGGREGATOR_REGISTRY[rec.name];
      const gap = maxAbsDiff(aggregate(agg, MESSAGES_IN, DST, 0.5), aggregate(agg, MESSAGES_IN, DST, 2));
      if (rec.takesTemperature) expect(gap, rec.name).toBeGreaterThan(0.01);
      else expect(gap, rec.name).toBe(0);
      expect(rec.takesTemperature, rec.name).toBe(rec.kind === 'smooth');
    }
  });
  it('selective: a ⊕ b is always one of a, b exactly when the record says so', () => {
    const a = [[1.25, -3, 0.5]];
    const b = [[-0.75, 2, 0.5000001]];
    for (const rec of AGGREGATOR_RECORDS) {
      const out = combine(AGGREGATOR_REGISTRY[rec.name], a, b)[0]!;
      const picks = out.every((x, j) => x === Math.fround(a[0]![j]!) || x === Math.fround(b[0]![j]!));
      expect(picks, rec.name).toBe(rec.selective);
    }
  });
  it('message kinds: the smooth ones, and only they, take a temperature', () => {
    for (const rec of MESSAGE_RECORDS) expect(messageRecord(rec.name).takesTemperature, rec.name).toBe(rec.name.startsWith('smooth-'));
  });
});

describe("the schema's enums are the catalogue's names", () => {
  it('the re-exported tuples are the catalogue tuples, in order', () => {
    expect([...AGGREGATORS]).toEqual([...AGGREGATOR_NAMES]);
    expect([...MESSAGES]).toEqual([...MESSAGE_NAMES]);
    expect([...UPDATES]).toEqual([...UPDATE_NAMES]);
    expect([...ACTIVATIONS]).toEqual([...ACTIVATION_NAMES]);
    expect([...TRANSFORMS]).toEqual([...TRANSFORM_NAMES]);
    expect([...STEP_RULES]).toEqual([...STEP_RULE_NAMES]);
  });
  it("the schema's own enum options", () => {
    const shape = modelSchema.shape;
    expect(shape.aggregator.unwrap().options).toEqual([...AGGREGATOR_NAMES]);
    expect(shape.message.unwrap().options).toEqual([...MESSAGE_NAMES]);
    expect(shape.update.unwrap().options).toEqual([...UPDATE_NAMES]);
    expect(shape.activation.unwrap().options).toEqual([...ACTIVATION_NAMES]);
    expect(stepRuleSchema.shape.rule.unwrap().options).toEqual([...STEP_RULE_NAMES]);
  });
  it('a refusal lists the catalogue names, in order', () => {
    const spec = (model: Record<string, unknown>) => ({
      farfield: 1,
      question: 'q',
      task: 'shortest-path',
      train: { family: 'er', sizes: [6, 10] },
      test: { sizes: [20] },
      model,
      arms: [{ name: 'a' }, { name: 'b' }],
    });
    const refusal = (model: Record<string, unknown>): string => {
      try {
        parseSpec(spec(model));
      } catch (e) {
        if (e instanceof SpecError) return e.message;
      }
      return 'accepted';
    };
    expect(refusal({ aggregator: 'median' })).toBe(`model.aggregator: got "median", allowed ${AGGREGATOR_NAMES.map((n) => `"${n}"`).join(' | ')}`);
    expect(refusal({ message: 'x' })).toBe(`model.message: got "x", allowed ${MESSAGE_NAMES.map((n) => `"${n}"`).join(' | ')}`);
  });
  it("the sheet's pickers offer the catalogue's names with its hints", () => {
    expect(OPTIONS.aggregator.map((c) => c.value)).toEqual([...AGGREGATOR_NAMES]);
    expect(OPTIONS.aggregator.map((c) => c.hint)).toEqual(AGGREGATOR_RECORDS.map((r) => r.hint));
    expect(OPTIONS.transform.map((c) => c.value)).toEqual([...TRANSFORM_NAMES]);
  });
});
