/**
 * Caps on graph files scored as test rungs (never trained on), kept beside the
 * readers so they hold them without importing the experiment layer; LIMITS in
 * src/experiment/limits.ts spreads them in, and README.md lists them. Nodes and
 * edges as the file states them; bytes of an edge list or DIMACS file; bytes of
 * a GraphML or GEXF file (a parsed XML document costs far more memory per byte
 * than a line of text); files per experiment.
 */
export const GRAPH_FILE_LIMITS = {
  graphFileNodes: { min: 2, max: 100_000 },
  graphFileEdges: { min: 1, max: 1_000_000 },
  graphFileBytes: { max: 64 * 1024 * 1024 },
  graphFileXmlBytes: { max: 16 * 1024 * 1024 },
  graphFiles: { max: 8 },
} as const;
