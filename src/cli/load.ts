/** Reading a spec from a preset file or a share link, for CLI commands. */
import { readPreset } from '../share/read-preset.ts';
import type { ExperimentSpec } from '../experiment/spec.ts';

export async function loadSpec(arg: string | undefined): Promise<{ spec: ExperimentSpec; fingerprint?: string; source: 'file' | 'link' }> {
  if (!arg) throw new Error('cli/load: give a preset file or a share link, e.g. presets/shortest-path-max-vs-sum.json');
  return readPreset(arg);
}
