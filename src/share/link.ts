/**
 * Share links: a whole experiment spec in a URL fragment.
 *
 * Format (version ff1)
 *
 *     <base>#ff1.<payload>[&fp=<fingerprint>]
 *
 *   - `ff1`     version tag; a later incompatible format gets `ff2`, and this
 *               build refuses any tag but `ff1` by name.
 *   - payload   base64url (RFC 4648 §5, alphabet A-Z a-z 0-9 - _, no padding)
 *               of the deflate-raw (RFC 1951) compression of the UTF-8
 *               canonical JSON of the normalised spec: every default filled
 *               in by the schema, object keys sorted (`canonicalJson`). The
 *               normalised form, not the author's shorthand, is what travels,
 *               so a later change of a default cannot change a shared
 *               experiment, and equal specs give equal links.
 *               One exception to "every default filled in": an arm with no
 *               model overrides is written without its `model` field (an empty
 *               override), which reads back as the same empty override.
 *   - fp        optional: the 12 lowercase hex characters of the results
 *               fingerprint the sender saw, for the receiver to compare.
 *               No other parameters exist in ff1; unknown ones are refused.
 *
 * The fragment never reaches a server. Caps (LIMITS): at most
 * `linkChars.max` characters after '#', at most `decompressedBytes.max` bytes
 * of JSON after inflation (enforced while inflating), JSON nesting at most
 * MAX_JSON_DEPTH. Decoding never evaluates anything: the payload is only
 * inflated, scanned as JSON text and checked by `validateSpec`. Strings in a
 * decoded spec (question, notes, arm names) are untrusted plain text: the UI
 * must render them as text, never as HTML.
 *
 * Every refusal is a LinkError whose `stage` says which check failed and
 * whose message says what was wrong and what is allowed.
 */
import { LIMITS } from '../experiment/limits.ts';
import { SpecError, type ExperimentSpec } from '../experiment/spec.ts';
import { canonicalJson } from '../util/hash.ts';
import { decodeBase64Url, encodeBase64Url } from './base64url.ts';
import { deflateRaw, inflateRawBounded } from './compress.ts';
import { JsonTextError, MAX_JSON_DEPTH, quote, readJsonText } from './json-text.ts';
import { problemField, validateUntrusted } from './spec-gate.ts';

export const LINK_VERSION = 'ff1';
export const DEFAULT_LINK_BASE = 'http://127.0.0.1:4173/';
const FINGERPRINT = /^[0-9a-f]{12}$/;

export type LinkStage =
  | 'format' // not shaped like a share link at all, or an unknown parameter
  | 'length' // more than LIMITS.linkChars.max characters after '#'
  | 'version' // a version tag other than ff1
  | 'base64' // payload characters outside base64url, or an impossible length
  | 'decompress' // the payload is not valid deflate-raw data
  | 'size' // the spec JSON is larger than LIMITS.decompressedBytes.max
  | 'text' // the inflated bytes are not UTF-8
  | 'json' // not JSON (with line:column), a repeated or forbidden field name
  | 'nesting' // JSON nested deeper than MAX_JSON_DEPTH
  | 'spec' // valid JSON, refused by validateSpec
  | 'fingerprint'; // fp is not 12 lowercase hex characters

export class LinkError extends Error {
  /** The spec field at fault, when the refusal came from the spec check. */
  readonly field: string | undefined;
  /** Every problem the spec check found (empty for other stages). */
  readonly problems: readonly string[];
  constructor(
    readonly stage: LinkStage,
    message: string,
    options: { cause?: unknown; problems?: readonly string[] } = {},
  ) {
    super(message, options.cause === undefined ? undefined : { cause: options.cause });
    this.name = 'LinkError';
    this.problems = options.problems ?? [];
    this.field = problemField(this.problems[0]);
  }
}

export interface EncodeLinkOptions {
  /** Page the link opens; '' gives just the fragment ('#ff1.…'). Anything after '#' in it is dropped. */
  base?: string;
  /** Results fingerprint to carry along (12 lowercase hex). */
  fingerprint?: string;
}

