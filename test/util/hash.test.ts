/**
 * Known answers for `sha256Hex` (src/util/hash.ts), which every spec hash and
 * results fingerprint goes through. The digests below come from outside
 * sources, named beside each check, not from this implementation.
 */
import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { canonicalJson, sha256Hex } from '../../src/util/hash.ts';
import { Rng } from '../../src/util/rng.ts';

describe('sha256Hex: published test vectors', () => {
  it('"abc" (NIST FIPS 180-4 example document SHA256.pdf, one block; also RFC 6234 §8.5 TEST1)', () => {
    expect(sha256Hex('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });

  it('the 448-bit two-block message (NIST FIPS 180-4 example document SHA256.pdf; also RFC 6234 §8.5 TEST2_1)', () => {
    expect(sha256Hex('abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq')).toBe(
      '248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1',
    );
  });

  it('the empty string (NIST CAVP SHAVS byte-oriented vectors, SHA256ShortMsg.rsp, Len = 0)', () => {
    expect(sha256Hex('')).toBe('e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855');
  });

  it('"01234567" repeated 80 times, 640 bytes over ten blocks (RFC 6234 §8.5 TEST4)', () => {
    expect(sha256Hex('01234567'.repeat(80))).toBe('594847328451bdfa85056225462cc1d867d877fb388df0ce35f25ab5562bfbb5');
  });

  it('one million "a" (FIPS 180-2 Appendix B.3; RFC 6234 §8.5 TEST3); about 40 ms here', () => {
    expect(sha256Hex('a'.repeat(1_000_000))).toBe('cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0');
  });
});

describe('sha256Hex agrees with node:crypto (OpenSSL)', () => {
  it('at every length around the padding boundaries (0..200 bytes)', () => {
    // 55 bytes is the longest message that fits one block with its padding; 56..63 spill into a second.
    const rng = new Rng(2024).fork('sha256-lengths');
    for (let n = 0; n <= 200; n++) {
      const text = Array.from({ length: n }, () => String.fromCharCode(rng.int(0x20, 0x7e))).join('');
      expect(sha256Hex(text), `length ${n}`).toBe(createHash('sha256').update(text, 'utf8').digest('hex'));
    }
  });

  it('hashes the UTF-8 bytes of non-ASCII text (2-, 3- and 4-byte sequences)', () => {
    for (const text of ['é', 'Größe ≥ 4 × n', '−τ·log Σ exp', '🙂 graph 🌐', 'a'.repeat(54) + 'é']) {
      expect(sha256Hex(text), text).toBe(createHash('sha256').update(text, 'utf8').digest('hex'));
    }
  });
});

describe('canonicalJson: known answers', () => {
  it('sorts object keys at every depth and keeps array order', () => {
    expect(canonicalJson({ b: 1, a: { d: [3, { z: 1, y: 2 }, [2, 1]], c: null } })).toBe(
      '{"a":{"c":null,"d":[3,{"y":2,"z":1},[2,1]]},"b":1}',
    );
  });

  it('gives equal text for objects that differ only in key insertion order', () => {
    const one = { task: 'shortest-path', arms: [{ name: 'max', model: { hidden: 8, bias: true } }] };
    const two = { arms: [{ model: { bias: true, hidden: 8 }, name: 'max' }], task: 'shortest-path' };
    expect(canonicalJson(one)).toBe(canonicalJson(two));
  });

  it('sorts keys by UTF-16 code unit (upper case before lower case before non-ASCII)', () => {
    expect(canonicalJson({ é: 1, b: 2, B: 3, a: 4, _: 5 })).toBe('{"B":3,"_":5,"a":4,"b":2,"é":1}');
  });

  it('integer-like keys come first in numeric order, since JavaScript objects enumerate them that way', () => {
    // Not the code-unit order of RFC 8785 ("10" < "9"), but still canonical: equal data, equal text.
    expect(canonicalJson({ a: 0, 10: 1, 9: 2 })).toBe('{"9":2,"10":1,"a":0}');
  });

  it('writes numbers the way JSON.stringify does', () => {
    expect(canonicalJson([0, -0, 1, -1.5, 0.1, 0.003, 1e21, 1.5e-7, 2 ** 53, 123456789.125])).toBe(
      '[0,0,1,-1.5,0.1,0.003,1e+21,1.5e-7,9007199254740992,123456789.125]',
    );
  });

  it('turns non-finite numbers and undefined array entries into null and drops undefined properties', () => {
    expect(canonicalJson({ x: [Number.NaN, Number.POSITIVE_INFINITY, undefined], y: undefined, z: 'ok' })).toBe(
      '{"x":[null,null,null],"z":"ok"}',
    );
  });

  it('leaves strings, booleans and null at the top level as JSON.stringify writes them', () => {
    expect(canonicalJson('a"b')).toBe('"a\\"b"');
    expect(canonicalJson(true)).toBe('true');
    expect(canonicalJson(null)).toBe('null');
  });
});
