/**
 * Preset files: a spec as a JSON document (presets/*.json, or a file a
 * colleague sent). Host-agnostic: this module only sees text; reading from
 * disk lives in read-preset.ts (Node only).
 *
 * Checks, in order: at most LIMITS.fileBytes.max bytes of UTF-8; strict JSON
 * (errors give origin:line:column; nesting at most MAX_JSON_DEPTH; no field
 * name twice in one object; no "__proto__"); then `validateSpec`. Every
 * refusal is a PresetError that names the file (its `origin`) and, for spec
 * problems, the field.
 */
import { LIMITS } from '../experiment/limits.ts';
import { SpecError, type ExperimentSpec } from '../experiment/spec.ts';
import { JsonTextError, MAX_JSON_DEPTH, readJsonText } from './json-text.ts';
import { problemField, validateUntrusted } from './spec-gate.ts';

export type PresetStage =
  | 'read' // the file could not be read (missing, a directory, no permission)
  | 'size' // more than LIMITS.fileBytes.max bytes
  | 'text' // not UTF-8 text
  | 'json' // not JSON, or a repeated / forbidden field name (line and column given)
  | 'nesting' // JSON nested deeper than MAX_JSON_DEPTH
  | 'spec'; // valid JSON, refused by validateSpec

export class PresetError extends Error {
  /** The spec field at fault, when the refusal came from the spec check. */
  readonly field: string | undefined;
  /** Every problem the spec check found (empty for other stages). */
  readonly problems: readonly string[];
  /** Position of a JSON problem (1-based). */
  readonly line: number | undefined;
  readonly column: number | undefined;
  constructor(
    /** The file path or name the text came from, as given by the caller. */
    readonly origin: string,
    readonly stage: PresetStage,
    message: string,
    options: { cause?: unknown; problems?: readonly string[]; line?: number; column?: number } = {},
  ) {
    super(message, options.cause === undefined ? undefined : { cause: options.cause });
    this.name = 'PresetError';
    this.problems = options.problems ?? [];
    this.field = problemField(this.problems[0]);
    this.line = options.line;
    this.column = options.column;
  }
}

/** UTF-8 length of a string without encoding it (lone surrogates count 3, as TextEncoder writes U+FFFD). */
export function utf8Length(text: string): number {
  let bytes = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c < 0x80) bytes += 1;
    else if (c < 0x800) bytes += 2;
    else if (c >= 0xd800 && c <= 0xdbff && i + 1 < text.length && (text.charCodeAt(i + 1) & 0xfc00) === 0xdc00) {
      bytes += 4;
      i++;
    } else bytes += 3;
  }
  return bytes;
}

export function presetTooLarge(origin: string, size: string): PresetError {
  return new PresetError(origin, 'size', `${origin}: the file is too large: ${size}, allowed at most ${LIMITS.fileBytes.max} bytes`);
}

/** Parse and validate the text of a preset file. `origin` names it in every error (e.g. 'presets/x.json'). */
export function parsePresetText(text: string, origin: string): ExperimentSpec {
  if (typeof text !== 'string') throw new PresetError(origin, 'text', `${origin}: expected text, got ${text === null ? 'null' : typeof text}`);
  // Each UTF-16 unit is at least one UTF-8 byte, so a long string is refused without measuring it.
  if (text.length > LIMITS.fileBytes.max) throw presetTooLarge(origin, `at least ${text.length} bytes`);
  const bytes = utf8Length(text);
  if (bytes > LIMITS.fileBytes.max) throw presetTooLarge(origin, `${bytes} bytes`);
  // An editor's byte-order mark is not part of the JSON.
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  let value: unknown;
  try {
    value = readJsonText(body, { maxDepth: MAX_JSON_DEPTH });
  } catch (err) {
    if (err instanceof JsonTextError) {
      // Columns count from the file's own first character, BOM included.
      const column = err.line === 1 && body !== text ? err.column + 1 : err.column;
      throw new PresetError(origin, err.kind === 'nesting' ? 'nesting' : 'json', `${origin}:${err.line}:${column}: ${err.reason}`, {
        cause: err,
        line: err.line,
        column,
      });
    }
    throw new PresetError(origin, 'json', `${origin}: not valid JSON`, { cause: err });
  }
  try {
    return validateUntrusted(value);
  } catch (err) {
    const problems = err instanceof SpecError ? err.problems : [];
    throw new PresetError(origin, 'spec', `${origin}: ${(err as Error).message}`, { cause: err, problems });
  }
}
