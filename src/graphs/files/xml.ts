/**
 * GraphML and GEXF through the graphology standard library's readers
 * (graphology-graphml, graphology-gexf). We parse the XML ourselves with
 * @xmldom/xmldom — pure JavaScript, so the same code runs in Node, the page
 * and Web Workers, which have no DOMParser — to turn XML errors into a
 * file-and-line message and to know each edge element's line; the document is
 * then handed to graphology's reader, which accepts a parsed document. Edges
 * arrive in document order, so edge k is the k-th <edge> element.
 */
import Graph from 'graphology';
import { DOMParser } from '@xmldom/xmldom';
import { parse as parseGraphml } from 'graphology-graphml';
import { parse as parseGexf } from 'graphology-gexf';
import { FileGraphBuilder } from './builder.ts';
import { GraphFileError, type FileGraph } from './types.ts';

interface Located {
  lineNumber?: number;
}

/**
 * xmldom 0.8 is lenient and, on a broken document, reports a cascade of
 * "Hierarchy request" errors before the real one; we report the first other
 * error, else the first warning (a well-formed document raises none), else the
 * first of the cascade.
 */
function parseXml(name: string, text: string): Document {
  const problems: Array<{ kind: 'warning' | 'error'; message: string; line: number | null }> = [];
  const note = (kind: 'warning' | 'error') => (message: string) => {
    const m = /@#\[line:(\d+),col:\d+\]/.exec(message);
    const clean = message.replace(/^\[xmldom \w+\]\s*/, '').replace(/\s*@#\[line:\d+,col:\d+\]\s*$/, '').trim();
    problems.push({ kind, message: clean, line: m ? Number(m[1]) : null });
  };
  const parser = new DOMParser({ locator: {}, errorHandler: { warning: note('warning'), error: note('error'), fatalError: note('error') } });
  let doc: Document | null = null;
  try {
    doc = parser.parseFromString(text, 'application/xml');
  } catch (error) {
    note('error')(error instanceof Error ? error.message : String(error));
  }
  const cascade = (p: { message: string }) => p.message.includes('Hierarchy request error');
  const problem =
    problems.find((p) => p.kind === 'error' && !cascade(p)) ?? problems.find((p) => p.kind === 'warning') ?? problems[0];
  if (problem || !doc) throw new GraphFileError(name, problem?.line ?? null, `not well-formed XML: ${problem?.message ?? 'no document'}`);
  return doc;
}

function elementLines(doc: Document, tag: string): Array<{ line: number; element: Element }> {
  const list = doc.getElementsByTagName(tag);
  const out: Array<{ line: number; element: Element }> = [];
  for (let i = 0; i < list.length; i++) {
    const element = list.item(i)!;
    out.push({ line: (element as unknown as Located).lineNumber ?? 0, element });
  }
  return out;
}

/** The first <edge> whose endpoint is not a declared node, for a message with its line. */
function unknownEndpoint(doc: Document): { line: number; id: string; nodes: number } | null {
  const declared = new Set(elementLines(doc, 'node').map(({ element }) => element.getAttribute('id') ?? ''));
  for (const { line, element } of elementLines(doc, 'edge')) {
    for (const end of ['source', 'target']) {
      const id = element.getAttribute(end) ?? '';
      if (!declared.has(id)) return { line, id, nodes: declared.size };
    }
  }
  return null;
}

export function readXmlGraph(name: string, text: string, format: 'graphml' | 'gexf', options: { weight?: string } = {}): FileGraph {
  const weightName = options.weight ?? 'weight';
  const doc = parseXml(name, text);
  const root = doc.documentElement?.tagName?.toLowerCase() ?? '';
  if (root !== format) throw new GraphFileError(name, 1, `the root element is <${root}>, expected <${format}> for a ${format === 'graphml' ? 'GraphML' : 'GEXF'} file`);
  let graph: Graph;
  try {
    graph = format === 'graphml' ? (parseGraphml(Graph, doc) as unknown as Graph) : (parseGexf(Graph, doc) as unknown as Graph);
  } catch (error) {
    const missing = unknownEndpoint(doc);
    if (missing) throw new GraphFileError(name, missing.line, `unknown node id '${missing.id}'; allowed one of the ${missing.nodes} node ids the file declares`);
    throw new GraphFileError(name, null, `the ${format} reader refused the file: ${error instanceof Error ? error.message : String(error)}`);
  }
  if (graph.type === 'mixed') throw new GraphFileError(name, null, 'mixes directed and undirected edges; a graph file must be all one or the other');
  const builder: FileGraphBuilder = new FileGraphBuilder(name, format, graph.type === 'directed');
  const nodeLines = elementLines(doc, 'node');
  graph.forEachNode((key) => {
    builder.node(key, nodeLines[builder.nodeCount]?.line ?? null);
  });
  const edgeLines = elementLines(doc, 'edge');
  let k = 0;
  graph.forEachEdge((_edge, attr, s, t) => {
    const line = edgeLines[k++]?.line ?? 0;
    const raw: unknown = attr[weightName];
    let w = NaN;
    if (raw !== undefined && raw !== null && raw !== '') {
      w = typeof raw === 'number' ? raw : Number(raw);
      if (!Number.isFinite(w)) builder.fail(line, `edge '${s}' - '${t}': ${weightName} '${String(raw)}' is not a finite number`);
    }
    builder.edge(builder.node(s, line), builder.node(t, line), w, line);
  });
  return builder.finish(weightName);
}
