/**
 * Node-only: graph files for `farfield run` and `farfield sample`. Files named
 * in a preset's `test.files` resolve relative to the preset file; `--graphs`
 * paths relative to the working directory. Each file is size-checked before
 * it is read, hashed (SHA-256 of its bytes), matched against the hash the spec
 * records (a share link carries the hash, never the content), and read once
 * here so a bad file stops the command before any worker starts.
 */
import { open } from 'node:fs/promises';
import { basename, dirname, resolve } from 'node:path';
import { UsageError } from './args.ts';
import { checkSpec } from '../experiment/check.ts';
import type { ExperimentSpec, GraphFileSpec } from '../experiment/spec.ts';
import { fileRung, type FileRungInfo, type GraphFileContent } from '../experiment/file-rungs.ts';
import { byteCap, contentHash, inferFormat, readGraphFile } from '../graphs/files/read.ts';
import { checkedWeights, fileTaskRule, fileToGraph } from '../tasks/file-instance.ts';
import { sampledGraph, type Sample } from '../tasks/sample.ts';
import { GRAPH_FILE_LIMITS } from '../graphs/files/caps.ts';
import { GraphFileError } from '../graphs/files/types.ts';
import { getTask, type TaskRef } from '../tasks/registry.ts';

/** Read a file whole, refusing it (with the cap) before reading when it is larger than its format allows. */
export async function readGraphBytes(path: string, shownAs: string, cap: number): Promise<Uint8Array> {
  let handle;
  try {
    handle = await open(path, 'r');
  } catch (error) {
    const code = (error as { code?: string }).code;
    throw new GraphFileError(shownAs, null, code === 'ENOENT' ? `no such file (looked for ${path})` : `cannot be read (${code ?? String(error)})`);
  }
  try {
    const info = await handle.stat();
    if (info.isDirectory()) throw new GraphFileError(shownAs, null, 'is a directory, not a graph file');
    if (info.size > cap) throw new GraphFileError(shownAs, null, `${info.size} bytes; allowed at most ${cap} bytes for this format`);
    const buffer = new Uint8Array(info.size);
    let total = 0;
    while (total < buffer.length) {
      const { bytesRead } = await handle.read(buffer, total, buffer.length - total, null);
      if (bytesRead === 0) break;
      total += bytesRead;
    }
    return buffer.subarray(0, total);
  } finally {
    await handle.close().catch(() => undefined);
  }
}

/** `--graphs a.gr,b.csv`: the paths, refused when empty or too many. */
export function graphsFlag(value: string | undefined): string[] {
  if (value === undefined) return [];
  const paths = value.split(',').map((p) => p.trim());
  if (paths.some((p) => p === '')) throw new UsageError(`--graphs: got "${value}", allowed comma-separated file paths`);
  return paths;
}

export interface AttachedFiles {
  /** The spec with every file's sha256 filled in (and `--graphs` files appended). */
  spec: ExperimentSpec;
  /** The files' content, for the runs' plans. */
  files: GraphFileContent[];
}

/**
 * Read every graph file the spec names plus those given with `--graphs`. A
 * `--graphs` file whose base name or hash matches a spec file supplies that
 * file's content (how a colleague runs a shared link); any other is added as a
 * new file rung.
 */
export async function attachGraphFiles(spec: ExperimentSpec, presetPath: string | null, extra: readonly string[]): Promise<AttachedFiles> {
  const given = await Promise.all(
    extra.map(async (path) => {
      const bytes = await readGraphBytes(resolve(path), path, byteCap(inferFormat(path)));
      return { path, bytes, sha256: await contentHash(bytes) };
    }),
  );
  const used = new Set<number>();
  const files: GraphFileContent[] = [];
  const entries: GraphFileSpec[] = [];
  for (const file of spec.test.files ?? []) {
    const match = given.findIndex((g, i) => !used.has(i) && (g.sha256 === file.sha256 || basename(g.path) === basename(file.name)));
    let bytes: Uint8Array;
    let sha256: string;
    if (match >= 0) {
      used.add(match);
      ({ bytes, sha256 } = given[match]!);
    } else {
      if (!presetPath) {
        throw new GraphFileError(file.name, null, `the link names this graph file (sha256 ${file.sha256?.slice(0, 12) ?? '?'}…) but does not carry it; give it with --graphs PATH`);
      }
      const path = resolve(dirname(presetPath), file.name);
      bytes = await readGraphBytes(path, file.name, byteCap(file.format ?? inferFormat(file.name)));
      sha256 = await contentHash(bytes);
    }
    if (file.sha256 && file.sha256 !== sha256) {
      throw new GraphFileError(file.name, null, `does not match the recorded content hash: the spec says sha256 ${file.sha256.slice(0, 12)}…, this file is ${sha256.slice(0, 12)}… (a different or edited file)`);
    }
    entries.push({ ...file, sha256 });
    files.push({ sha256, content: bytes });
  }
  given.forEach((g, i) => {
    if (used.has(i)) return;
    entries.push({ name: g.path, sha256: g.sha256 });
    files.push({ sha256: g.sha256, content: g.bytes });
  });
  if (entries.length === 0) return { spec, files };
  if (entries.length > GRAPH_FILE_LIMITS.graphFiles.max) throw new UsageError(`graph files: ${entries.length}, allowed at most ${GRAPH_FILE_LIMITS.graphFiles.max}`);
  const checked = checkSpec({ ...spec, test: { ...spec.test, files: entries } });
  // Read each file once now: a malformed file stops here with its line, before any worker starts.
  const task = getTask(checked.task);
  for (const file of checked.test.files ?? []) fileRung(task, file, files);
  return { spec: checked, files };
}

/**
 * `farfield sample --task T --graphs FILE [--source ID]`: the file's graph with
 * its exact targets, in the JSON of generated samples (`sampledGraph`), plus
 * the file's node ids (`ids`, index = node number) and what was read. The file
 * draws nothing, so there is no seed (null); weightRange is the file's own.
 */
export async function sampleFile(taskId: TaskRef, path: string, options: { source?: string; weight?: string; directed?: boolean }): Promise<FileSample> {
  const paths = graphsFlag(path);
  if (paths.length !== 1) throw new UsageError(`--graphs: sample reads one file, got ${paths.length}`);
  const bytes = await readGraphBytes(resolve(path), path, byteCap(inferFormat(path)));
  const sha256 = await contentHash(bytes);
  const file: GraphFileSpec = { name: path, sha256, ...(options.weight ? { weight: options.weight } : {}), ...(options.source ? { source: options.source } : {}), ...(options.directed ? { directed: true } : {}) };
  const task = getTask(taskId);
  const rung = fileRung(task, file, [{ sha256, content: bytes }]);
  const graph = readGraphFile({ name: path, weight: options.weight, directed: options.directed }, bytes);
  const entry = { ...sampledGraph(task.id, fileToGraph(graph, checkedWeights(graph, fileTaskRule(task), task.id)), rung.instance), ids: graph.ids };
  let lo = Infinity;
  let hi = -Infinity;
  for (const [, , w] of entry.edges) {
    lo = Math.min(lo, w);
    hi = Math.max(hi, w);
  }
  return { task: task.id, family: rung.family, file: rung.info, seed: null, weightRange: [lo, hi], weightScale: 1, graphs: [entry] };
}

export interface FileSample extends Omit<Sample, 'seed'> {
  seed: null;
  file: FileRungInfo;
}
