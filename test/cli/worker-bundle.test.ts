import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterEach, describe, expect, it } from 'vitest';
import { bundleIsFresh, DEFAULT_BUNDLE, ensureWorkerBundle, type WorkerBundleOptions } from '../../src/cli/worker-bundle.ts';

const made: string[] = [];
afterEach(() => {
  for (const dir of made.splice(0)) fs.rmSync(dir, { recursive: true, force: true });
});

/** A two-module TypeScript project in a temporary folder. */
function tinyProject(depValue: number): WorkerBundleOptions & { dep: string } {
  const root = fs.mkdtempSync(path.join(os.tmpdir(), 'farfield-bundle-'));
  made.push(root);
  fs.writeFileSync(path.join(root, 'entry.ts'), "import { value } from './dep.ts';\nexport const doubled: number = value * 2;\n");
  const dep = path.join(root, 'dep.ts');
  fs.writeFileSync(dep, `export const value: number = ${depValue};\n`);
  return { root, entry: 'entry.ts', outFile: path.join(root, 'node_modules', '.cache', 'farfield', 'entry.mjs'), dep };
}

let imports = 0;
async function load(file: string): Promise<{ doubled: number }> {
  // A fresh query string each time, so Node's module cache never answers.
  return (await import(`${pathToFileURL(file).href}?n=${imports++}`)) as { doubled: number };
}

describe('worker bundle', () => {
  it('builds once, reuses while the inputs are unchanged, and rebuilds when one changes', async () => {
    const project = tinyProject(21);
    const first = await ensureWorkerBundle(project);
    expect(first.status).toBe('built');
    expect((await load(project.outFile)).doubled).toBe(42);

    const mtime = fs.statSync(project.outFile).mtimeMs;
    expect(await ensureWorkerBundle(project)).toEqual({ status: 'reused', file: project.outFile });
    expect(fs.statSync(project.outFile).mtimeMs).toBe(mtime);

    fs.writeFileSync(project.dep, 'export const value: number = 50;\n');
    expect(bundleIsFresh(project)).toBe(false);
    expect((await ensureWorkerBundle(project)).status).toBe('built');
    expect((await load(project.outFile)).doubled).toBe(100);
  });

  it('reports a build error instead of throwing, and never calls the old bundle fresh', async () => {
    const project = tinyProject(1);
    await ensureWorkerBundle(project);
    fs.writeFileSync(project.dep, 'export const value: number = ;\n');
    const result = await ensureWorkerBundle(project);
    expect(result.status).toBe('unavailable');
    expect(bundleIsFresh(project)).toBe(false);
  });

  it('treats a bundle without its input record as stale', async () => {
    const project = tinyProject(3);
    await ensureWorkerBundle(project);
    const text = fs.readFileSync(project.outFile, 'utf8');
    fs.writeFileSync(project.outFile, text.slice(text.indexOf('\n') + 1));
    expect(bundleIsFresh(project)).toBe(false);
  });

  it('inlines the engine worker\'s project modules and tfjs-core\'s gradients, and leaves other packages as imports', async () => {
    const result = await ensureWorkerBundle(DEFAULT_BUNDLE);
    expect(result.status).not.toBe('unavailable');
    const text = fs.readFileSync(DEFAULT_BUNDLE.outFile, 'utf8');
    const inputs = Object.keys(JSON.parse(text.slice(text.indexOf('{'), text.indexOf('\n'))) as Record<string, string>);
    expect(inputs).toEqual(expect.arrayContaining(['workers/node-worker.ts', 'workers/worker-core.ts', 'src/experiment/run.ts', 'src/engine/backend.ts']));
    // tfjs-core's gradient modules are inlined and recorded by their package's version file, nothing else from packages.
    expect(inputs.filter((p) => p.startsWith('node_modules/'))).toEqual(['node_modules/@tensorflow/tfjs-core/package.json']);
    expect(text).not.toMatch(/from ["']\.{1,2}\//);
    expect(text).toMatch(/from ["']@tensorflow\/tfjs-core["']/);
    expect(text).toContain('tfjs-core/dist/register_all_gradients');
  });
});
