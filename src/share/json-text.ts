/**
 * A strict JSON reader for untrusted text (share links, preset files).
 *
 * One linear pass checks the grammar of RFC 8259 before `JSON.parse` sees the
 * text, so every host reports the same errors, with a line:column, and nothing
 * host-specific (a RangeError from deep nesting, a message without a position)
 * can leak. On top of plain JSON it refuses:
 *   - nesting deeper than `maxDepth` arrays/objects (checked while scanning,
 *     so 10,000 levels cost 33 steps, not a stack overflow);
 *   - a field name given twice in one object (JSON.parse silently keeps the
 *     last, so two readers could see two different specs);
 *   - the field name "__proto__" (harmless to JSON.parse, but silently dropped
 *     by schema records, so the spec would not say what the text says);
 *   - numbers too large for a 64-bit float (JSON.parse turns 1e400 into Infinity).
 */

/** Deepest nesting of arrays/objects accepted; a spec needs 5. */
export const MAX_JSON_DEPTH = 32;

export type JsonProblemKind = 'syntax' | 'nesting' | 'field-name';

export class JsonTextError extends Error {
  /** 1-based line and column (in UTF-16 code units) of the problem. */
  readonly line: number;
  readonly column: number;
  constructor(
    readonly reason: string,
    readonly offset: number,
    readonly kind: JsonProblemKind,
    text: string,
  ) {
    const { line, column } = lineColumn(text, offset);
    super(`${line}:${column}: ${reason}`);
    this.name = 'JsonTextError';
    this.line = line;
    this.column = column;
  }
}

export function lineColumn(text: string, offset: number): { line: number; column: number } {
  let line = 1;
  let lineStart = 0;
  const end = Math.min(offset, text.length);
  for (let i = 0; i < end; i++) {
    if (text.charCodeAt(i) === 0x0a) {
      line++;
      lineStart = i + 1;
    }
  }
  return { line, column: end - lineStart + 1 };
}

/** Check `text` strictly, then parse it. Throws JsonTextError, never anything else. */
export function readJsonText(text: string, options: { maxDepth?: number } = {}): unknown {
  const { maxDepth = MAX_JSON_DEPTH } = options;
  new Scanner(text, maxDepth).document();
  try {
    return JSON.parse(text) as unknown;
  } catch (err) {
    // Unreachable if the scanner is right; kept so no host error can escape.
    throw new JsonTextError(`not valid JSON (${err instanceof Error ? err.message : String(err)})`, 0, 'syntax', text);
  }
}

const HEX = /^[0-9a-fA-F]{4}$/;

class Scanner {
  private i = 0;
  private readonly n: number;

  constructor(
    private readonly s: string,
    private readonly maxDepth: number,
  ) {
    this.n = s.length;
  }

  document(): void {
    this.ws();
    if (this.i >= this.n) this.fail('the text is empty: expected a JSON object');
    this.value(0);
    this.ws();
    if (this.i < this.n) this.fail(`unexpected ${this.describe(this.i)} after the end of the JSON value`);
  }

  private fail(reason: string, at: number = this.i, kind: JsonProblemKind = 'syntax'): never {
    throw new JsonTextError(reason, at, kind, this.s);
  }

  private describe(at: number): string {
    if (at >= this.n) return 'the end of the text';
    const code = this.s.codePointAt(at)!;
    if (code >= 0x21 && code < 0x7f) return `'${String.fromCodePoint(code)}'`;
    return `U+${code.toString(16).toUpperCase().padStart(4, '0')}`;
  }

  private ws(): void {
    const { s, n } = this;
    while (this.i < n) {
      const c = s.charCodeAt(this.i);
      if (c === 0x20 || c === 0x09 || c === 0x0a || c === 0x0d) this.i++;
      else break;
    }
  }

  private value(depth: number): void {
    const c = this.s[this.i];
    switch (c) {
      case '{':
        return this.object(depth + 1);
      case '[':
        return this.array(depth + 1);
      case '"':
        this.string();
        return;
      case 't':
        return this.literal('true');
      case 'f':
        return this.literal('false');
      case 'n':
        return this.literal('null');
      default:
        if (c === '-' || (c !== undefined && c >= '0' && c <= '9')) return this.number();
        this.fail(`expected a value, found ${this.describe(this.i)}`);
    }
  }

  private enter(depth: number): void {
    if (depth > this.maxDepth) this.fail(`arrays/objects are nested more than ${this.maxDepth} levels deep, allowed at most ${this.maxDepth}`, this.i, 'nesting');
    this.i++;
    this.ws();
  }

