/** The command line as a user runs it: a child process of bin/farfield.mjs (tests only). */
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

export const root = fileURLToPath(new URL('../..', import.meta.url));
export const tiny = join(root, 'test/fixtures/tiny.json');

export function farfield(...args: string[]): { code: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [join(root, 'bin/farfield.mjs'), ...args], { cwd: root, encoding: 'utf8', timeout: 120_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}
