import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs-core';
import { initBackend } from '../../src/engine/backend.ts';
import { gatherPairAdd, gatherRows } from '../../src/model/ops.ts';
import { Rng } from '../../src/util/rng.ts';

describe('gatherPairAdd (the fused first message layer)', () => {
  for (const backend of ['wasm', 'cpu'] as const) {
    describe(backend, () => {
      beforeAll(async () => {
        await initBackend(backend);
      });
      const rng = new Rng(5);
      const N = 6;
      const H = 3;
      const src = [0, 1, 1, 5, 2, 0, 4];
      const dst = [1, 0, 2, 2, 5, 3, 3];
      const P = Array.from({ length: N }, () => Array.from({ length: 2 * H }, () => rng.uniform(-1, 1)));
      const B = src.map(() => Array.from({ length: H }, () => rng.uniform(-1, 1)));

      it('matches a naive loop over edges (common practice)', () => {
        const got = tf.tidy(() => gatherPairAdd(tf.tensor2d(P), tf.tensor1d(src, 'int32'), tf.tensor1d(dst, 'int32'), tf.tensor2d(B)).arraySync());
        src.forEach((s, e) => {
          for (let c = 0; c < H; c++) expect(got[e]![c]).toBeCloseTo(P[s]![c]! + P[dst[e]!]![H + c]! + B[e]![c]!, 6);
        });
      });

      it('has the same gradients as split + two gathers + adds (common practice: composition of known ops)', () => {
        const w = src.map(() => Array.from({ length: H }, () => rng.uniform(-1, 1)));
        const loss = (fused: boolean) => (p: tf.Tensor, b: tf.Tensor) => {
          const s = tf.tensor1d(src, 'int32');
          const d = tf.tensor1d(dst, 'int32');
          const out = fused
            ? gatherPairAdd(p as tf.Tensor2D, s, d, b as tf.Tensor2D)
            : tf.add(tf.add(gatherRows(tf.slice(p, [0, 0], [N, H]) as tf.Tensor2D, s), gatherRows(tf.slice(p, [0, H], [N, H]) as tf.Tensor2D, d)), b);
          return tf.sum(tf.mul(tf.square(out), tf.tensor2d(w)));
        };
        const [gp1, gb1] = tf.tidy(() => tf.grads(loss(true))([tf.tensor2d(P), tf.tensor2d(B)]).map((g) => g.arraySync() as number[][]));
        const [gp2, gb2] = tf.tidy(() => tf.grads(loss(false))([tf.tensor2d(P), tf.tensor2d(B)]).map((g) => g.arraySync() as number[][]));
        gp1!.forEach((row, i) => row.forEach((v, j) => expect(v).toBeCloseTo(gp2![i]![j]!, 5)));
        gb1!.forEach((row, i) => row.forEach((v, j) => expect(v).toBeCloseTo(gb2![i]![j]!, 5)));
      });

      it('refuses out-of-range node ids', () => {
        expect(() => tf.tidy(() => gatherPairAdd(tf.tensor2d(P), tf.tensor1d([0, 9], 'int32'), tf.tensor1d([1, 1], 'int32'), tf.zeros([2, H]) as tf.Tensor2D))).toThrow(/out of range 0\.\.5/);
      });
    });
  }
});
