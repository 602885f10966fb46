/**
 * A graph read from a user's file, in plain numbers. Readers (edge list,
 * DIMACS, GraphML, GEXF) all produce this; `toGraphology` turns it into the
 * graph the tasks read (node keys "0".."n-1", numeric `weight` on every edge).
 * Nodes keep the file's own ids (`ids[i]` is node i's id in the file) so
 * errors, sources and printed samples can speak the file's language.
 */
export const GRAPH_FILE_FORMATS = ['edge-list', 'dimacs', 'graphml', 'gexf'] as const;
export type GraphFileFormat = (typeof GRAPH_FILE_FORMATS)[number];

export interface FileGraph {
  /** The file's name as the user gave it (used in every message). */
  name: string;
  format: GraphFileFormat;
  directed: boolean;
  /** The file's node ids, index = node number. */
  ids: string[];
  /** Edge endpoints as node numbers; weight NaN where the file gives none. */
  src: Int32Array;
  dst: Int32Array;
  weight: Float64Array;
  /** 1-based line of each edge in the file (0 when the format cannot tell). */
  line: Int32Array;
  /** Name of the weight column or attribute that was read. */
  weightName: string;
}

/** How to read one file: everything but the bytes comes from the spec (or the command line). */
export interface GraphFileOptions {
  name: string;
  /** Absent: inferred from the extension (`inferFormat`). */
  format?: GraphFileFormat;
  /** Weight column (edge list) or edge attribute (GraphML, GEXF); default "weight". DIMACS has its own. */
  weight?: string;
  /** Edge lists only: edges are directed source -> target (default false: undirected). */
  directed?: boolean;
}

/**
 * A refusal of a graph file: always names the file, and the line when one is
 * at fault, so a user can open the file at the right place.
 */
export class GraphFileError extends Error {
  constructor(
    readonly file: string,
    readonly line: number | null,
    readonly problem: string,
  ) {
    super(line ? `${file}, line ${line}: ${problem}` : `${file}: ${problem}`);
    this.name = 'GraphFileError';
  }
}

/** A graph-file rung's family label in results: "file:" and the file's base name. */
export function fileRungFamily(file: { name: string }): string {
  return `file:${file.name.replace(/^.*[\\/]/, '')}`;
}
