/**
 * The shortest-path graph format of the 9th DIMACS Implementation Challenge
 * (shortest paths, 2005–2006), as its format description states it:
 *
 *   c <text>          comment lines, anywhere
 *   p sp <n> <m>      the problem line, once, before any arc: n nodes, m arcs
 *   a <u> <v> <w>     an arc from node u to node v of length w
 *
 * Node ids are 1..n (node k becomes node number k − 1; every id in 1..n is a
 * node, with or without arcs); arcs are directed (road networks list each
 * direction as its own arc); lengths are integers. The file must hold exactly
 * m arcs. Blank lines are tolerated.
 */
import { FileGraphBuilder, numberedLines } from './builder.ts';
import { GRAPH_FILE_LIMITS as LIMITS } from './caps.ts';
import type { FileGraph } from './types.ts';

const INTEGER = /^[+-]?\d+$/;

export function readDimacs(name: string, text: string): FileGraph {
  const builder: FileGraphBuilder = new FileGraphBuilder(name, 'dimacs', true);
  let problem: { n: number; m: number; line: number } | null = null;
  let arcs = 0;
  for (const [line, raw] of numberedLines(text)) {
    const t = raw.trim();
    if (t === '' || t === 'c' || t.startsWith('c ') || t.startsWith('c\t')) continue;
    const f = t.split(/\s+/);
    if (f[0] === 'p') {
      if (problem) builder.fail(line, `a second problem line (the first is on line ${problem.line}); the format has one 'p sp n m' line`);
      if (f.length !== 4 || f[1] !== 'sp' || !INTEGER.test(f[2]!) || !INTEGER.test(f[3]!)) {
        builder.fail(line, `expected the problem line 'p sp <nodes> <arcs>', found '${t}'`);
      }
      const n = Number(f[2]);
      const m = Number(f[3]);
      if (n < LIMITS.graphFileNodes.min || n > LIMITS.graphFileNodes.max) {
        builder.fail(line, `${n} nodes; allowed ${LIMITS.graphFileNodes.min}..${LIMITS.graphFileNodes.max} nodes in a graph file`);
      }
      if (m < LIMITS.graphFileEdges.min || m > LIMITS.graphFileEdges.max) {
        builder.fail(line, `${m} arcs; allowed ${LIMITS.graphFileEdges.min}..${LIMITS.graphFileEdges.max} edges in a graph file`);
      }
      problem = { n, m, line };
      for (let k = 1; k <= n; k++) builder.node(String(k), line);
      continue;
    }
    if (f[0] === 'a') {
      if (!problem) builder.fail(line, `an arc before the problem line; 'p sp <nodes> <arcs>' must come first`);
      if (f.length !== 4 || !f.slice(1).every((x) => INTEGER.test(x))) {
        builder.fail(line, `expected an arc line 'a <from> <to> <length>' with whole numbers, found '${t}'`);
      }
      const ends = [Number(f[1]), Number(f[2])];
      for (const id of ends) {
        if (id < 1 || id > problem.n) builder.fail(line, `unknown node id ${id}; allowed 1..${problem.n} (the problem line on line ${problem.line} declares ${problem.n} nodes)`);
      }
      arcs++;
      if (arcs > problem.m) builder.fail(line, `more arcs than the ${problem.m} declared on line ${problem.line}`);
      builder.edge(ends[0]! - 1, ends[1]! - 1, Number(f[3]), line);
      continue;
    }
    builder.fail(line, `unknown line type '${f[0]}'; allowed 'c' (comment), 'p' (problem line), 'a' (arc)`);
  }
  if (!problem) builder.fail(null, `no problem line; the file must declare 'p sp <nodes> <arcs>'`);
  if (arcs !== problem.m) builder.fail(problem.line, `declares ${problem.m} arcs, the file holds ${arcs}`);
  return builder.finish('length');
}
