/** The strict JSON reader: positions, the extra refusals, and agreement with JSON.parse (differential fuzz). */
import { describe, expect, it } from 'vitest';
import { Rng } from '../../src/util/rng.ts';
import { JsonTextError, MAX_JSON_DEPTH, lineColumn, readJsonText } from '../../src/share/json-text.ts';

function failure(text: string, maxDepth?: number): JsonTextError {
  try {
    readJsonText(text, maxDepth === undefined ? {} : { maxDepth });
  } catch (err) {
    expect(err).toBeInstanceOf(JsonTextError);
    return err as JsonTextError;
  }
  throw new Error(`accepted: ${text.slice(0, 80)}`);
}

describe('readJsonText', () => {
  it('reads what JSON.parse reads, including escapes and unicode', () => {
    const text = '{ "a": [1, -0.5e-3, true, false, null], "b\\u0041": "x\\n\\"y\\"\\u00e9 ☃ 😀", "c": {} }';
    expect(readJsonText(text)).toEqual(JSON.parse(text));
  });

  it('reports line and column of a syntax error', () => {
    const err = failure('{\n  "a": 1,\n  "b": tru\n}');
    expect([err.line, err.column, err.kind]).toEqual([3, 8, 'syntax']);
    expect(err.message).toBe('3:8: expected a value (did you mean true?), found "tru"');
    expect(failure('{"a":1,}').message).toBe("1:8: expected a field name in double quotes, found '}'");
    expect(failure('[1 2]').message).toBe("1:4: expected ',' or ']' after an array item, found '2'");
    expect(failure('{"a" 1}').message).toBe(`1:6: expected ':' after the field name "a", found '1'`);
    expect(failure('{"a":1').message).toBe(`1:7: expected ',' or '}' after the value of "a", found the end of the text`);
    expect(failure('"abc').message).toBe(`1:1: unterminated string (no closing '"')`);
    expect(failure('"a\tb"').message).toBe('1:3: control character U+0009 inside a string; write it escaped (e.g. \\n)');
    expect(failure('"\\x"').message).toBe("1:2: bad escape sequence in a string: 'x' after '\\'");
    expect(failure('01').message).toBe("1:2: unexpected '1' after the end of the JSON value");
    expect(failure('-').message).toBe('1:2: expected a digit in a number, found the end of the text');
    expect(failure('1.').message).toBe('1:3: expected a digit after the decimal point, found the end of the text');
    expect(failure('   ').message).toBe('1:4: the text is empty: expected a JSON object');
    expect(failure('NaN').message).toBe("1:1: expected a value, found 'N'");
    expect(failure("{'a':1}").message).toBe("1:2: expected a field name in double quotes, found '''");
  });

  it('refuses numbers beyond a 64-bit float instead of turning them into Infinity', () => {
    expect(readJsonText('[1e308, -1e308, 5e-324, 1e-400]')).toEqual([1e308, -1e308, 5e-324, 0]);
    expect(failure('{"x": -1e309}').message).toBe('1:7: the number -1e309 is too large (beyond ±1.8e308)');
  });

  it('refuses a repeated field name and "__proto__" (JSON.parse would accept both)', () => {
    const dup = failure('{"a": 1, "b": {"x": 1}, "\\u0061": 2}');
    expect(dup.kind).toBe('field-name');
    expect(dup.message).toBe('1:25: the field "a" appears twice in one object');
    const proto = failure('{"a": {"__proto__": {"polluted": true}}}');
    expect(proto.kind).toBe('field-name');
    expect(proto.message).toBe('1:8: the field name "__proto__" is not allowed');
    expect(readJsonText('{"constructor": 1, "prototype": 2}')).toEqual({ constructor: 1, prototype: 2 });
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  });

  it(`caps nesting at ${MAX_JSON_DEPTH} while scanning: 10,000 levels fail fast, no RangeError`, () => {
    const ok = '['.repeat(MAX_JSON_DEPTH) + ']'.repeat(MAX_JSON_DEPTH);
    expect(() => readJsonText(ok)).not.toThrow();
    const over = failure('['.repeat(MAX_JSON_DEPTH + 1) + ']'.repeat(MAX_JSON_DEPTH + 1));
    expect(over.kind).toBe('nesting');
    expect(over.column).toBe(MAX_JSON_DEPTH + 1);
    for (const deep of ['['.repeat(10_000) + ']'.repeat(10_000), '{"a":'.repeat(10_000) + '1' + '}'.repeat(10_000), '['.repeat(1_000_000)]) {
      const start = performance.now();
      const err = failure(deep);
      expect(err.kind).toBe('nesting');
      expect(err.message).toBe(`1:${err.column}: arrays/objects are nested more than 32 levels deep, allowed at most 32`);
      expect(performance.now() - start).toBeLessThan(50);
    }
  });

  it('counts lines from 1 and columns from 1', () => {
    expect(lineColumn('ab\ncd', 0)).toEqual({ line: 1, column: 1 });
    expect(lineColumn('ab\ncd', 4)).toEqual({ line: 2, column: 2 });
    expect(lineColumn('ab\r\ncd', 4)).toEqual({ line: 2, column: 1 });
  });
});

