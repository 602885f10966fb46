/**
 * Graph files as rungs: each file named in `test.files` is scored as one more
 * rung after the generated ones, on every run. The content comes from the host
 * (the CLI reads it from disk, the sheet from a dropped file) on the run's
 * plan, matched to the spec by its SHA-256; the spec never holds it. The
 * file's instance draws nothing, so it is built once per worker and reused by
 * every run (a small cache keyed by content and reading options).
 */
import type { GraphFileSpec } from './spec.ts';
import type { Task, TaskInstance } from '../tasks/types.ts';
import { readGraphFile } from '../graphs/files/read.ts';
import { fileInstance } from '../tasks/file-instance.ts';
import { fileRungFamily } from '../graphs/files/types.ts';

export { fileRungFamily };

/** A file's bytes as the host supplies them to a run. */
export interface GraphFileContent {
  sha256: string;
  /** The file's text (UTF-8 decoded by the host) or its bytes. */
  content: string | Uint8Array;
}

/** What a result records about the file of a rung. */
export interface FileRungInfo {
  name: string;
  sha256: string;
  nodes: number;
  /** Edges as the file lists them (an undirected edge once). */
  edges: number;
  directed: boolean;
  /** Source node id as the file writes it, for tasks with one. */
  source?: string;
  /** Nodes the task counts (mask 1), e.g. those the source reaches. */
  counted: number;
}

export interface FileRung {
  family: string;
  instance: TaskInstance;
  info: FileRungInfo;
}


const cache = new Map<string, FileRung>();
const CACHE_ENTRIES = 4;

function cacheKey(task: Task, file: GraphFileSpec): string {
  return JSON.stringify([task.id, file.sha256, file.name, file.format, file.weight, file.source, file.directed]);
}

/** Build (or reuse) the rung of one spec file from the content the host supplied. */
export function fileRung(task: Task, file: GraphFileSpec, contents: readonly GraphFileContent[] | undefined): FileRung {
  if (!file.sha256) throw new Error(`experiment/file-rungs: graph file '${file.name}' has no content hash; the host must read the file and record its sha256 first`);
  const key = cacheKey(task, file);
  const hit = cache.get(key);
  if (hit) return hit;
  const supplied = contents?.find((c) => c.sha256 === file.sha256);
  if (!supplied) throw new Error(`experiment/file-rungs: the content of graph file '${file.name}' (sha256 ${file.sha256.slice(0, 12)}…) was not supplied to the run`);
  const graph = readGraphFile({ name: file.name, format: file.format, weight: file.weight, directed: file.directed }, supplied.content);
  const { instance, reached } = fileInstance(task, graph, { source: file.source });
  const rung: FileRung = {
    family: fileRungFamily(file),
    instance,
    info: {
      name: file.name,
      sha256: file.sha256,
      nodes: graph.ids.length,
      edges: graph.src.length,
      directed: graph.directed,
      ...(instance.source !== undefined ? { source: graph.ids[instance.source]! } : {}),
      counted: reached,
    },
  };
  if (cache.size >= CACHE_ENTRIES) cache.delete(cache.keys().next().value!);
  cache.set(key, rung);
  return rung;
}
