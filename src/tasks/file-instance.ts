/**
 * A graph file as a task instance: which tasks can read a user's graph, what
 * they ask of its weights and source, and the checks that turn a bad file into
 * a message naming the file, the line and the allowed range. The file's graph
 * is fixed (no seed draws it) and the source is stated or the file's first
 * node, so the instance draws nothing: every seed scores the same graph.
 */
import Graph from 'graphology';
import { Rng } from '../util/rng.ts';
import { GraphFileError, type FileGraph } from '../graphs/files/types.ts';
import type { Task, TaskInstance } from './types.ts';

export interface FileTaskRule {
  /** What the task asks of the weights: 'ignored' reads none (missing weights become 1). */
  weights: 'non-negative' | 'positive' | 'ignored';
  /** Whether the task starts from a source node. */
  source: boolean;
}

/**
 * Tasks that make sense on an arbitrary graph from a file. The others need
 * what a file does not carry (positions for charge-potential) or a structure
 * the generator guarantees (a DAG with drawn durations, a rooted tree).
 */
export const FILE_TASK_RULES: Readonly<Record<string, FileTaskRule>> = {
  'shortest-path': { weights: 'non-negative', source: true },
  'widest-path': { weights: 'positive', source: true },
  'hop-count': { weights: 'ignored', source: true },
};

export function fileTaskRule(task: Task): FileTaskRule {
  const rule = task.fileRule ?? (Object.prototype.hasOwnProperty.call(FILE_TASK_RULES, task.id) ? FILE_TASK_RULES[task.id] : undefined);
  if (!rule) {
    throw new Error(`tasks/file-instance: task '${task.id}' cannot be scored on graph files; tasks that can: ${Object.keys(FILE_TASK_RULES).join(', ')}`);
  }
  return rule;
}

/** The node number of the stated source (an id as the file writes it), or the file's first node. */
export function fileSource(file: FileGraph, source: string | undefined): number {
  if (source === undefined) return 0;
  const i = file.ids.indexOf(source);
  if (i >= 0) return i;
  const range =
    file.format === 'dimacs'
      ? `1..${file.ids.length}`
      : `one of the file's ${file.ids.length} node ids (${file.ids
          .slice(0, 5)
          .map((id) => `'${id}'`)
          .join(', ')}${file.ids.length > 5 ? ', …' : ''})`;
  throw new GraphFileError(file.name, null, `unknown source node id '${source}'; allowed ${range}`);
}

/** Refuses missing or out-of-range weights at the line that holds them; returns the weights the task reads. */
export function checkedWeights(file: FileGraph, rule: FileTaskRule, taskId: string): Float64Array {
  if (rule.weights === 'ignored') return file.weight.map((w) => (Number.isFinite(w) ? w : 1));
  const column = file.weightName ? `'${file.weightName}'` : "(no weight column in the header; name it with the file's weight option)";
  for (let e = 0; e < file.weight.length; e++) {
    const w = file.weight[e]!;
    const line = file.line[e] || null;
    const edge = `edge '${file.ids[file.src[e]!]}' ${file.directed ? '->' : '-'} '${file.ids[file.dst[e]!]}'`;
    if (Number.isNaN(w)) throw new GraphFileError(file.name, line, `${edge} has no weight ${column}; task '${taskId}' needs a ${rule.weights} weight on every edge`);
    if (rule.weights === 'non-negative' && w < 0) throw new GraphFileError(file.name, line, `${edge} has weight ${w}; task '${taskId}' allows weights >= 0`);
    if (rule.weights === 'positive' && !(w > 0)) throw new GraphFileError(file.name, line, `${edge} has weight ${w}; task '${taskId}' allows weights > 0`);
  }
  return file.weight;
}

/** The graph the tasks read: node keys "0".."n-1", a numeric `weight` on every edge. */
export function fileToGraph(file: FileGraph, weights: Float64Array): Graph {
  const graph = new Graph({ type: file.directed ? 'directed' : 'undirected', multi: false, allowSelfLoops: false });
  for (let i = 0; i < file.ids.length; i++) graph.addNode(String(i));
  for (let e = 0; e < file.src.length; e++) graph.addEdge(String(file.src[e]), String(file.dst[e]), { weight: weights[e] });
  return graph;
}

/** What a file offers a task, checked without solving: cheap enough for a page's main thread at the caps. */
export interface FileCheck {
  rule: FileTaskRule;
  weights: Float64Array;
  /** Node number of the source, for tasks with one. */
  source: number | undefined;
  /** Nodes the source reaches along the edges (itself included); every node when the task has no source. */
  reachable: number;
}

/** Nodes reachable from `source` along the file's edges (both ways when undirected), by breadth-first search. */
function reachableFrom(file: FileGraph, source: number): number {
  const n = file.ids.length;
  const both = !file.directed;
  const start = new Int32Array(n + 1);
  for (let e = 0; e < file.src.length; e++) {
    start[file.src[e]! + 1]!++;
    if (both) start[file.dst[e]! + 1]!++;
  }
  for (let i = 0; i < n; i++) start[i + 1]! += start[i]!;
  const next = start.slice(0, n);
  const to = new Int32Array(start[n]!);
  for (let e = 0; e < file.src.length; e++) {
    to[next[file.src[e]!]!++] = file.dst[e]!;
    if (both) to[next[file.dst[e]!]!++] = file.src[e]!;
  }
  const seen = new Uint8Array(n);
  const queue = new Int32Array(n);
  let head = 0;
  let tail = 0;
  queue[tail++] = source;
  seen[source] = 1;
  while (head < tail) {
    const u = queue[head++]!;
    for (let k = start[u]!; k < start[u + 1]!; k++) {
      const v = to[k]!;
      if (!seen[v]) {
        seen[v] = 1;
        queue[tail++] = v;
      }
    }
  }
  return tail;
}

/**
 * The task's rule, its weights and its source, each refused with file and line
 * where wrong, and a source that reaches no other node refused as disconnected.
 */
export function checkFile(task: Task, file: FileGraph, options: { source?: string } = {}): FileCheck {
  const rule = fileTaskRule(task);
  const weights = checkedWeights(file, rule, task.id);
  const source = rule.source ? fileSource(file, options.source) : undefined;
  const reachable = source === undefined ? file.ids.length : reachableFrom(file, source);
  if (source !== undefined && reachable < 2) {
    const hint = file.ids[file.src[0]!]!;
    throw new GraphFileError(
      file.name,
      null,
      `source '${file.ids[source]}' is disconnected: it reaches none of the other ${file.ids.length - 1} nodes${file.directed ? ' along the arcs' : ''}; allowed a source that reaches at least one other node, e.g. '${hint}'`,
    );
  }
  return { rule, weights, source, reachable };
}

export interface FileInstance {
  graph: Graph;
  instance: TaskInstance;
  /** Nodes the task counts (mask 1), e.g. those the source reaches. */
  reached: number;
}

export function fileInstance(task: Task, file: FileGraph, options: { source?: string } = {}): FileInstance {
  const { weights, source } = checkFile(task, file, options);
  const graph = fileToGraph(file, weights);
  // The instance draws nothing once the source is fixed; the stream is there only to satisfy the signature.
  let instance: TaskInstance;
  try {
    instance = task.instance(graph, { rng: new Rng(0).fork('file'), weightScale: 1, source });
  } catch (error) {
    throw new GraphFileError(file.name, null, `task '${task.id}': ${error instanceof Error ? error.message : String(error)}`);
  }
  let reached = 0;
  for (const m of instance.mask) reached += m;
  return { graph, instance, reached };
}
