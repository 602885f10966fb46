/**
 * test.files in the spec: optional (a spec without it keeps its hash and
 * link), refused with the field named where the task cannot read files or a
 * file cannot be read as stated, and carried by a share link as names and
 * hashes only.
 */
import { describe, expect, it } from 'vitest';
import { validateSpec } from '../../src/experiment/check.ts';
import { SpecError } from '../../src/experiment/spec.ts';
import { specHash } from '../../src/experiment/results.ts';
import { decodeSpecLink, encodeSpecLink } from '../../src/share/link.ts';
import { tinySpec } from '../helpers.ts';

const SHA = 'a'.repeat(64);

function problems(test: Record<string, unknown>, task?: string): string[] {
  const base = tinySpec();
  try {
    validateSpec({ ...base, ...(task ? { task, train: { ...base.train, family: 'dag' } } : {}), test: { ...base.test, ...test } });
  } catch (error) {
    if (error instanceof SpecError) return error.problems as string[];
    throw error;
  }
  return [];
}

describe('test.files', () => {
  it('is optional: a spec without it hashes as before, and one with it differs', () => {
    const plain = tinySpec();
    expect(plain.test.files).toBeUndefined();
    expect(JSON.stringify(plain)).not.toContain('files');
    const withFile = validateSpec({ ...plain, test: { ...plain.test, files: [{ name: 'roads.gr', sha256: SHA }] } });
    expect(specHash(withFile)).not.toBe(specHash(plain));
  });

  it('refuses what cannot work, naming the field', () => {
    expect(problems({ files: [{ name: 'a.csv' }] }, 'earliest-finish')).toEqual([
      "test.files: task 'earliest-finish' cannot be scored on graph files; tasks that can: shortest-path, widest-path, hop-count",
    ]);
    expect(problems({ files: [{ name: 'a.xlsx' }] })[0]).toMatch(/^test\.files\[0\]\.format: missing, and a\.xlsx: cannot tell the format from the extension '\.xlsx'/);
    expect(problems({ files: [{ name: 'a.gr', directed: false }] })).toEqual(['test.files[0].directed: only edge lists take it; a dimacs file states its own direction']);
    expect(problems({ files: [{ name: 'x/a.csv' }, { name: 'y/a.csv' }] })).toEqual([
      'test.files[1].name: "y/a.csv" has the same base name as another file; their rungs would share a label',
    ]);
    expect(problems({ files: [{ name: 'a.csv', sha256: 'XYZ' }] })[0]).toMatch(/^test\.files\[0\]\.sha256: /);
    expect(problems({ files: [{ name: 'a.csv', content: 'source,target' }] })).toEqual(['test.files[0]: unknown field "content"']);
    expect(problems({ files: Array.from({ length: 9 }, (_, i) => ({ name: `g${i}.csv` })) })[0]).toMatch(/^test\.files: got .*, allowed at most 8 items$/);
  });

  it('a share link carries each file as name and hash, never content', async () => {
    const spec = validateSpec({ ...tinySpec(), test: { ...tinySpec().test, files: [{ name: 'roads.gr', source: '1', sha256: SHA }] } });
    const { spec: back } = await decodeSpecLink(await encodeSpecLink(spec));
    expect(back.test.files).toEqual([{ name: 'roads.gr', source: '1', sha256: SHA }]);
    expect(specHash(back)).toBe(specHash(spec));
  });
});
