/**
 * Every presets/*.json, bundled at build time (so the static site works
 * offline) and checked with the same parser the CLI uses for files. A preset
 * that fails to parse is listed with its error rather than hidden.
 */
import type { ExperimentSpec } from '../experiment/spec.ts';
import { parsePresetText } from '../share/preset-file.ts';

/** What a first visit shows: a run short enough to watch (about ten seconds on 2 cores). */
export const DEFAULT_PRESET = 'quick-demo';
/** The full experiment the quick demo previews, one click away in the run bar. */
export const FULL_PRESET = 'shortest-path-max-vs-sum';

export type PresetEntry =
  | { id: string; file: string; ok: true; spec: ExperimentSpec }
  | { id: string; file: string; ok: false; error: string };

const files = import.meta.glob<string>('../../presets/*.json', { eager: true, query: '?raw', import: 'default' });

function idOf(path: string): string {
  return path.replace(/^.*\//, '').replace(/\.json$/, '');
}

export function loadPresets(): PresetEntry[] {
  const entries = Object.entries(files).map(([path, text]): PresetEntry => {
    const file = `presets/${path.replace(/^.*\//, '')}`;
    const id = idOf(path);
    try {
      return { id, file, ok: true, spec: parsePresetText(text, file) };
    } catch (error) {
      return { id, file, ok: false, error: error instanceof Error ? error.message : String(error) };
    }
  });
  // The quick demo first, then the full experiment, then the rest by name.
  const rank = (id: string) => (id === DEFAULT_PRESET ? 0 : id === FULL_PRESET ? 1 : 2);
  return entries.sort((a, b) => rank(a.id) - rank(b.id) || a.id.localeCompare(b.id));
}
