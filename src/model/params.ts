/**
 * Named trainable parameters with seeded initial values. Each parameter draws
 * from its own stream `init:<name>`, so arms whose parameters share a name and
 * shape start from identical weights for the same seed (paired comparison).
 */
import * as tf from '@tensorflow/tfjs-core';
import type { Rng } from '../util/rng.ts';

/** tfjs needs globally unique variable names; a counter keeps them so without any random draw. */
let nextVariableId = 0;

export type Init = 'glorot' | 'zeros' | { uniform: [number, number] } | { constant: number };

export class ParamStore {
  readonly vars = new Map<string, tf.Variable>();

  constructor(private readonly rng: Rng) {}

  add(name: string, shape: number[], init: Init): tf.Variable {
    if (this.vars.has(name)) throw new Error(`model/params: parameter "${name}" declared twice`);
    const size = shape.reduce((a, b) => a * b, 1);
    const values = new Float32Array(size);
    const stream = this.rng.fork(`init:${name}:${shape.join('x')}`);
    if (init === 'glorot') {
      const fanIn = shape.length > 1 ? shape[0]! : 1;
      const fanOut = shape[shape.length - 1]!;
      const limit = Math.sqrt(6 / (fanIn + fanOut));
      for (let i = 0; i < size; i++) values[i] = stream.uniform(-limit, limit);
    } else if (init === 'zeros') {
      // already zero
    } else if ('uniform' in init) {
      for (let i = 0; i < size; i++) values[i] = stream.uniform(init.uniform[0], init.uniform[1]);
    } else {
      values.fill(init.constant);
    }
    const initial = tf.tensor(values, shape, 'float32');
    const variable = tf.variable(initial, true, `ff/${name}/${nextVariableId++}`);
    initial.dispose();
    this.vars.set(name, variable);
    return variable;
  }

  get(name: string): tf.Variable {
    const v = this.vars.get(name);
    if (!v) throw new Error(`model/params: no parameter "${name}"`);
    return v;
  }

  has(name: string): boolean {
    return this.vars.has(name);
  }

  /** Plain copies of all values, for best-weights snapshots and export. */
  snapshot(): Map<string, Float32Array> {
    const out = new Map<string, Float32Array>();
    for (const [name, v] of this.vars) out.set(name, v.dataSync().slice() as Float32Array);
    return out;
  }

  restore(snapshot: Map<string, Float32Array>): void {
    for (const [name, values] of snapshot) {
      const v = this.get(name);
      const t = tf.tensor(values, v.shape, 'float32');
      v.assign(t);
      t.dispose();
    }
  }

  /** Overwrite a parameter with given values (hand-set weights in tests and probes). */
  set(name: string, values: ArrayLike<number>): void {
    const v = this.get(name);
    const t = tf.tensor(Array.from(values), v.shape, 'float32');
    v.assign(t);
    t.dispose();
  }

  count(): number {
    let n = 0;
    for (const v of this.vars.values()) n += v.size;
    return n;
  }

  dispose(): void {
    for (const v of this.vars.values()) v.dispose();
    this.vars.clear();
  }
}
