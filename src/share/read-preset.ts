/**
 * Node-only: open what a command line names — a share link or a preset file.
 * A link is decoded with decodeSpecLink (LinkError on refusal); a file is
 * size-checked with stat before it is read, read with a bounded buffer, and
 * parsed with parsePresetText (PresetError on refusal).
 */
import { open, type FileHandle } from 'node:fs/promises';
import type { ExperimentSpec } from '../experiment/spec.ts';
import { LIMITS } from '../experiment/limits.ts';
import { LINK_VERSION, decodeSpecLink } from './link.ts';
import { PresetError, parsePresetText, presetTooLarge } from './preset-file.ts';

export interface OpenedPreset {
  spec: ExperimentSpec;
  fingerprint?: string;
  source: 'file' | 'link';
}

/**
 * True for a URL, anything with a '#', or a bare fragment ('ff1.' followed by
 * base64url). A bare file name such as 'ff1.json' is a file: the payload part
 * must be at least 16 base64url characters with no '.' in it.
 */
export function looksLikeLink(arg: string): boolean {
  const text = arg.trim();
  if (/^[a-z][a-z0-9+.-]*:\/\//i.test(text)) return true;
  if (text.includes(`#${LINK_VERSION}.`) || text.startsWith('#')) return true;
  return /^[A-Za-z]{1,8}\d{1,6}\.[A-Za-z0-9_-]{16,}(&|$)/.test(text);
}

function readFailure(path: string, err: unknown): PresetError {
  const code = (err as { code?: unknown } | null)?.code;
  const what =
    code === 'ENOENT' || code === 'ENOTDIR'
      ? 'no such file'
      : code === 'EACCES' || code === 'EPERM'
        ? 'permission denied'
        : code === 'EISDIR'
          ? 'is a directory, not a preset file'
          : `cannot be read (${typeof code === 'string' ? code : err instanceof Error ? err.message : String(err)})`;
  return new PresetError(path, 'read', `${path}: ${what}`, { cause: err });
}

async function readBounded(path: string): Promise<string> {
  let handle: FileHandle;
  try {
    handle = await open(path, 'r');
  } catch (err) {
    throw readFailure(path, err);
  }
  try {
    const info = await handle.stat();
    if (info.isDirectory()) throw new PresetError(path, 'read', `${path}: is a directory, not a preset file`);
    if (info.size > LIMITS.fileBytes.max) throw presetTooLarge(path, `${info.size} bytes`);
    // The file may grow between stat and read: never read more than the cap + 1 bytes.
    const buffer = new Uint8Array(LIMITS.fileBytes.max + 1);
    let total = 0;
    while (total < buffer.length) {
      const { bytesRead } = await handle.read(buffer, total, buffer.length - total, null);
      if (bytesRead === 0) break;
      total += bytesRead;
    }
    if (total > LIMITS.fileBytes.max) throw presetTooLarge(path, `more than ${LIMITS.fileBytes.max} bytes`);
    try {
      return new TextDecoder('utf-8', { fatal: true }).decode(buffer.subarray(0, total));
    } catch (err) {
      throw new PresetError(path, 'text', `${path}: not UTF-8 text (is it a preset JSON file?)`, { cause: err });
    }
  } catch (err) {
    throw err instanceof PresetError ? err : readFailure(path, err);
  } finally {
    await handle.close().catch(() => undefined);
  }
}

/** Open a share link or a preset file named on the command line. */
export async function readPreset(pathOrLink: string): Promise<OpenedPreset> {
  if (looksLikeLink(pathOrLink)) {
    const { spec, fingerprint } = await decodeSpecLink(pathOrLink);
    return fingerprint === undefined ? { spec, source: 'link' } : { spec, fingerprint, source: 'link' };
  }
  const text = await readBounded(pathOrLink);
  return { spec: parsePresetText(text, pathOrLink), source: 'file' };
}
