/**
 * Edge lists: CSV or TSV text with a header row naming the source, target and
 * (optionally) weight columns. Lines starting with '#', '%' or '//' are
 * comments; blank lines are skipped. The delimiter is read off the header: a
 * tab, else a comma, else a semicolon, else runs of spaces. Fields may be
 * wrapped in double quotes (a quoted field may not itself hold the delimiter:
 * edge lists of node ids and numbers never need it). Node ids are any
 * non-empty text, numbered in order of first appearance.
 */
import { FileGraphBuilder, numberedLines } from './builder.ts';
import type { FileGraph } from './types.ts';

/** Header names accepted for each endpoint column (case-insensitive), in order of preference. */
export const SOURCE_COLUMNS = ['source', 'from', 'src', 'u', 'node1', 'start'] as const;
export const TARGET_COLUMNS = ['target', 'to', 'dst', 'v', 'node2', 'end'] as const;

function isComment(line: string): boolean {
  const t = line.trimStart();
  return t.startsWith('#') || t.startsWith('%') || t.startsWith('//');
}

function splitter(header: string): { split: (line: string) => string[]; label: string } {
  if (header.includes('\t')) return { split: (l) => l.split('\t'), label: 'a tab' };
  if (header.includes(',')) return { split: (l) => l.split(','), label: "','" };
  if (header.includes(';')) return { split: (l) => l.split(';'), label: "';'" };
  return { split: (l) => l.trim().split(/\s+/), label: 'spaces' };
}

function unquote(field: string): string {
  const t = field.trim();
  return t.length >= 2 && t.startsWith('"') && t.endsWith('"') ? t.slice(1, -1).replaceAll('""', '"') : t;
}

export function readEdgeList(name: string, text: string, options: { weight?: string; directed?: boolean } = {}): FileGraph {
  const weightName = options.weight ?? 'weight';
  const builder: FileGraphBuilder = new FileGraphBuilder(name, 'edge-list', options.directed ?? false);
  let columns: { s: number; t: number; w: number; width: number } | null = null;
  let split: (line: string) => string[] = () => [];
  let label = '';
  for (const [n, line] of numberedLines(text)) {
    if (line.trim() === '' || isComment(line)) continue;
    if (!columns) {
      ({ split, label } = splitter(line));
      const header = split(line).map((h) => unquote(h).toLowerCase());
      const find = (names: readonly string[]) => names.map((c) => header.indexOf(c)).find((i) => i >= 0) ?? -1;
      const s = find(SOURCE_COLUMNS);
      const t = find(TARGET_COLUMNS);
      if (s < 0 || t < 0) {
        builder.fail(
          n,
          `the header (${header.map((h) => `'${h}'`).join(', ')}) must name a source column (${SOURCE_COLUMNS.join(' | ')}) and a target column (${TARGET_COLUMNS.join(' | ')})`,
        );
      }
      const w = header.indexOf(weightName.toLowerCase());
      columns = { s, t, w, width: Math.max(s, t, w) + 1 };
      continue;
    }
    const fields = split(line);
    if (fields.length < columns.width) {
      builder.fail(n, `expected at least ${columns.width} fields separated by ${label}, found ${fields.length}`);
    }
    const a = unquote(fields[columns.s]!);
    const b = unquote(fields[columns.t]!);
    if (a === '' || b === '') builder.fail(n, `empty node id; every row needs a source and a target`);
    let w = NaN;
    if (columns.w >= 0) {
      const raw = unquote(fields[columns.w]!);
      if (raw !== '') {
        w = Number(raw);
        if (!Number.isFinite(w)) builder.fail(n, `weight '${raw}' is not a finite number`);
      }
    }
    builder.edge(builder.node(a, n), builder.node(b, n), w, n);
  }
  if (!columns) builder.fail(null, 'no header row: the first line that is not a comment must name the source, target and weight columns');
  return builder.finish(columns.w >= 0 ? weightName : '');
}