export interface DecodedLink {
  spec: ExperimentSpec;
  fingerprint?: string;
}

function checkFingerprint(fp: string): string {
  if (!FINGERPRINT.test(fp)) {
    throw new LinkError('fingerprint', `the link's fingerprint ${quote(fp, 20)} is not valid: expected exactly 12 lowercase hex characters (0-9 a-f)`);
  }
  return fp;
}

/**
 * An arm whose `model` override is empty, written without the field. An empty
 * override and an absent one mean the same, but the schema fills every model
 * default into a *given* override object (and those defaults would then
 * override the shared model), while an absent one stays empty; so writing '{}'
 * would change the experiment on the way through a link.
 */
function withoutEmptyArmModels<T>(spec: T): T {
  const arms = (spec as { arms?: unknown } | null)?.arms;
  if (!Array.isArray(arms)) return spec;
  return {
    ...spec,
    arms: arms.map((arm: unknown) => {
      if (!arm || typeof arm !== 'object') return arm;
      const { model, ...rest } = arm as { model?: unknown };
      return model && typeof model === 'object' && !Array.isArray(model) && Object.keys(model).length === 0 ? rest : arm;
    }),
  };
}

/**
 * Encode a spec as a share link. The spec is validated and normalised first,
 * and the link is read back before it is returned, so a link this function
 * returns always decodes to the same spec; a spec too large for a link is
 * refused with a LinkError (stage 'size' or 'length') suggesting a file.
 */
export async function encodeSpecLink(spec: ExperimentSpec, options: EncodeLinkOptions = {}): Promise<string> {
  const { base = DEFAULT_LINK_BASE, fingerprint } = options;
  let normalised: ExperimentSpec;
  try {
    normalised = validateUntrusted(withoutEmptyArmModels(spec));
  } catch (err) {
    const problems = err instanceof SpecError ? err.problems : [];
    throw new LinkError('spec', `cannot share this spec: ${(err as Error).message}`, { cause: err, problems });
  }
  const text = canonicalJson(withoutEmptyArmModels(normalised));
  // Self-check: the receiver must get exactly this spec, not a re-normalised variant of it.
  let readBack: string;
  try {
    readBack = canonicalJson(validateUntrusted(JSON.parse(text)));
  } catch (err) {
    readBack = `unreadable: ${(err as Error).message}`;
  }
  if (readBack !== canonicalJson(normalised)) {
    throw new LinkError('spec', 'cannot share this spec: it would not read back unchanged from a link; this is a bug in Farfield, please report it with the spec');
  }
  const json = new TextEncoder().encode(text);
  if (json.byteLength > LIMITS.decompressedBytes.max) {
    throw new LinkError('size', `this spec is too large for a share link: ${json.byteLength} bytes of JSON, allowed at most ${LIMITS.decompressedBytes.max}; share it as a preset file instead`);
  }
  let fragment = `${LINK_VERSION}.${encodeBase64Url(await deflateRaw(json))}`;
  if (fingerprint !== undefined) fragment += `&fp=${checkFingerprint(fingerprint)}`;
  if (fragment.length > LIMITS.linkChars.max) {
    throw new LinkError('length', `this spec is too large for a share link: ${fragment.length} characters after '#', allowed at most ${LIMITS.linkChars.max}; share it as a preset file instead`);
  }
  const page = base.split('#')[0]!;
  return `${page}#${fragment}`;
}