// Differential fuzz: on random JSON and its mutations the reader must agree with JSON.parse,
// except for its documented extra refusals (nesting, repeated/"__proto__" names, huge numbers).
function randomValue(rng: Rng, depth: number): unknown {
  const pick = rng.int(0, depth > 4 ? 3 : 6);
  switch (pick) {
    case 0:
      return rng.pick([0, -0, 1, -1, 1.5, 1e21, 1e-7, 123456789, 2 ** 53 + 1, 1e308]);
    case 1:
      return rng.pick(['', 'a', 'é', '😀', '"q"', '\\', '\n', '\u0000', 'ff1.', '__proto__']);
    case 2:
      return rng.pick([true, false, null]);
    case 3:
      return rng.normal() * 10 ** rng.int(-5, 5);
    case 4:
    case 5: {
      const out: Record<string, unknown> = {};
      const n = rng.int(0, 4);
      for (let i = 0; i < n; i++) out[rng.pick(['a', 'b', 'constructor', 'é', '', 'x y', `k${i}`])] = randomValue(rng, depth + 1);
      return out;
    }
    default:
      return Array.from({ length: rng.int(0, 4) }, () => randomValue(rng, depth + 1));
  }
}

const SIGNIFICANT = ['{', '}', '[', ']', ',', ':', '"', '\\', '-', '.', 'e', '0', '9', ' ', '\n', 't', 'n', 'u', 'x', '\u0001', '😀', '\uD800'];

function mutate(rng: Rng, text: string): string {
  let out = text;
  const edits = rng.int(1, 3);
  for (let k = 0; k < edits; k++) {
    const at = rng.int(0, out.length);
    const op = rng.int(0, 3);
    if (op === 0) out = out.slice(0, at) + out.slice(at + 1);
    else if (op === 1) out = out.slice(0, at) + rng.pick(SIGNIFICANT) + out.slice(at);
    else if (op === 2) out = out.slice(0, at) + rng.pick(SIGNIFICANT) + out.slice(at + 1);
    else out = out.slice(0, at);
  }
  return out;
}

describe('readJsonText agrees with JSON.parse (seeded differential fuzz)', () => {
  it('on 3,000 random documents and mutations', () => {
    const rng = new Rng(9_021);
    const mismatches: string[] = [];
    let accepted = 0;
    for (let k = 0; k < 3000; k++) {
      const base = JSON.stringify(randomValue(rng, 0), null, rng.int(0, 2));
      const text = k % 3 === 0 ? base : mutate(rng, base);
      let expected: { ok: true; value: unknown } | { ok: false };
      try {
        expected = { ok: true, value: JSON.parse(text) as unknown };
      } catch {
        expected = { ok: false };
      }
      try {
        const value = readJsonText(text);
        accepted++;
        if (!expected.ok) mismatches.push(`accepted what JSON.parse refuses: ${JSON.stringify(text)}`);
        else if (!Object.is(JSON.stringify(value), JSON.stringify(expected.value))) mismatches.push(`different value: ${JSON.stringify(text)}`);
      } catch (err) {
        if (!(err instanceof JsonTextError)) {
          mismatches.push(`threw ${String(err)} on ${JSON.stringify(text)}`);
          continue;
        }
        const extra = err.kind !== 'syntax' || err.reason.includes('is too large');
        if (expected.ok && !extra) mismatches.push(`refused what JSON.parse reads (${err.message}): ${JSON.stringify(text)}`);
      }
    }
    expect(mismatches.slice(0, 5)).toEqual([]);
    expect(accepted).toBeGreaterThan(1000);
  });
});
