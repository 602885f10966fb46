/**
 * Shared by every reader: numbering node ids, refusing duplicate edges and
 * self-loops, and holding the node and edge caps while the file is read (so a
 * file far over a cap stops at the first line past it, not after parsing it all).
 */
import { GRAPH_FILE_LIMITS as LIMITS } from './caps.ts';
import { GraphFileError, type FileGraph, type GraphFileFormat } from './types.ts';

export class FileGraphBuilder {
  readonly ids: string[] = [];
  private readonly index = new Map<string, number>();
  private readonly src: number[] = [];
  private readonly dst: number[] = [];
  private readonly weight: number[] = [];
  private readonly line: number[] = [];
  /** Edge key -> line where it first appeared; u·N + v with N above the node cap, so keys are exact integers. */
  private readonly seen = new Map<number, number>();

  constructor(
    readonly name: string,
    readonly format: GraphFileFormat,
    readonly directed: boolean,
  ) {}

  fail(line: number | null, problem: string): never {
    throw new GraphFileError(this.name, line, problem);
  }

  get nodeCount(): number {
    return this.ids.length;
  }

  has(id: string): boolean {
    return this.index.has(id);
  }

  indexOf(id: string): number | undefined {
    return this.index.get(id);
  }

  /** The node number of `id`, adding it when new (the cap is checked here). */
  node(id: string, line: number | null): number {
    const known = this.index.get(id);
    if (known !== undefined) return known;
    if (this.ids.length >= LIMITS.graphFileNodes.max) {
      this.fail(line, `more than ${LIMITS.graphFileNodes.max} nodes; allowed ${LIMITS.graphFileNodes.min}..${LIMITS.graphFileNodes.max} nodes in a graph file`);
    }
    const i = this.ids.length;
    this.ids.push(id);
    this.index.set(id, i);
    return i;
  }

  edge(u: number, v: number, w: number, line: number): void {
    if (u === v) this.fail(line, `self-loop on node '${this.ids[u]}'; a graph file may not have edges from a node to itself`);
    if (this.src.length >= LIMITS.graphFileEdges.max) {
      this.fail(line, `more than ${LIMITS.graphFileEdges.max} edges; allowed ${LIMITS.graphFileEdges.min}..${LIMITS.graphFileEdges.max} edges in a graph file`);
    }
    const N = LIMITS.graphFileNodes.max + 1;
    const [a, b] = this.directed || u < v ? [u, v] : [v, u];
    const key = a * N + b;
    const first = this.seen.get(key);
    if (first !== undefined) {
      const arrow = this.directed ? '->' : '-';
      this.fail(line, `duplicate edge '${this.ids[u]}' ${arrow} '${this.ids[v]}' (first on line ${first}); each ${this.directed ? 'arc' : 'edge'} may appear once`);
    }
    this.seen.set(key, line);
    this.src.push(u);
    this.dst.push(v);
    this.weight.push(w);
    this.line.push(line);
  }

  finish(weightName: string): FileGraph {
    if (this.ids.length < LIMITS.graphFileNodes.min) {
      this.fail(null, `${this.ids.length} node(s); allowed ${LIMITS.graphFileNodes.min}..${LIMITS.graphFileNodes.max} nodes in a graph file`);
    }
    if (this.src.length < LIMITS.graphFileEdges.min) {
      this.fail(null, `no edges; allowed ${LIMITS.graphFileEdges.min}..${LIMITS.graphFileEdges.max} edges in a graph file`);
    }
    return {
      name: this.name,
      format: this.format,
      directed: this.directed,
      ids: this.ids,
      src: Int32Array.from(this.src),
      dst: Int32Array.from(this.dst),
      weight: Float64Array.from(this.weight),
      line: Int32Array.from(this.line),
      weightName,
    };
  }
}

/** Lines with their 1-based numbers, without the line break (LF or CRLF). */
export function* numberedLines(text: string): Generator<[number, string]> {
  let start = 0;
  let n = 1;
  while (start <= text.length) {
    let end = text.indexOf('\n', start);
    if (end < 0) end = text.length;
    const raw = text.slice(start, end);
    yield [n, raw.endsWith('\r') ? raw.slice(0, -1) : raw];
    n++;
    start = end + 1;
  }
}
