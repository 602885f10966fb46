/**
 * The sheet's graph files: bytes the user dropped or picked, kept in this page
 * only (never uploaded; they go to the page's own Web Workers with each run),
 * keyed by their SHA-256. The spec records each file's name and hash; a share
 * link therefore asks a colleague for the same file, and the hash tells when
 * the one given is a different file.
 */
import type { ExperimentSpec } from '../experiment/spec.ts';
import type { RunPlan } from '../experiment/plan.ts';
import type { GraphFileContent } from '../experiment/file-rungs.ts';

const contents = new Map<string, Uint8Array>();

/**
 * The example graphs shipped beside the presets (presets/graphs/), loaded on
 * demand as their own chunks, so a shipped preset that names one runs in the
 * sheet without a file to drop. Keyed by base name.
 */
const shipped = import.meta.glob<string>('../../presets/graphs/*', { query: '?raw', import: 'default' });

/** A shipped example graph's bytes by base name, or null when there is none of that name. */
export async function shippedGraphFile(name: string): Promise<Uint8Array | null> {
  const base = name.replace(/^.*[\\/]/, '');
  const load = Object.entries(shipped).find(([path]) => path.replace(/^.*\//, '') === base)?.[1];
  return load ? new TextEncoder().encode(await load()) : null;
}
const listeners = new Set<() => void>();

export function provideGraphFile(sha256: string, bytes: Uint8Array): void {
  contents.set(sha256, bytes);
  for (const listener of listeners) listener();
}

export function hasGraphFile(sha256: string | undefined): boolean {
  return sha256 !== undefined && contents.has(sha256);
}

/** Called whenever a file is provided (components re-render). Returns the unsubscribe. */
export function onGraphFiles(listener: () => void): () => void {
  listeners.add(listener);
  return () => listeners.delete(listener);
}

/** The plan with the content of every graph file the spec names that this page holds. */
export function withGraphFiles(spec: ExperimentSpec, plan: RunPlan): RunPlan {
  const files: GraphFileContent[] = [];
  for (const file of spec.test.files ?? []) {
    const bytes = file.sha256 ? contents.get(file.sha256) : undefined;
    if (bytes && file.sha256) files.push({ sha256: file.sha256, content: bytes });
  }
  return files.length ? { ...plan, files } : plan;
}
