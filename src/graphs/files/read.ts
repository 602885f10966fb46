/**
 * The one entry point for reading a graph file: check the byte cap, decode the
 * bytes as UTF-8, pick the reader by the stated format or the extension.
 * Host-agnostic: the CLI passes bytes read from disk, the sheet bytes from a
 * dropped or picked file.
 */
import { GRAPH_FILE_LIMITS as LIMITS } from './caps.ts';
import { readDimacs } from './dimacs.ts';
import { readEdgeList } from './edge-list.ts';
import { readXmlGraph } from './xml.ts';
import { GraphFileError, GRAPH_FILE_FORMATS, type FileGraph, type GraphFileFormat, type GraphFileOptions } from './types.ts';

const EXTENSIONS: Record<string, GraphFileFormat> = {
  csv: 'edge-list',
  tsv: 'edge-list',
  txt: 'edge-list',
  edges: 'edge-list',
  gr: 'dimacs',
  dimacs: 'dimacs',
  graphml: 'graphml',
  gexf: 'gexf',
};

/** The format a file name's extension stands for, or a clear error listing the known ones. */
export function inferFormat(name: string): GraphFileFormat {
  const ext = /\.([A-Za-z0-9]+)$/.exec(name)?.[1]?.toLowerCase() ?? '';
  const format = EXTENSIONS[ext];
  if (!format) {
    throw new GraphFileError(
      name,
      null,
      `cannot tell the format from the extension '${ext ? `.${ext}` : '(none)'}'; known: ${Object.entries(EXTENSIONS)
        .map(([e, f]) => `.${e} (${f})`)
        .join(', ')}; or state the format (${GRAPH_FILE_FORMATS.join(' | ')})`,
    );
  }
  return format;
}

export function byteCap(format: GraphFileFormat): number {
  return format === 'graphml' || format === 'gexf' ? LIMITS.graphFileXmlBytes.max : LIMITS.graphFileBytes.max;
}

/** Read a graph file from its bytes (or already-decoded text). */
export function readGraphFile(options: GraphFileOptions, content: Uint8Array | string): FileGraph {
  const { name } = options;
  const format = options.format ?? inferFormat(name);
  const size = typeof content === 'string' ? content.length : content.byteLength;
  const cap = byteCap(format);
  if (size > cap) throw new GraphFileError(name, null, `${size} bytes; allowed at most ${cap} bytes for a ${format} file`);
  let text: string;
  if (typeof content === 'string') text = content;
  else {
    try {
      text = new TextDecoder('utf-8', { fatal: true }).decode(content);
    } catch {
      throw new GraphFileError(name, null, 'not UTF-8 text; graph files are text (edge list, DIMACS, GraphML, GEXF)');
    }
  }
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  switch (format) {
    case 'edge-list':
      return readEdgeList(name, text, { weight: options.weight, directed: options.directed });
    case 'dimacs':
      return readDimacs(name, text);
    case 'graphml':
    case 'gexf':
      return readXmlGraph(name, text, format, { weight: options.weight });
  }
}

/** SHA-256 of the file's bytes, lowercase hex (crypto.subtle: Node 20 and every browser have it). */
export async function contentHash(content: Uint8Array | string): Promise<string> {
  const bytes = typeof content === 'string' ? new TextEncoder().encode(content) : content;
  const digest = await crypto.subtle.digest('SHA-256', bytes as Uint8Array<ArrayBuffer>);
  return Array.from(new Uint8Array(digest), (b) => b.toString(16).padStart(2, '0')).join('');
}
