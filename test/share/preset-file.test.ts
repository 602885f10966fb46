/** Preset files: parsePresetText refusals (origin, line:column, field) and readPreset on disk and links. */
import { mkdtempSync, rmSync, writeFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { validateSpec } from '../../src/experiment/check.ts';
import { LIMITS } from '../../src/experiment/limits.ts';
import type { SpecInput } from '../../src/experiment/spec.ts';
import { encodeSpecLink, LinkError } from '../../src/share/link.ts';
import { PresetError, parsePresetText, utf8Length, type PresetStage } from '../../src/share/preset-file.ts';
import { looksLikeLink, readPreset } from '../../src/share/read-preset.ts';

const input: SpecInput = {
  farfield: 1,
  question: 'Does max aggregation extrapolate better than sum on shortest paths?',
  task: 'shortest-path',
  train: { family: 'er', sizes: [8, 16] },
  test: { sizes: [16, 32, 64] },
  arms: [
    { name: 'max', model: { aggregator: 'max' } },
    { name: 'sum', model: { aggregator: 'sum' } },
  ],
};
const text = JSON.stringify(input, null, 2);
const spec = validateSpec(input);
const origin = 'presets/x.json';

function refusal(body: string, name = origin): PresetError {
  try {
    parsePresetText(body, name);
  } catch (err) {
    expect(err).toBeInstanceOf(PresetError);
    return err as PresetError;
  }
  throw new Error(`accepted: ${body.slice(0, 60)}`);
}

function expectStage(body: string, stage: PresetStage, message: string | RegExp): PresetError {
  const err = refusal(body);
  expect(err.stage).toBe(stage);
  expect(err.origin).toBe(origin);
  if (typeof message === 'string') expect(err.message).toBe(message);
  else expect(err.message).toMatch(message);
  return err;
}

describe('parsePresetText', () => {
  it('reads a spec and normalises it; a byte-order mark is allowed', () => {
    expect(parsePresetText(text, origin)).toEqual(spec);
    expect(parsePresetText(`\uFEFF${text}`, origin)).toEqual(spec);
    expect(parsePresetText(text.replace(/\n/g, '\r\n'), origin)).toEqual(spec);
  });

  it('keeps markup as plain text', () => {
    expect(parsePresetText(JSON.stringify({ ...input, question: '<script>alert(1)</script>' }), origin).question).toBe('<script>alert(1)</script>');
  });

  it(`size: at most ${LIMITS.fileBytes.max} bytes of UTF-8`, () => {
    const padded = text + ' '.repeat(LIMITS.fileBytes.max - text.length);
    expect(parsePresetText(padded, origin)).toEqual(spec);
    expectStage(`${padded} `, 'size', `presets/x.json: the file is too large: at least ${LIMITS.fileBytes.max + 1} bytes, allowed at most ${LIMITS.fileBytes.max} bytes`);
    // 'é' is one UTF-16 unit but two UTF-8 bytes.
    const wide = JSON.stringify({ ...input, expectation: 'é'.repeat(2000) }) + ' '.repeat(LIMITS.fileBytes.max - 3000);
    expect(wide.length).toBeLessThanOrEqual(LIMITS.fileBytes.max);
    expectStage(wide, 'size', /^presets\/x\.json: the file is too large: \d+ bytes, allowed at most 262144 bytes$/);
    expect(utf8Length('aé☃😀\uD800')).toBe(1 + 2 + 3 + 4 + 3);
    expect(utf8Length('aé☃😀\uD800')).toBe(new TextEncoder().encode('aé☃😀\uD800').length);
  });

  it('json: origin:line:column and what was expected', () => {
    const broken = text.replace('"task": "shortest-path",', '"task": "shortest-path"');
    const err = expectStage(broken, 'json', `presets/x.json:5:3: expected ',' or '}' after the value of "task", found '"'`);
    expect([err.line, err.column]).toEqual([5, 3]);
    expectStage('', 'json', 'presets/x.json:1:1: the text is empty: expected a JSON object');
    expectStage(`\uFEFF{`, 'json', `presets/x.json:1:3: expected a field name in double quotes, found the end of the text`);
    expectStage('{"question": "a",\n "question": "b"}', 'json', 'presets/x.json:2:2: the field "question" appears twice in one object');
    expectStage('{"train": {"__proto__": {}}}', 'json', 'presets/x.json:1:12: the field name "__proto__" is not allowed');
    expectStage("{ farfield: 1 }", 'json', "presets/x.json:1:3: expected a field name in double quotes, found 'f'");
    expectStage('{"a": 1} // comment', 'json', "presets/x.json:1:10: unexpected '/' after the end of the JSON value");
  });

  it('nesting: 10,000 levels refused with a position, no RangeError', () => {
    expectStage('{"a":'.repeat(10_000) + '1' + '}'.repeat(10_000), 'nesting', 'presets/x.json:1:161: arrays/objects are nested more than 32 levels deep, allowed at most 32');
  });

  it('spec: names the file and the field', () => {
    const err = expectStage(JSON.stringify({ ...input, train: { family: 'er', sizes: [8, 1000] } }), 'spec', 'presets/x.json: train.sizes[1]: got 1000, allowed at most 128');
    expect(err.field).toBe('train.sizes[1]');
    expect(err.problems).toEqual(['train.sizes[1]: got 1000, allowed at most 128']);
    const unknown = expectStage(JSON.stringify({ ...input, colour: 'red' }), 'spec', 'presets/x.json: unknown field "colour"');
    expect(unknown.field).toBeUndefined();
    expect(expectStage(JSON.stringify({ ...input, test: { sizes: [16, 16] } }), 'spec', 'presets/x.json: test.sizes: sizes must not repeat (got [16,16])').field).toBe('test.sizes');
    expectStage(JSON.stringify({ ...input, task: 'constructor' }), 'spec', /^presets\/x\.json: (task: |the spec checker failed)/);
  });
});

describe('readPreset', () => {
  const dir = mkdtempSync(join(tmpdir(), 'farfield-share-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('reads a file', async () => {
    const file = join(dir, 'ok.json');
    writeFileSync(file, text);
    expect(await readPreset(file)).toEqual({ spec, source: 'file' });
  });

  it('reads a link, a fragment or a bare fragment', async () => {
    const link = await encodeSpecLink(spec, { fingerprint: 'feedc0ffee00' });
    for (const arg of [link, link.slice(link.indexOf('#')), link.slice(link.indexOf('#') + 1)]) {
      expect(await readPreset(arg)).toEqual({ spec, fingerprint: 'feedc0ffee00', source: 'link' });
    }
    await expect(readPreset('#ff9.abcdefabcdefabcdef')).rejects.toBeInstanceOf(LinkError);
  });

  it('names a missing file plainly', async () => {
    await expect(readPreset('presets/does-not-exist.json')).rejects.toMatchObject({ name: 'PresetError', stage: 'read', message: 'presets/does-not-exist.json: no such file' });
    await expect(readPreset(join(dir, 'ok.json', 'inner.json'))).rejects.toMatchObject({ message: `${join(dir, 'ok.json', 'inner.json')}: no such file` });
    await expect(readPreset('ff1.json')).rejects.toMatchObject({ message: 'ff1.json: no such file' });
  });

  it('refuses a directory, an oversized file (from its size, before reading) and non-UTF-8', async () => {
    const sub = join(dir, 'folder.json');
    mkdirSync(sub);
    await expect(readPreset(sub)).rejects.toMatchObject({ stage: 'read', message: `${sub}: is a directory, not a preset file` });
    const big = join(dir, 'big.json');
    writeFileSync(big, Buffer.alloc(LIMITS.fileBytes.max + 10, 0x20));
    await expect(readPreset(big)).rejects.toMatchObject({ stage: 'size', message: `${big}: the file is too large: ${LIMITS.fileBytes.max + 10} bytes, allowed at most ${LIMITS.fileBytes.max} bytes` });
    const binary = join(dir, 'binary.json');
    writeFileSync(binary, Buffer.from([0x7b, 0xff, 0xfe, 0x7d]));
    await expect(readPreset(binary)).rejects.toMatchObject({ stage: 'text', message: `${binary}: not UTF-8 text (is it a preset JSON file?)` });
    const bad = join(dir, 'bad.json');
    writeFileSync(bad, '{\n  "farfield": 1,\n  oops\n}');
    await expect(readPreset(bad)).rejects.toMatchObject({ stage: 'json', line: 3, column: 3, message: `${bad}:3:3: expected a field name in double quotes, found 'o'` });
  });

  it('tells links from file names', () => {
    for (const arg of ['http://127.0.0.1:4173/#ff1.abc', 'https://x.org/a', '#ff1.abc', '#ff9.x', 'ff1.7VVNa9xADP0rQudJWCf', 'ff2.7VVNa9xADP0rQudJWCf&fp=0123456789ab', 'presets/a.json#ff1.abc']) {
      expect(looksLikeLink(arg), arg).toBe(true);
    }
    for (const arg of ['presets/x.json', 'ff1.json', './ff1.abc', 'C:\\presets\\x.json', 'x', 'ff1.some-file-name.json']) {
      expect(looksLikeLink(arg), arg).toBe(false);
    }
  });
});
