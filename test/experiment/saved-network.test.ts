/**
 * The saved-network file in process: a network's weights go out through
 * tf.io.encodeWeights and come back bit for bit; a manifest that leaves its
 * folder, changes a shape, renames a weight, names another arm or another
 * dtype is refused with the field named.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { initBackend } from '../../src/engine/backend.ts';
import { armModel } from '../../src/experiment/spec.ts';
import { planRuns } from '../../src/experiment/plan.ts';
import { seedRoot } from '../../src/experiment/datasets.ts';
import { featureTransforms } from '../../src/experiment/run.ts';
import { unmeasuredResult } from '../../src/experiment/run-record.ts';
import { encodeNetworkWeights, type TrainedWeights } from '../../src/experiment/network-weights.ts';
import { NETWORK_FORMAT, readSavedNetwork, savedNetworkFiles, type SavedNetwork } from '../../src/experiment/saved-network.ts';
import { loadSavedNetwork } from '../../src/experiment/score.ts';
import { MessagePassingNetwork } from '../../src/model/network.ts';
import { getTask } from '../../src/tasks/registry.ts';
import { tinySpec } from '../helpers.ts';

const spec = tinySpec();
const plan = planRuns(spec)[1]!;

/** A network of arm `sum`, seed 3, with one parameter set to values no fresh network has. */
async function trainedLike(): Promise<{ network: MessagePassingNetwork; weights: TrainedWeights }> {
  const task = getTask(spec.task);
  const network = new MessagePassingNetwork(armModel(spec, plan.armIndex), task.nodeFeatureNames.length, task.edgeFeatureNames.length, seedRoot(plan.seed));
  const w = network.params.get('encode.w');
  network.params.set('encode.w', Array.from({ length: w.size }, (_, i) => Math.fround(0.1 * i - 0.33)));
  return { network, weights: await encodeNetworkWeights(network, featureTransforms(spec, plan.armIndex, [])) };
}

/** The JSON as it would be read back from disk. */
function asRead(weights: TrainedWeights): { raw: Record<string, unknown> & SavedNetwork; data: ArrayBuffer } {
  const { json, shard } = savedNetworkFiles(spec, unmeasuredResult(plan), weights, '9.9.9');
  return { raw: JSON.parse(json.text), data: shard.bytes.slice().buffer };
}

describe('saved networks', () => {
  beforeAll(async () => {
    await initBackend('wasm');
  });

  it('round-trips every parameter bit for bit, under its own name, with the spec, arm and seed', async () => {
    const { network, weights } = await trainedLike();
    const { raw, data } = asRead(weights);
    expect(raw).toMatchObject({ format: NETWORK_FORMAT, version: 1, engineVersion: '9.9.9', arm: 'sum', armIndex: 1, seed: 3, runIndex: 1 });
    expect(raw.weightsManifest[0]!.paths).toEqual(['run1-sum-seed3.bin']);
    expect(raw.weightsManifest[0]!.weights.map((w) => w.name)).toEqual([...network.params.vars.keys()]);
    const loaded = loadSavedNetwork(readSavedNetwork(raw, 'net.json'), data, 'net.json');
    const before = network.params.snapshot();
    const after = loaded.params.snapshot();
    expect([...after.keys()]).toEqual([...before.keys()]);
    for (const [name, values] of before) expect(Array.from(after.get(name)!).every((v, i) => Object.is(v, values[i]))).toBe(true);
    network.dispose();
    loaded.dispose();
  });

  it('refuses a manifest that leaves its folder, another dtype, another arm, a changed shape or a renamed weight', async () => {
    const { network, weights } = await trainedLike();
    network.dispose();
    const read = (change: (raw: SavedNetwork) => void) => {
      const { raw, data } = asRead(weights);
      change(raw);
      return () => loadSavedNetwork(readSavedNetwork(raw, 'net.json'), data, 'net.json').dispose();
    };
    expect(read((r) => (r.weightsManifest[0]!.paths = ['../../etc/passwd']))).toThrow(/weightsManifest\[0\]\.paths\[0\]: allowed a file name beside the JSON, no folders \(got "\.\.\/\.\.\/etc\/passwd"\)/);
    expect(read((r) => ((r.weightsManifest[0]!.weights[0] as { dtype: string }).dtype = 'int32'))).toThrow(/weightsManifest\[0\]\.weights\[0\]\.dtype: got "int32", allowed "float32"/);
    expect(read((r) => (r.arm = 'max'))).toThrow(/arm: got "max" \(armIndex 1\), allowed one of the spec's arms \(max, sum\)/);
    expect(read((r) => (r.weightsManifest[0]!.weights[0]!.shape = [2, 8]))).toThrow(/the shard run1-sum-seed3\.bin holds \d+ bytes, the manifest describes \d+/);
    expect(read((r) => (r.weightsManifest[0]!.weights[1]!.name = 'encode.other'))).toThrow(/no weight "encode\.b", which arm sum of this spec needs/);
  });
});
