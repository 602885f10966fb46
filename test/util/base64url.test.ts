/**
 * Known answers for the share-link base64url codec (src/share/base64url.ts).
 *
 * The vectors are RFC 4648 §10 (and the §9 illustrations), adapted: the codec
 * writes the URL-safe alphabet of §5 ('-' for '+', '_' for '/') and no '='
 * padding, so each expected text below is the RFC's with padding removed and
 * those two characters replaced.
 */
import { describe, expect, it } from 'vitest';
import { decodeBase64Url, encodeBase64Url, type Base64Problem } from '../../src/share/base64url.ts';
import { Rng } from '../../src/util/rng.ts';

const bytesOf = (text: string): Uint8Array => new TextEncoder().encode(text);

function decoded(text: string): Uint8Array {
  const out = decodeBase64Url(text);
  if (!(out instanceof Uint8Array)) throw new Error(`expected bytes for ${JSON.stringify(text)}, got: ${out.reason}`);
  return out;
}

function problem(text: string): Base64Problem {
  const out = decodeBase64Url(text);
  if (out instanceof Uint8Array) throw new Error(`expected a problem for ${JSON.stringify(text)}, got ${out.length} bytes`);
  return out;
}

// RFC 4648 §10: BASE64("") = "", "f" = "Zg==", "fo" = "Zm8=", "foo" = "Zm9v", "foob" = "Zm9vYg==",
// "fooba" = "Zm9vYmE=", "foobar" = "Zm9vYmFy"; here without the '=' padding.
const RFC4648_SECTION_10: ReadonlyArray<readonly [string, string]> = [
  ['', ''],
  ['f', 'Zg'],
  ['fo', 'Zm8'],
  ['foo', 'Zm9v'],
  ['foob', 'Zm9vYg'],
  ['fooba', 'Zm9vYmE'],
  ['foobar', 'Zm9vYmFy'],
];

// RFC 4648 §9 illustrations: 0x14fb9c03d97e = "FPucA9l+", 0x14fb9c03d9 = "FPucA9k=",
// 0x14fb9c03 = "FPucAw=="; here in the URL-safe alphabet without padding.
const RFC4648_SECTION_9: ReadonlyArray<readonly [number[], string]> = [
  [[0x14, 0xfb, 0x9c, 0x03, 0xd9, 0x7e], 'FPucA9l-'],
  [[0x14, 0xfb, 0x9c, 0x03, 0xd9], 'FPucA9k'],
  [[0x14, 0xfb, 0x9c, 0x03], 'FPucAw'],
];

describe('base64url: RFC 4648 test vectors (URL-safe alphabet, no padding)', () => {
  it.each(RFC4648_SECTION_10)('§10: %j encodes to %j and back', (text, expected) => {
    expect(encodeBase64Url(bytesOf(text))).toBe(expected);
    expect(decoded(expected)).toEqual(bytesOf(text));
  });

  it.each(RFC4648_SECTION_9)('§9: %j encodes to %j and back', (bytes, expected) => {
    expect(encodeBase64Url(Uint8Array.from(bytes))).toBe(expected);
    expect(decoded(expected)).toEqual(Uint8Array.from(bytes));
  });
});

describe('base64url: the two URL-safe characters', () => {
  it("0xfb 0xef 0xbe is all '-' (value 62) and 0xff 0xff 0xff all '_' (value 63)", () => {
    expect(encodeBase64Url(Uint8Array.from([0xfb, 0xef, 0xbe]))).toBe('----');
    expect(encodeBase64Url(Uint8Array.from([0xff, 0xff, 0xff]))).toBe('____');
    expect(encodeBase64Url(Uint8Array.from([0xfb, 0xff]))).toBe('-_8');
    expect(encodeBase64Url(Uint8Array.from([0xff]))).toBe('_w');
    expect(encodeBase64Url(Uint8Array.from([0x00, 0x0f, 0xbf]))).toBe('AA-_');
  });

  it("round-trips bytes whose text holds '-' and '_', at every tail length", () => {
    for (const bytes of [[0xfb, 0xef, 0xbe], [0xff, 0xff, 0xff], [0xfb, 0xff], [0xff], [0x00, 0x0f, 0xbf], [0x00, 0x0f, 0xbf, 0xfb, 0xf0], [0x3e, 0xff, 0xbf, 0xfb]]) {
      const input = Uint8Array.from(bytes);
      const text = encodeBase64Url(input);
      expect(text).toMatch(/[-_]/);
      expect(text).not.toMatch(/[+/=]/);
      expect(decoded(text)).toEqual(input);
    }
  });

  it('matches Node’s own base64url encoder on seeded random bytes of length 0..64', () => {
    const rng = new Rng(17).fork('base64url');
    for (let n = 0; n <= 64; n++) {
      const input = Uint8Array.from({ length: n }, () => rng.int(0, 255));
      const text = encodeBase64Url(input);
      expect(text, `length ${n}`).toBe(Buffer.from(input).toString('base64url'));
      expect(decoded(text)).toEqual(input);
    }
  });
});

describe('base64url: what the decoder refuses', () => {
  it("the standard alphabet's '+' and '/' and the '=' padding, naming the position", () => {
    expect(problem('FPucA9l+').index).toBe(7);
    expect(problem('ab/c').index).toBe(2);
    expect(problem('Zg==').index).toBe(2);
  });

  it('a length of 4k+1, which no byte string encodes to', () => {
    expect(problem('Zm9vY').index).toBe(-1);
  });
});
