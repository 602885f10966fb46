/**
 * A journal written by another engine version is refused on resume: the same
 * spec gives different numbers on a different engine, so mixing them would
 * give a fingerprint neither engine computes.
 */
import { describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Journal, readJournal } from '../../src/cli/journal.ts';
import { ENGINE_VERSION } from '../../src/experiment/results.ts';
import { keptRunsKey } from '../../src/ui/run-store.ts';

describe('runs are kept per engine version', () => {
  it('a journal records its engine and refuses another engine’s', () => {
    const dir = mkdtempSync(join(tmpdir(), 'ff-journal-'));
    const own = join(dir, 'own.journal');
    new Journal(own, 'abc', false).close();
    expect(readJournal(own, 'abc')).toEqual([]);
    const old = join(dir, 'old.journal');
    writeFileSync(old, JSON.stringify({ kind: 'farfield-journal', specHash: 'abc' }) + '\n');
    expect(() => readJournal(old, 'abc')).toThrow(/written by engine 0\.1\.0.*remove it or pass a different --out/);
  });

  it('the sheet keeps runs under the engine version and the spec hash', () => {
    expect(keptRunsKey('abc')).toBe(`${ENGINE_VERSION}:abc`);
    expect(ENGINE_VERSION).not.toBe('0.1.0');
  });

  it('the engine version is the package version', () => {
    const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version: string };
    expect(pkg.version).toBe(ENGINE_VERSION);
  });
});
