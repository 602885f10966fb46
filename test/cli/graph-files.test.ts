/**
 * Graph files on the command line: `farfield sample --graphs` prints a file's
 * graph with exact targets; `farfield run --graphs` and a preset's test.files
 * add file rungs to every run, the table and the verdicts; bad files stop the
 * command with file and line before any worker starts.
 */
import { describe, expect, it } from 'vitest';
import { mkdtempSync, writeFileSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { farfield, root, tiny } from './spawn.ts';
import { validateSpec } from '../../src/experiment/check.ts';
import { encodeSpecLink } from '../../src/share/link.ts';
import { contentHash } from '../../src/graphs/files/read.ts';

const dir = mkdtempSync(join(tmpdir(), 'farfield-graphs-'));
// The sample graph of the 9th DIMACS Implementation Challenge shortest-path format description (from memory).
const sampleGr = join(dir, 'sample.gr');
writeFileSync(sampleGr, 'c sample\np sp 6 8\na 1 2 17\na 1 3 10\na 2 4 2\na 3 5 0\na 4 3 0\na 4 6 3\na 5 2 0\na 5 6 20\n');
const states = join(root, 'presets/graphs/us-states.csv');

describe('farfield sample --graphs', () => {
  it('prints the file graph with exact targets in the sample JSON, with the file ids', () => {
    const r = farfield('sample', '--task', 'shortest-path', '--graphs', sampleGr, '--source', '1');
    expect(r.code, r.stderr).toBe(0);
    const doc = JSON.parse(r.stdout) as { task: string; family: string; seed: null; graphs: Array<{ nodes: number; directed: boolean; source: number; target: number[]; mask: number[]; ids: string[]; edges: number[][] }> };
    expect(doc).toMatchObject({ task: 'shortest-path', family: 'file:sample.gr', seed: null });
    const g = doc.graphs[0]!;
    expect(g).toMatchObject({ nodes: 6, directed: true, source: 0, ids: ['1', '2', '3', '4', '5', '6'] });
    expect(g.target).toEqual([0, 10, 10, 12, 10, 15]);
    expect(g.edges[0]).toEqual([0, 1, 17]);
  });

  it('refuses a bad line with the file and line, exit 1, no stack trace', () => {
    const bad = join(dir, 'bad.gr');
    writeFileSync(bad, 'p sp 3 1\na 1 4 2\n');
    const r = farfield('sample', '--task', 'shortest-path', '--graphs', bad);
    expect(r.code).toBe(1);
    expect(r.stderr).toBe(`farfield sample: ${bad}, line 2: unknown node id 4; allowed 1..3 (the problem line on line 1 declares 3 nodes)\n`);
  });
});

describe('farfield run with graph files', () => {
  const r = farfield('run', tiny, '--graphs', states, '--json', '--quiet', '--workers', '2');
  interface Doc {
    spec: { test: { files: Array<{ name: string; sha256: string }> } };
    runs: Array<{ status: string; ladder: Array<{ family: string; size: number; metrics: { mae: number }; file?: { nodes: number; edges: number; source: string; counted: number; sha256: string } }> }>;
    comparison: { rungs: Array<{ family: string; size: number; pairs: Array<{ verdict: { kind: string } }> }> };
  }
  const doc = JSON.parse(r.stdout) as Doc;

  it('scores every run on the file as one more rung, recorded with its hash', () => {
    expect(r.code, r.stderr).toBe(0);
    const sha = doc.spec.test.files[0]!.sha256;
    expect(sha).toMatch(/^[0-9a-f]{64}$/);
    for (const run of doc.runs) {
      expect(run.status).toBe('ok');
      expect(run.ladder.map((l) => l.family)).toEqual(['er', 'er', 'file:us-states.csv']);
      const rung = run.ladder[2]!;
      expect(rung.size).toBe(49);
      expect(rung.file).toMatchObject({ nodes: 49, edges: 107, source: 'Alabama', counted: 49, sha256: sha });
      expect(Number.isFinite(rung.metrics.mae)).toBe(true);
    }
    expect(doc.comparison.rungs.map((x) => x.family)).toEqual(['er', 'er', 'file:us-states.csv']);
    expect(doc.comparison.rungs[2]!.pairs[0]!.verdict.kind).toBe('too-few-seeds');
  });

  it('a preset names files relative to itself, and a file that does not match its hash is refused', () => {
    const presetDir = mkdtempSync(join(tmpdir(), 'farfield-preset-'));
    writeFileSync(join(presetDir, 'g.gr'), readFileSync(sampleGr));
    const spec = JSON.parse(readFileSync(tiny, 'utf8')) as { test: Record<string, unknown> };
    spec.test.files = [{ name: 'g.gr', sha256: '0'.repeat(64) }];
    const preset = join(presetDir, 'preset.json');
    writeFileSync(preset, JSON.stringify(spec));
    const refused = farfield('run', preset, '--quiet');
    expect(refused.code).toBe(1);
    expect(refused.stderr).toMatch(/^farfield run: g\.gr: does not match the recorded content hash: the spec says sha256 000000000000…, this file is [0-9a-f]{12}… \(a different or edited file\)\n$/);
    spec.test.files = [{ name: 'g.gr', source: '9' }];
    writeFileSync(preset, JSON.stringify(spec));
    const run = farfield('run', preset, '--quiet');
    expect(run.code).toBe(1);
    expect(run.stderr).toBe("farfield run: g.gr: unknown source node id '9'; allowed 1..6\n");
  });

  it('a share link names its files by hash: run asks for them, and --graphs supplies them', async () => {
    const spec = JSON.parse(readFileSync(tiny, 'utf8')) as { test: Record<string, unknown>; seeds: Record<string, unknown> };
    spec.test.files = [{ name: 'sample.gr', source: '1', sha256: await contentHash(readFileSync(sampleGr)) }];
    spec.seeds = { count: 1, base: 3 };
    const link = await encodeSpecLink(validateSpec(spec), { base: '' });
    const asked = farfield('run', link, '--quiet');
    expect(asked.code).toBe(1);
    expect(asked.stderr).toMatch(/^farfield run: sample\.gr: the link names this graph file \(sha256 [0-9a-f]{12}…\) but does not carry it; give it with --graphs PATH\n$/);
    const supplied = farfield('run', link, '--graphs', sampleGr, '--quiet', '--json');
    expect(supplied.code, supplied.stderr).toBe(0);
    const doc = JSON.parse(supplied.stdout) as { runs: Array<{ ladder: Array<{ family: string; size: number }> }> };
    expect(doc.runs[0]!.ladder.at(-1)).toMatchObject({ family: 'file:sample.gr', size: 6 });
  });
});
