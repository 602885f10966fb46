/**
 * base64url without padding (RFC 4648 §5), written out so the same code runs
 * in browsers, workers and Node without Buffer or atob. Decoding reports the
 * first character it cannot read instead of throwing a host-specific error.
 */
const ALPHABET = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789-_';
const VALUES = new Int8Array(128).fill(-1);
for (let i = 0; i < ALPHABET.length; i++) VALUES[ALPHABET.charCodeAt(i)] = i;

export function encodeBase64Url(bytes: Uint8Array): string {
  let out = '';
  let i = 0;
  for (; i + 2 < bytes.length; i += 3) {
    const n = (bytes[i]! << 16) | (bytes[i + 1]! << 8) | bytes[i + 2]!;
    out += ALPHABET[n >> 18]! + ALPHABET[(n >> 12) & 63]! + ALPHABET[(n >> 6) & 63]! + ALPHABET[n & 63]!;
  }
  const rest = bytes.length - i;
  if (rest === 1) {
    const n = bytes[i]! << 16;
    out += ALPHABET[n >> 18]! + ALPHABET[(n >> 12) & 63]!;
  } else if (rest === 2) {
    const n = (bytes[i]! << 16) | (bytes[i + 1]! << 8);
    out += ALPHABET[n >> 18]! + ALPHABET[(n >> 12) & 63]! + ALPHABET[(n >> 6) & 63]!;
  }
  return out;
}

/** Why a text is not base64url: the offending index (or -1 for a bad length) and a reason. */
export interface Base64Problem {
  index: number;
  reason: string;
}

/** Decode base64url (no padding); returns a problem instead of throwing. */
export function decodeBase64Url(text: string): Uint8Array | Base64Problem {
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c >= 128 || VALUES[c]! < 0) {
      const shown = c >= 0x21 && c < 0x7f ? `'${text[i]}'` : `U+${c.toString(16).toUpperCase().padStart(4, '0')}`;
      return { index: i, reason: `character ${shown} at position ${i + 1} is not base64url (allowed: A-Z a-z 0-9 - _)` };
    }
  }
  if (text.length % 4 === 1) {
    return { index: -1, reason: `${text.length} characters cannot be base64url (a length of 4k+1 is impossible); the link was probably cut short` };
  }
  const out = new Uint8Array(Math.floor((text.length * 3) / 4));
  let o = 0;
  let i = 0;
  for (; i + 3 < text.length; i += 4) {
    const n = (VALUES[text.charCodeAt(i)]! << 18) | (VALUES[text.charCodeAt(i + 1)]! << 12) | (VALUES[text.charCodeAt(i + 2)]! << 6) | VALUES[text.charCodeAt(i + 3)]!;
    out[o++] = n >> 16;
    out[o++] = (n >> 8) & 255;
    out[o++] = n & 255;
  }
  const rest = text.length - i;
  if (rest >= 2) {
    const n = (VALUES[text.charCodeAt(i)]! << 18) | (VALUES[text.charCodeAt(i + 1)]! << 12) | (rest === 3 ? VALUES[text.charCodeAt(i + 2)]! << 6 : 0);
    out[o++] = n >> 16;
    if (rest === 3) out[o++] = (n >> 8) & 255;
  }
  return out;
}