  private object(depth: number): void {
    this.enter(depth);
    if (this.s[this.i] === '}') {
      this.i++;
      return;
    }
    const seen = new Set<string>();
    for (;;) {
      this.ws();
      if (this.s[this.i] !== '"') this.fail(`expected a field name in double quotes, found ${this.describe(this.i)}`);
      const start = this.i;
      this.string();
      const raw = this.s.slice(start + 1, this.i - 1);
      const key = raw.includes('\\') ? (JSON.parse(this.s.slice(start, this.i)) as string) : raw;
      if (key === '__proto__') this.fail('the field name "__proto__" is not allowed', start, 'field-name');
      if (seen.has(key)) this.fail(`the field ${quote(key)} appears twice in one object`, start, 'field-name');
      seen.add(key);
      this.ws();
      if (this.s[this.i] !== ':') this.fail(`expected ':' after the field name ${quote(key)}, found ${this.describe(this.i)}`);
      this.i++;
      this.ws();
      this.value(depth);
      this.ws();
      const c = this.s[this.i];
      if (c === ',') {
        this.i++;
        continue;
      }
      if (c === '}') {
        this.i++;
        return;
      }
      this.fail(`expected ',' or '}' after the value of ${quote(key)}, found ${this.describe(this.i)}`);
    }
  }

  private array(depth: number): void {
    this.enter(depth);
    if (this.s[this.i] === ']') {
      this.i++;
      return;
    }
    for (;;) {
      this.ws();
      this.value(depth);
      this.ws();
      const c = this.s[this.i];
      if (c === ',') {
        this.i++;
        continue;
      }
      if (c === ']') {
        this.i++;
        return;
      }
      this.fail(`expected ',' or ']' after an array item, found ${this.describe(this.i)}`);
    }
  }

  private string(): void {
    const { s, n } = this;
    const start = this.i;
    this.i++;
    for (;;) {
      if (this.i >= n) this.fail('unterminated string (no closing \'"\')', start);
      const c = s.charCodeAt(this.i);
      if (c === 0x22) {
        this.i++;
        return;
      }
      if (c === 0x5c) {
        const e = s[this.i + 1];
        if (e !== undefined && '"\\/bfnrt'.includes(e)) this.i += 2;
        else if (e === 'u' && HEX.test(s.slice(this.i + 2, this.i + 6))) this.i += 6;
        else this.fail(`bad escape sequence in a string: ${this.describe(this.i + 1)} after '\\'`);
      } else if (c < 0x20) {
        this.fail(`control character ${this.describe(this.i)} inside a string; write it escaped (e.g. \\n)`);
      } else {
        this.i++;
      }
    }
  }

  private literal(word: string): void {
    if (this.s.startsWith(word, this.i)) this.i += word.length;
    else this.fail(`expected a value (did you mean ${word}?), found ${quote(/^[^\s,:[\]{}"]{1,20}/.exec(this.s.slice(this.i, this.i + 20))![0])}`);
  }

  private number(): void {
    const { s } = this;
    const start = this.i;
    const digit = () => {
      const c = s.charCodeAt(this.i);
      return c >= 0x30 && c <= 0x39;
    };
    if (s[this.i] === '-') this.i++;
    if (s[this.i] === '0') this.i++;
    else if (digit()) while (digit()) this.i++;
    else this.fail(`expected a digit in a number, found ${this.describe(this.i)}`);
    if (s[this.i] === '.') {
      this.i++;
      if (!digit()) this.fail(`expected a digit after the decimal point, found ${this.describe(this.i)}`);
      while (digit()) this.i++;
    }
    if (s[this.i] === 'e' || s[this.i] === 'E') {
      this.i++;
      if (s[this.i] === '+' || s[this.i] === '-') this.i++;
      if (!digit()) this.fail(`expected a digit in the exponent, found ${this.describe(this.i)}`);
      while (digit()) this.i++;
    }
    if (!Number.isFinite(Number(s.slice(start, this.i)))) {
      this.fail(`the number ${clip(s.slice(start, this.i))} is too large (beyond ±1.8e308)`, start);
    }
  }
}

function clip(text: string, max = 24): string {
  return text.length > max ? `${text.slice(0, max - 1)}…` : text;
}

/** A field name shown safely: JSON-quoted (control characters escaped) and clipped. */
export function quote(text: string, max = 40): string {
  return JSON.stringify(clip(text, max));
}