/** Split a link, a '#fragment' or a bare fragment into version tag, payload and parameters. */
function splitLink(input: string): { payload: string; fingerprint?: string } {
  if (typeof input !== 'string') throw new LinkError('format', `a share link must be text, got ${input === null ? 'null' : typeof input}`);
  // Bound the work before touching the text: a generous allowance for the page address in front.
  if (input.length > LIMITS.linkChars.max + 4096) {
    throw new LinkError('length', `the link is too long: ${input.length} characters, allowed at most ${LIMITS.linkChars.max} after '#'`);
  }
  const hash = input.indexOf('#');
  if (hash < 0 && /^\s*[a-z][a-z0-9+.-]*:\/\//i.test(input)) {
    throw new LinkError('format', `the address has no '#${LINK_VERSION}.' part: a share link carries the spec after '#'; the link was probably cut short`);
  }
  const fragment = (hash >= 0 ? input.slice(hash + 1) : input).trim();
  if (fragment.length > LIMITS.linkChars.max) {
    throw new LinkError('length', `the link is too long: ${fragment.length} characters after '#', allowed at most ${LIMITS.linkChars.max}`);
  }
  if (fragment.length === 0) {
    throw new LinkError('format', `the link is empty after '#': a share link looks like '#${LINK_VERSION}.<data>'`);
  }
  const dot = fragment.indexOf('.');
  const tag = dot < 0 ? '' : fragment.slice(0, dot);
  if (tag !== LINK_VERSION) {
    if (/^[A-Za-z]{1,8}\d{1,6}$/.test(tag)) {
      throw new LinkError('version', `link version '${tag}' is not supported; this build reads ${LINK_VERSION}`);
    }
    throw new LinkError('format', `this is not a Farfield share link: it should start with '${LINK_VERSION}.' after '#', got ${quote(fragment, 16)}`);
  }
  const [payload, ...params] = fragment.slice(dot + 1).split('&');
  let fingerprint: string | undefined;
  for (const param of params) {
    const eq = param.indexOf('=');
    const name = eq < 0 ? param : param.slice(0, eq);
    if (name !== 'fp') {
      throw new LinkError('format', `unknown link parameter ${quote(name, 20)}; ${LINK_VERSION} links have only 'fp' (the results fingerprint)`);
    }
    if (fingerprint !== undefined) throw new LinkError('format', `the link gives 'fp' twice; give it at most once`);
    fingerprint = checkFingerprint(eq < 0 ? '' : param.slice(eq + 1));
  }
  return fingerprint === undefined ? { payload: payload! } : { payload: payload!, fingerprint };
}

/**
 * Decode a share link: a full URL, '#ff1.…' or 'ff1.…'. Resolves to the
 * validated, normalised spec (and the fingerprint if the link has one);
 * rejects with a LinkError naming the failed stage, never another error type.
 */
export async function decodeSpecLink(linkOrFragment: string): Promise<DecodedLink> {
  const { payload, fingerprint } = splitLink(linkOrFragment);
  if (payload.length === 0) throw new LinkError('base64', `the link has no data after '${LINK_VERSION}.'; it was probably cut short`);
  const compressed = decodeBase64Url(payload);
  if (!(compressed instanceof Uint8Array)) throw new LinkError('base64', `the link is damaged: ${compressed.reason}`);

  const inflated = await inflateRawBounded(compressed, LIMITS.decompressedBytes.max);
  if (!inflated.ok) {
    if (inflated.reason === 'too-large') {
      throw new LinkError('size', `the link's spec is too large: it inflates to more than ${LIMITS.decompressedBytes.max} bytes, allowed at most ${LIMITS.decompressedBytes.max}`);
    }
    throw new LinkError('decompress', 'the link is damaged: it does not decompress (was it cut short or edited?)');
  }

  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(inflated.bytes);
  } catch {
    throw new LinkError('text', 'the link is damaged: its data is not UTF-8 text');
  }

  let value: unknown;
  try {
    value = readJsonText(text, { maxDepth: MAX_JSON_DEPTH });
  } catch (err) {
    if (err instanceof JsonTextError) {
      const stage = err.kind === 'nesting' ? 'nesting' : 'json';
      throw new LinkError(stage, `the link's spec is not valid JSON: at ${err.line}:${err.column}, ${err.reason}`, { cause: err });
    }
    throw new LinkError('json', `the link's spec is not valid JSON`, { cause: err });
  }

  let spec: ExperimentSpec;
  try {
    spec = validateUntrusted(value);
  } catch (err) {
    const problems = err instanceof SpecError ? err.problems : [];
    throw new LinkError('spec', `the link's spec: ${(err as Error).message}`, { cause: err, problems });
  }
  return fingerprint === undefined ? { spec } : { spec, fingerprint };
}
