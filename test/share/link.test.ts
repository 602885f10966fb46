/** Share links: round trip, determinism, length, and one clear refusal per stage. */
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { validateSpec } from '../../src/experiment/check.ts';
import { LIMITS } from '../../src/experiment/limits.ts';
import { armModel, type ExperimentSpec, type SpecInput } from '../../src/experiment/spec.ts';
import { encodeBase64Url } from '../../src/share/base64url.ts';
import { deflateRaw, inflateRawBounded } from '../../src/share/compress.ts';
import { DEFAULT_LINK_BASE, LinkError, decodeSpecLink, encodeSpecLink, type LinkStage } from '../../src/share/link.ts';

const minimal: SpecInput = {
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

const rich: SpecInput = {
  farfield: 1,
  question: 'Grids: does a min-plus message with log1p edges hold up at 16× the training size? — ☃ 最短路径 😀 שלום',
  expectation: 'Min-plus mirrors Bellman-Ford. Held equal: graphs, ladder, hidden size, budget, step rule.\nSecond line with "quotes" and \\ backslash.',
  task: 'shortest-path',
  train: { family: 'grid', sizes: [9, 25], graphs: 512, weightRange: [0.5, 20], familyParams: { jitter: 0.25, constructor: 1 } },
  test: { family: 'path', sizes: [16, 64, 256, 512], weightScales: [0.1, 1, 10], graphsPerRung: 8, validationGraphs: 16 },
  budget: { steps: 800, batchGraphs: 32, learningRate: 0.001, clipNorm: 5, loss: 'mse', validateEvery: 0 },
  seeds: { count: 8, base: 2 ** 31 - 1 },
  metric: 'mre',
  model: { hidden: 64, bias: false, activation: 'leaky-relu', nodeTransform: ['log1p'], steps: { rule: 'proportional', factor: 1.5, cap: 1024, trainJitter: 0 } },
  arms: [
    { name: 'mlp + sum', note: 'baseline', model: {} },
    { name: 'min-plus (T=0.1)', model: { message: 'smooth-min-plus', messageTemperature: 0.1, aggregator: 'min', edgeTransform: 'log1p' } },
    { name: 'gated × max', model: { update: 'gated', aggregator: 'smooth-max', aggregatorTemperature: 1e-4, steps: { rule: 'until-stable', tolerance: 1e-8 } } },
    { name: 'mean, fixed 12', model: { aggregator: 'mean', steps: { rule: 'fixed', count: 12 } } },
  ],
};

const scripted: SpecInput = { ...minimal, question: '<script>alert(1)</script>', arms: [{ name: 'a', note: '<img src=x onerror=alert(1)>', model: {} }, { name: 'b', model: {} }] };

const specs: Record<string, ExperimentSpec> = {
  minimal: validateSpec(minimal),
  rich: validateSpec(rich),
  scripted: validateSpec(scripted),
  dag: validateSpec({ ...minimal, task: 'earliest-finish', train: { family: 'dag', sizes: [3, 3] }, test: { sizes: [3, 512] }, seeds: { count: 64 }, arms: Array.from({ length: 8 }, (_, i) => ({ name: `arm ${i}`, model: { hidden: i + 1 } })) }),
};

/** A fragment carrying arbitrary text, compressed the way a real link is (bypassing spec validation). */
async function rawFragment(text: string | Uint8Array): Promise<string> {
  return `ff1.${encodeBase64Url(await deflateRaw(typeof text === 'string' ? new TextEncoder().encode(text) : text))}`;
}

async function refusal(input: string): Promise<LinkError> {
  try {
    await decodeSpecLink(input);
  } catch (err) {
    expect(err).toBeInstanceOf(LinkError);
    return err as LinkError;
  }
  throw new Error(`accepted: ${input.slice(0, 60)}`);
}

async function expectStage(input: string, stage: LinkStage, message: RegExp | string): Promise<LinkError> {
  const err = await refusal(input);
  expect(err.stage).toBe(stage);
  if (typeof message === 'string') expect(err.message).toBe(message);
  else expect(err.message).toMatch(message);
  expect(err.message).not.toMatch(/\n\s+at /);
  return err;
}

describe('share link round trip', () => {
  for (const [name, spec] of Object.entries(specs)) {
    it(`decode(encode(spec)) deep-equals the spec: ${name}`, async () => {
      const link = await encodeSpecLink(spec);
      expect(link.startsWith(`${DEFAULT_LINK_BASE}#ff1.`)).toBe(true);
      const decoded = await decodeSpecLink(link);
      expect(decoded).toEqual({ spec });
      expect(Object.is(decoded.spec, spec)).toBe(false);
    });
  }

  it('round-trips every preset in presets/', async () => {
    const dir = new URL('../../presets/', import.meta.url);
    const files = existsSync(dir) ? readdirSync(dir).filter((f) => f.endsWith('.json')) : [];
    for (const file of files) {
      const spec = validateSpec(JSON.parse(readFileSync(new URL(file, dir), 'utf8')));
      expect((await decodeSpecLink(await encodeSpecLink(spec))).spec).toEqual(spec);
    }
  });

  it('an arm without model overrides keeps the shared model in force through a link', async () => {
    const spec = validateSpec({ ...minimal, model: { hidden: 8, aggregator: 'max' }, arms: [{ name: 'shared' }, { name: 'sum', model: { aggregator: 'sum' } }] });
    expect(spec.arms[0]!.model).toEqual({});
    const { spec: back } = await decodeSpecLink(await encodeSpecLink(spec));
    expect(back).toEqual(spec);
    expect(armModel(back, 0)).toEqual(armModel(spec, 0));
    expect(armModel(back, 0).hidden).toBe(8);
  });

  it('carries the results fingerprint and accepts URL, #fragment and bare fragment', async () => {
    const link = await encodeSpecLink(specs.minimal!, { fingerprint: '0123456789ab' });
    expect(link).toMatch(/&fp=0123456789ab$/);
    const fragment = link.slice(link.indexOf('#'));
    for (const input of [link, fragment, fragment.slice(1), `  ${link}\n`]) {
      expect(await decodeSpecLink(input)).toEqual({ spec: specs.minimal, fingerprint: '0123456789ab' });
    }
  });

  it("base '' gives the fragment alone; a base's own fragment is replaced", async () => {
    const bare = await encodeSpecLink(specs.minimal!, { base: '' });
    expect(bare).toMatch(/^#ff1\.[A-Za-z0-9_-]+$/);
    const other = await encodeSpecLink(specs.minimal!, { base: 'https://example.org/farfield/#old-state' });
    expect(other).toBe(`https://example.org/farfield/${bare}`);
  });

  it('is deterministic: same spec, same link, whatever the key order or the shorthand used', async () => {
    const first = await encodeSpecLink(specs.rich!);
    expect(await encodeSpecLink(specs.rich!)).toBe(first);
    expect(await encodeSpecLink(validateSpec(JSON.parse(JSON.stringify(rich))))).toBe(first);
    const reversed = JSON.parse(JSON.stringify(specs.rich!), (_k, v: unknown) =>
      v && typeof v === 'object' && !Array.isArray(v) ? Object.fromEntries(Object.entries(v).reverse()) : v,
    ) as ExperimentSpec;
    expect(Object.keys(reversed)[0]).toBe('arms');
    expect(await encodeSpecLink(reversed)).toBe(first);
    // Shorthand and normalised forms of one experiment share one link.
    expect(await encodeSpecLink(minimal as ExperimentSpec)).toBe(await encodeSpecLink(specs.minimal!));
  });

  it('keeps a typical spec link short (length reported)', async () => {
    const lengths: Record<string, number> = {};
    for (const [name, spec] of Object.entries(specs)) lengths[name] = (await encodeSpecLink(spec, { fingerprint: 'abcdef012345' })).length;
    console.info(`share link lengths (full URL incl. base ${DEFAULT_LINK_BASE} and &fp=): ${JSON.stringify(lengths)}`);
    expect(lengths.minimal).toBeLessThan(1200);
    expect(lengths.rich).toBeLessThan(2000);
  });

  it('treats markup in text fields as plain text (escaping on display is the UI’s job)', async () => {
    const { spec } = await decodeSpecLink(await encodeSpecLink(specs.scripted!));
    expect(spec.question).toBe('<script>alert(1)</script>');
    expect(spec.arms[0]!.note).toBe('<img src=x onerror=alert(1)>');
  });

  it('never evaluates the payload: a JSON string that looks like code stays a string', async () => {
    const probe = vi.fn();
    (globalThis as Record<string, unknown>).__farfieldProbe = probe;
    try {
      const question = `"); globalThis.__farfieldProbe(); ("`;
      const { spec } = await decodeSpecLink(await encodeSpecLink(validateSpec({ ...minimal, question })));
      expect(spec.question).toBe(question);
      // A payload that is JavaScript but not JSON is refused as JSON, not run.
      await expectStage(await rawFragment('(globalThis.__farfieldProbe(), {})'), 'json', /^the link's spec is not valid JSON: at 1:1, expected a value, found '\('$/);
      expect(probe).not.toHaveBeenCalled();
    } finally {
      delete (globalThis as Record<string, unknown>).__farfieldProbe;
    }
  });
});

describe('share link refusals: one clear message per stage', () => {
  afterEach(() => {
    vi.unstubAllGlobals();
  });

  it('format: not a link, no fragment, unknown or repeated parameter', async () => {
    await expectStage('', 'format', "the link is empty after '#': a share link looks like '#ff1.<data>'");
    await expectStage('http://127.0.0.1:4173/#', 'format', /empty after '#'/);
    await expectStage('http://127.0.0.1:4173/', 'format', "the address has no '#ff1.' part: a share link carries the spec after '#'; the link was probably cut short");
    await expectStage('hello world', 'format', `this is not a Farfield share link: it should start with 'ff1.' after '#', got "hello world"`);
    const good = (await encodeSpecLink(specs.minimal!, { base: '' })).slice(1);
    await expectStage(`${good}&zz=1`, 'format', `unknown link parameter "zz"; ff1 links have only 'fp' (the results fingerprint)`);
    await expectStage(`${good}&fp=0123456789ab&fp=0123456789ab`, 'format', "the link gives 'fp' twice; give it at most once");
  });

  it(`length: more than ${LIMITS.linkChars.max} characters after '#'`, async () => {
    await expectStage(`ff1.${'A'.repeat(LIMITS.linkChars.max)}`, 'length', `the link is too long: ${LIMITS.linkChars.max + 4} characters after '#', allowed at most ${LIMITS.linkChars.max}`);
    const start = performance.now();
    await expectStage(`http://x/#ff1.${'A'.repeat(5_000_000)}`, 'length', /^the link is too long: 5000014 characters, allowed at most 16384 after '#'$/);
    expect(performance.now() - start).toBeLessThan(50);
  });

  it('version: another version tag is named', async () => {
    await expectStage('#ff9.abc', 'version', "link version 'ff9' is not supported; this build reads ff1");
    await expectStage('http://h/#ff2.abc&fp=0123456789ab', 'version', "link version 'ff2' is not supported; this build reads ff1");
    await expectStage('#x1.abc', 'version', "link version 'x1' is not supported; this build reads ff1");
  });

  it('base64: foreign characters, impossible length, no data', async () => {
    await expectStage('ff1.abc$def', 'base64', "the link is damaged: character '$' at position 4 is not base64url (allowed: A-Z a-z 0-9 - _)");
    await expectStage('ff1.ab+/', 'base64', /character '\+' at position 3/);
    await expectStage('ff1.ab%20', 'base64', /character '%' at position 3/);
    await expectStage('ff1.abcde', 'base64', 'the link is damaged: 5 characters cannot be base64url (a length of 4k+1 is impossible); the link was probably cut short');
    await expectStage('ff1.', 'base64', "the link has no data after 'ff1.'; it was probably cut short");
  });

  it('decompress: garbage and truncated data', async () => {
    const message = 'the link is damaged: it does not decompress (was it cut short or edited?)';
    await expectStage('ff1.AAAA', 'decompress', message);
    await expectStage('ff1.____', 'decompress', message);
    const good = await encodeSpecLink(specs.rich!);
    await expectStage(good.slice(0, good.length - 40), 'decompress', message);
  });

  it(`size: more than ${LIMITS.decompressedBytes.max} bytes after inflation, stopped while inflating`, async () => {
    const padded = `${' '.repeat(LIMITS.decompressedBytes.max)}${JSON.stringify(specs.minimal)}`;
    await expectStage(await rawFragment(padded), 'size', `the link's spec is too large: it inflates to more than 65536 bytes, allowed at most 65536`);
  });

  it('size: a 10 MB zip bomb is inflated only until the cap is passed', async () => {
    const bombBytes = await deflateRaw(new Uint8Array(10_000_000));
    const bomb = `ff1.${encodeBase64Url(bombBytes)}`;
    expect(bomb.length).toBeLessThan(LIMITS.linkChars.max); // the bomb fits in a link: only the inflation cap stops it
    const Real = globalThis.DecompressionStream;
    let fed = 0;
    let produced = 0;
    class CountingDecompressionStream {
      readonly readable: ReadableStream<Uint8Array>;
      readonly writable: WritableStream<Uint8Array>;
      constructor(format: CompressionFormat) {
        const real = new Real(format);
        const writer = real.writable.getWriter();
        this.writable = new WritableStream<Uint8Array>({
          write: (chunk) => {
            fed += chunk.byteLength;
            return writer.write(chunk as Uint8Array<ArrayBuffer>);
          },
          close: () => writer.close(),
          abort: (reason) => writer.abort(reason),
        });
        this.readable = (real.readable as ReadableStream<Uint8Array>).pipeThrough(
          new TransformStream<Uint8Array, Uint8Array>({
            transform: (chunk, controller) => {
              produced += chunk.byteLength;
              controller.enqueue(chunk);
            },
          }),
        );
      }
    }
    vi.stubGlobal('DecompressionStream', CountingDecompressionStream);
    const start = performance.now();
    await expectStage(bomb, 'size', /inflates to more than 65536 bytes/);
    const ms = performance.now() - start;
    console.info(`zip bomb: ${bombBytes.length} compressed bytes (${bomb.length} link chars) for 10 MB; fed ${fed} bytes, inflated ${produced} bytes before stopping, ${ms.toFixed(1)} ms`);
    // Inflated output is bounded by the cap plus a few chunks, not 10 MB. (Node's zlib stops
    // inflating while its output is unread; the compressed input itself may all be queued.)
    expect(fed).toBeLessThanOrEqual(bombBytes.length);
    expect(produced).toBeLessThan(LIMITS.decompressedBytes.max + 256 * 1024);
    expect(ms).toBeLessThan(200);
  });

  it('inflateRawBounded: exact cap passes, one byte over is refused', async () => {
    const data = new Uint8Array(1000).fill(7);
    const compressed = await deflateRaw(data);
    expect(await inflateRawBounded(compressed, 1000)).toEqual({ ok: true, bytes: data });
    expect(await inflateRawBounded(compressed, 999)).toMatchObject({ ok: false, reason: 'too-large' });
    expect(await inflateRawBounded(new Uint8Array([1, 2, 3]), 1000)).toEqual({ ok: false, reason: 'damaged' });
    expect(await inflateRawBounded(new Uint8Array(0), 1000)).toEqual({ ok: false, reason: 'damaged' });
  });

  it('text: inflated bytes that are not UTF-8', async () => {
    await expectStage(await rawFragment(new Uint8Array([0x7b, 0xff, 0xfe, 0x7d])), 'text', 'the link is damaged: its data is not UTF-8 text');
  });

  it('json: not JSON, with line:column; repeated and "__proto__" field names', async () => {
    await expectStage(await rawFragment('{"farfield": 1,'), 'json', `the link's spec is not valid JSON: at 1:16, expected a field name in double quotes, found the end of the text`);
    await expectStage(await rawFragment(''), 'json', /the text is empty/);
    await expectStage(await rawFragment('{"question": "a", "question": "b"}'), 'json', /at 1:19, the field "question" appears twice in one object/);
    await expectStage(await rawFragment('{"__proto__": {"farfield": 1}}'), 'json', /the field name "__proto__" is not allowed/);
    await expectStage(await rawFragment('{"farfield": 1e400}'), 'json', /the number 1e400 is too large/);
  });

  it('nesting: 10,000 levels are refused cleanly (no RangeError)', async () => {
    await expectStage(await rawFragment('['.repeat(10_000) + ']'.repeat(10_000)), 'nesting', `the link's spec is not valid JSON: at 1:33, arrays/objects are nested more than 32 levels deep, allowed at most 32`);
    const nestedInSpec = JSON.stringify({ ...specs.minimal, train: { ...specs.minimal!.train, familyParams: { p: 'X' } } }).replace('"X"', '['.repeat(40) + ']'.repeat(40));
    await expectStage(await rawFragment(nestedInSpec), 'nesting', /nested more than 32 levels deep/);
  });

  it("spec: the checker's message, prefixed, with the field", async () => {
    const err = await expectStage(await rawFragment(JSON.stringify({ ...specs.minimal, arms: [] })), 'spec', "the link's spec: arms: got 0 arm(s), allowed at least 2 (give arms, or a sweep)");
    expect(err.field).toBe('arms');
    expect(err.problems).toEqual(['arms: got 0 arm(s), allowed at least 2 (give arms, or a sweep)']);
    const many = await expectStage(await rawFragment(JSON.stringify({ farfield: 2, question: 7 })), 'spec', /^the link's spec: \d+ problems:\n {2}- farfield: /);
    expect(many.field).toBe('farfield');
    await expectStage(await rawFragment('[]'), 'spec', /^the link's spec: \(top level\): got \[\], expected object$/);
    await expectStage(await rawFragment(JSON.stringify({ ...specs.minimal, task: 'sorting' })), 'spec', /^the link's spec: task: got "sorting", allowed "shortest-path" \| /);
    await expectStage(await rawFragment(JSON.stringify({ ...specs.minimal, constructor: 1 })), 'spec', `the link's spec: unknown field "constructor"`);
  });

  it('spec: a task named after an Object.prototype member is refused, never a TypeError', async () => {
    // check.ts looks tasks up with tasks[spec.task]; 'constructor' finds Object and the check throws
    // a TypeError. The codec's gate turns that into a SpecError; once check.ts uses an own-key
    // lookup the message names the task field instead. Either way: a LinkError, stage 'spec'.
    for (const task of ['constructor', 'toString', 'hasOwnProperty']) {
      const err = await expectStage(await rawFragment(JSON.stringify({ ...specs.minimal, task })), 'spec', /^the link's spec: (task: |the spec checker failed)/);
      expect(err.cause).toBeDefined();
    }
  });

  it('fingerprint: exactly 12 lowercase hex characters', async () => {
    const good = (await encodeSpecLink(specs.minimal!, { base: '' })).slice(1);
    for (const fp of ['ABCDEF012345', '0123456789a', '0123456789abc', '', 'zzzzzzzzzzzz', '<script>1234']) {
      await expectStage(`${good}&fp=${fp}`, 'fingerprint', `the link's fingerprint ${JSON.stringify(fp)} is not valid: expected exactly 12 lowercase hex characters (0-9 a-f)`);
    }
    await expectStage(`${good}&fp`, 'fingerprint', /fingerprint "" is not valid/);
  });

  it('encode refuses what it could not decode: invalid spec, bad fingerprint, too large', async () => {
    await expect(encodeSpecLink({ ...specs.minimal!, arms: [] })).rejects.toMatchObject({ name: 'LinkError', stage: 'spec', field: 'arms', message: 'cannot share this spec: arms: got 0 arm(s), allowed at least 2 (give arms, or a sweep)' });
    await expect(encodeSpecLink(specs.minimal!, { fingerprint: 'XYZ' })).rejects.toMatchObject({ stage: 'fingerprint' });
    // 32 arms with long incompressible notes: valid as a spec, too big for a link.
    let state = 12345;
    const noise = (n: number) =>
      Array.from({ length: n }, () => {
        state = (state * 1103515245 + 12345) % 2 ** 31;
        return String.fromCharCode(0x4e00 + (state % 2000));
      }).join('');
    const big = validateSpec({ ...minimal, expectation: noise(2000), seeds: { count: 1 }, arms: Array.from({ length: 32 }, (_, i) => ({ name: `arm ${i}`, note: noise(400), model: {} })) });
    const err = await encodeSpecLink(big).then(
      () => null,
      (e: unknown) => e,
    );
    expect(err).toBeInstanceOf(LinkError);
    expect((err as LinkError).stage).toMatch(/^(size|length)$/);
    expect((err as LinkError).message).toMatch(/^this spec is too large for a share link: \d+ (bytes of JSON|characters after '#'), allowed at most \d+; share it as a preset file instead$/);
  });
});
