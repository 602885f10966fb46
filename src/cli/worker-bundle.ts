/**
 * The Node worker as one prebuilt JavaScript file instead of TypeScript loaded
 * through tsx. Why: tsx's loader hooks cost each worker about 1.4 s of CPU to
 * start (register, resolve and transform every module on the shared loader
 * thread), which two workers starting together pay on two busy cores.
 *
 * The bundle holds the project's own modules and tfjs-core's ESM gradient
 * modules (so a worker registers gradients as the browser does, instead of
 * loading the whole tfjs umbrella: another ~0.3 s). Every other package stays
 * an import and loads from node_modules as before.
 *
 * It is rebuilt whenever an input changes: its first line records a content
 * hash of every project file esbuild read (and of the inlined package's
 * package.json). Checking costs a read of ~50 small files; building ~0.3 s, once.
 */
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type { Plugin } from 'esbuild';

export interface WorkerBundleOptions {
  /** Project root: entry and recorded inputs are relative to it. */
  root: string;
  /** Entry module, relative to root. */
  entry: string;
  /** Where the bundle is written; must sit under root's node_modules so package imports resolve. */
  outFile: string;
}

export type WorkerBundleResult =
  | { status: 'reused' | 'built'; file: string }
  | { status: 'unavailable'; reason: string };

const HEADER = '// farfield-worker-inputs ';

const projectRoot = fileURLToPath(new URL('../../', import.meta.url));

export const DEFAULT_BUNDLE: WorkerBundleOptions = {
  root: projectRoot,
  entry: 'workers/node-worker.ts',
  outFile: path.join(projectRoot, 'node_modules', '.cache', 'farfield', 'node-worker.mjs'),
};

/** The tsx-loaded entry, used when no bundle can be built (e.g. a read-only install). */
export const TSX_WORKER_ENTRY = new URL('../../workers/node-worker.mjs', import.meta.url);

function hashFile(file: string): string | null {
  try {
    return createHash('sha256').update(fs.readFileSync(file)).digest('hex').slice(0, 16);
  } catch {
    return null;
  }
}

function recordedInputs(outFile: string): Record<string, string> | null {
  let head: string;
  try {
    const fd = fs.openSync(outFile, 'r');
    try {
      const buf = Buffer.alloc(64 * 1024);
      const n = fs.readSync(fd, buf, 0, buf.length, 0);
      head = buf.subarray(0, n).toString('utf8');
    } finally {
      fs.closeSync(fd);
    }
  } catch {
    return null;
  }
  const end = head.indexOf('\n');
  if (!head.startsWith(HEADER) || end < 0) return null;
  try {
    const parsed: unknown = JSON.parse(head.slice(HEADER.length, end));
    if (parsed == null || typeof parsed !== 'object' || Array.isArray(parsed)) return null;
    return parsed as Record<string, string>;
  } catch {
    return null;
  }
}

/** True when the bundle exists and every input it recorded still has the same content. */
export function bundleIsFresh(options: WorkerBundleOptions): boolean {
  const inputs = recordedInputs(options.outFile);
  if (inputs == null || Object.keys(inputs).length === 0) return false;
  return Object.entries(inputs).every(([rel, hash]) => hashFile(path.join(options.root, rel)) === hash);
}

const INLINED_PACKAGE_PATHS = /^@tensorflow\/tfjs-core\/dist\//;

const packagesExceptGradients: Plugin = {
  name: 'packages-except-gradients',
  setup(build) {
    build.onResolve({ filter: /^[^./]/ }, (args) => (INLINED_PACKAGE_PATHS.test(args.path) ? undefined : { path: args.path, external: true }));
  },
};

/**
 * What to hash for freshness: every project file read, and for inlined package
 * files only their package's package.json (its version), not hundreds of files.
 */
function recordKeys(inputs: readonly string[]): string[] {
  const keys = new Set<string>();
  for (const rel of inputs) {
    const inPackage = /^(.*node_modules\/(?:@[^/]+\/)?[^/]+)\//.exec(rel);
    keys.add(inPackage ? `${inPackage[1]}/package.json` : rel);
  }
  return [...keys].sort();
}

async function build(options: WorkerBundleOptions): Promise<void> {
  const esbuild = await import('esbuild');
  const result = await esbuild.build({
    absWorkingDir: options.root,
    entryPoints: [options.entry],
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    // Packages stay imports, except tfjs-core's ESM gradient modules (see
    // src/engine/backend.ts), which Node cannot load by itself.
    plugins: [packagesExceptGradients],
    define: { FARFIELD_BUNDLED_GRADIENTS: 'true' },
    write: false,
    metafile: true,
    logLevel: 'silent',
  });
  const inputs: Record<string, string> = {};
  for (const rel of recordKeys(Object.keys(result.metafile.inputs))) {
    const hash = hashFile(path.join(options.root, rel));
    if (hash == null) throw new Error(`input ${rel} vanished while bundling`);
    inputs[rel] = hash;
  }
  const code = result.outputFiles[0]?.text;
  if (code == null) throw new Error('esbuild wrote no output');
  fs.mkdirSync(path.dirname(options.outFile), { recursive: true });
  // Write then rename, so a CLI started alongside never loads half a file.
  const tmp = `${options.outFile}.${process.pid}.${Date.now()}.tmp`;
  fs.writeFileSync(tmp, `${HEADER}${JSON.stringify(inputs)}\n${code}`);
  fs.renameSync(tmp, options.outFile);
}

/** Reuse the bundle if fresh, else build it; never throws (the caller falls back to tsx). */
export async function ensureWorkerBundle(options: WorkerBundleOptions = DEFAULT_BUNDLE): Promise<WorkerBundleResult> {
  if (bundleIsFresh(options)) return { status: 'reused', file: options.outFile };
  try {
    await build(options);
    return { status: 'built', file: options.outFile };
  } catch (error) {
    return { status: 'unavailable', reason: error instanceof Error ? error.message : String(error) };
  }
}

let resolvedEntry: Promise<URL> | null = null;

/** The file a Node engine worker starts from: the fresh bundle, or the tsx entry if none can be had. */
export function nodeWorkerEntry(): Promise<URL> {
  resolvedEntry ??= ensureWorkerBundle().then((r) => (r.status === 'unavailable' ? TSX_WORKER_ENTRY : pathToFileURL(r.file)));
  return resolvedEntry;
}
