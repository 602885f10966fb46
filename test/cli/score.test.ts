/**
 * Saved networks: `run --keep-networks` writes each trained network in
 * TensorFlow.js's weights format, and `score` rescores it without retraining,
 * reproducing the per-rung errors its run recorded in results.json to the last
 * bit, generated rungs and a graph-file rung alike; a changed shard or
 * manifest is caught.
 */
import { describe, expect, it } from 'vitest';
import { copyFileSync, mkdtempSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import * as tf from '@tensorflow/tfjs-core';
import { initBackend } from '../../src/engine/backend.ts';
import { farfield, root, tiny } from './spawn.ts';

interface Metrics {
  mae: number;
  mre: number;
  miss: number;
}
interface Results {
  runs: Array<{ index: number; arm: string; seed: number; inDistribution: Metrics; ladder: Array<{ family: string; size: number; scale: number; metrics: Metrics }> }>;
}
interface Scored {
  reproduces: boolean | null;
  ownLadder: boolean;
  sets: Array<{ family: string; size: number | null; scale: number; metrics: Metrics; exact?: boolean }>;
}
interface Manifest {
  format: string;
  arm: string;
  seed: number;
  engineVersion: string;
  spec: { question: string };
  weightsManifest: Array<{ paths: string[]; weights: Array<{ name: string; shape: number[]; dtype: string }> }>;
}

describe('saved networks: run --keep-networks, then score', () => {
  const dir = mkdtempSync(join(tmpdir(), 'ff-score-'));
  const nets = join(dir, 'nets');
  // The tiny fixture with one graph file as an extra rung, the file beside the preset.
  const states = join(root, 'presets/graphs/us-states.csv');
  copyFileSync(states, join(dir, 'us-states.csv'));
  const preset = join(dir, 'tiny-with-file.json');
  const spec = JSON.parse(readFileSync(tiny, 'utf8')) as { test: Record<string, unknown> };
  writeFileSync(preset, JSON.stringify({ ...spec, test: { ...spec.test, files: [{ name: 'us-states.csv' }] } }));
  const ran = farfield('run', preset, '--json', '--quiet', '--workers', '2', '--keep-networks', nets);
  const results = JSON.parse(ran.stdout) as Results;
  const files = ran.code === 0 ? readdirSync(nets).sort() : [];

  it('writes a JSON manifest and a binary shard per run, in TensorFlow.js weights format', async () => {
    await initBackend('wasm');
    expect(ran.code, ran.stderr).toBe(0);
    expect(files).toEqual(['run0-max-seed3', 'run1-sum-seed3', 'run2-max-seed4', 'run3-sum-seed4'].flatMap((s) => [`${s}.bin`, `${s}.json`]));
    const manifest = JSON.parse(readFileSync(join(nets, 'run0-max-seed3.json'), 'utf8')) as Manifest;
    expect(manifest).toMatchObject({ format: 'farfield-network', arm: 'max', seed: 3, engineVersion: expect.stringMatching(/^\d+\.\d+\.\d+$/) });
    expect(manifest.spec.question).toMatch(/Fixture/);
    const group = manifest.weightsManifest[0]!;
    expect(group.paths).toEqual(['run0-max-seed3.bin']);
    expect(group.weights.map((w) => w.name)).toContain('encode.w');
    // Any tfjs reader can decode the shard with the manifest alone.
    const shard = readFileSync(join(nets, group.paths[0]!));
    const decoded = tf.io.decodeWeights(shard.buffer.slice(shard.byteOffset, shard.byteOffset + shard.byteLength), group.weights as tf.io.WeightsManifestEntry[]);
    expect(Object.keys(decoded)).toEqual(group.weights.map((w) => w.name));
    expect(decoded['encode.w']!.shape).toEqual(group.weights[0]!.shape);
    tf.dispose(Object.values(decoded));
  });

  it('scores a saved network on its own ladder and reproduces its run’s per-rung errors exactly, graph-file rung included', () => {
    for (const stem of ['run0-max-seed3', 'run3-sum-seed4']) {
      // The network's spec names the file by hash; --graphs supplies its content.
      const r = farfield('score', join(nets, `${stem}.json`), '--graphs', states, '--json');
      expect(r.code, r.stderr).toBe(0);
      const scored = JSON.parse(r.stdout) as Scored;
      expect(scored).toMatchObject({ ownLadder: true, reproduces: true });
      const run = results.runs.find((x) => stem === `run${x.index}-${x.arm}-seed${x.seed}`)!;
      // Compared with results.json itself, not only the copy in the network file.
      const [inDistribution, ...ladder] = scored.sets;
      expect(ladder.map((s) => s.family)).toEqual(['er', 'er', 'file:us-states.csv']);
      expect(scored.sets.every((s) => s.exact)).toBe(true);
      expect(inDistribution!.metrics).toMatchObject(run.inDistribution);
      expect(ladder.map((s) => [s.family, s.size, s.scale, s.metrics.mae, s.metrics.mre, s.metrics.miss])).toEqual(
        run.ladder.map((l) => [l.family, l.size, l.scale, l.metrics.mae, l.metrics.mre, l.metrics.miss]),
      );
    }
  });

  it('catches a changed shard (exit 1) and asks for the content of a graph file the spec names', () => {
    const stem = 'run1-sum-seed3';
    const changed = mkdtempSync(join(dir, 'changed-'));
    copyFileSync(join(nets, `${stem}.json`), join(changed, `${stem}.json`));
    const shard = readFileSync(join(nets, `${stem}.bin`));
    const values = new Float32Array(shard.buffer.slice(shard.byteOffset, shard.byteOffset + shard.byteLength));
    values[0] = values[0]! + 0.25;
    writeFileSync(join(changed, `${stem}.bin`), new Uint8Array(values.buffer));
    const r = farfield('score', join(changed, `${stem}.json`), '--graphs', states);
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/NO/);
    expect(r.stderr).toMatch(/differ from the errors the run recorded/);

    // The spec names a graph file the network JSON cannot carry: its content must be given.
    const missing = farfield('score', join(nets, `${stem}.json`));
    expect(missing.code).toBe(1);
    expect(missing.stderr).toMatch(/us-states\.csv.*give it with --graphs PATH/);
  });
});
