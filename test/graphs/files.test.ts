/**
 * Graph-file readers: the 9th DIMACS Implementation Challenge shortest-path
 * format as its format description publishes it, edge lists, GraphML and GEXF
 * through the graphology readers, distances checked against
 * graphology-shortest-path, and every refusal naming file, line and range.
 */
import { describe, expect, it } from 'vitest';
import { graphologyDistances } from '../helpers.ts';
import { readGraphFile, contentHash, inferFormat } from '../../src/graphs/files/read.ts';
import { GraphFileError, type FileGraph } from '../../src/graphs/files/types.ts';
import { GRAPH_FILE_LIMITS } from '../../src/graphs/files/caps.ts';
import { checkFile, fileInstance } from '../../src/tasks/file-instance.ts';
import { getTask } from '../../src/tasks/registry.ts';

const referenceDistances = graphologyDistances; // graphology-shortest-path 2.1

function refusal(run: () => unknown): GraphFileError {
  try {
    run();
  } catch (error) {
    if (error instanceof GraphFileError) return error;
    throw error;
  }
  throw new Error('expected a GraphFileError');
}

/**
 * The sample graph file of the 9th DIMACS Implementation Challenge — Shortest
 * Paths, "Graph format" section of its format description (reproduced from
 * memory: 6 nodes, 8 arcs, comment lines between arcs).
 */
const DIMACS_SAMPLE = `c 9th DIMACS Implementation Challenge: Shortest Paths
c Sample graph file
c
p sp 6 8
c graph contains 6 nodes and 8 arcs
c node ids are numbers in 1..6
c
a 1 2 17
c arc from node 1 to node 2 of weight 17
c
a 1 3 10
a 2 4 2
a 3 5 0
a 4 3 0
a 4 6 3
a 5 2 0
a 5 6 20
`;

describe('DIMACS shortest-path format (9th DIMACS Implementation Challenge format description)', () => {
  it('reads the published sample: p sp n m, directed arcs a u v w, 1-based ids, c comments', () => {
    const g = readGraphFile({ name: 'sample.gr' }, DIMACS_SAMPLE);
    expect(g.format).toBe('dimacs');
    expect(g.directed).toBe(true);
    expect(g.ids).toEqual(['1', '2', '3', '4', '5', '6']);
    expect(Array.from(g.src)).toEqual([0, 0, 1, 2, 3, 3, 4, 4]);
    expect(Array.from(g.dst)).toEqual([1, 2, 3, 4, 2, 5, 1, 5]);
    expect(Array.from(g.weight)).toEqual([17, 10, 2, 0, 0, 3, 0, 20]);
    expect(Array.from(g.line)).toEqual([8, 11, 12, 13, 14, 15, 16, 17]);
  });

  it('solves it: distances from node 1 by hand (1→3 10, 3→5 0, 5→2 0, 2→4 2, 4→6 3) and by graphology-shortest-path', () => {
    const { graph, instance } = fileInstance(getTask('shortest-path'), readGraphFile({ name: 'sample.gr' }, DIMACS_SAMPLE), { source: '1' });
    expect(instance.target).toEqual([0, 10, 10, 12, 10, 15]);
    expect(instance.target).toEqual(referenceDistances(graph, 0));
  });

  it('refuses what the format does not allow, naming file, line and range', () => {
    const bad = (text: string) => refusal(() => readGraphFile({ name: 'x.gr' }, text)).message;
    expect(bad('a 1 2 3\np sp 2 1\n')).toBe("x.gr, line 1: an arc before the problem line; 'p sp <nodes> <arcs>' must come first");
    expect(bad('p sp 3 1\na 1 7 2\n')).toBe('x.gr, line 2: unknown node id 7; allowed 1..3 (the problem line on line 1 declares 3 nodes)');
    expect(bad('p sp 3 1\na 0 2 2\n')).toContain('line 2: unknown node id 0; allowed 1..3');
    expect(bad('p sp 3 2\na 1 2 2\n')).toBe('x.gr, line 1: declares 2 arcs, the file holds 1');
    expect(bad('p sp 3 2\na 1 2 2\na 1 2 5\n')).toBe("x.gr, line 3: duplicate edge '1' -> '2' (first on line 2); each arc may appear once");
    expect(bad('p sp 3 1\na 1 2 2.5\n')).toContain("line 2: expected an arc line 'a <from> <to> <length>' with whole numbers");
    expect(bad('p sp 3 1\ne 1 2\n')).toContain("line 2: unknown line type 'e'; allowed 'c' (comment), 'p' (problem line), 'a' (arc)");
    expect(bad('p sp 3 1\np sp 3 1\n')).toContain('line 2: a second problem line (the first is on line 1)');
    expect(bad('p sp 3 1\na 2 2 1\n')).toContain("line 2: self-loop on node '2'");
    expect(bad(`p sp ${GRAPH_FILE_LIMITS.graphFileNodes.max + 1} 1\n`)).toBe(
      `x.gr, line 1: ${GRAPH_FILE_LIMITS.graphFileNodes.max + 1} nodes; allowed 2..100000 nodes in a graph file`,
    );
    expect(bad(`p sp 4 ${GRAPH_FILE_LIMITS.graphFileEdges.max + 1}\n`)).toBe('x.gr, line 1: 1000001 arcs; allowed 1..1000000 edges in a graph file');
    expect(bad('c nothing here\n')).toBe("x.gr: no problem line; the file must declare 'p sp <nodes> <arcs>'");
  });
});

describe('edge lists', () => {
  const csv = `# a comment, then a blank line

source,target,weight
a,b,2
// another comment
b,c,3
"c","d",1.5
a,d,9
`;
  it('reads a CSV with a header, comments, blank lines and quoted ids; ids numbered in order of appearance', () => {
    const g = readGraphFile({ name: 'roads.csv' }, csv);
    expect(g).toMatchObject({ format: 'edge-list', directed: false, ids: ['a', 'b', 'c', 'd'], weightName: 'weight' });
    expect(Array.from(g.weight)).toEqual([2, 3, 1.5, 9]);
    expect(Array.from(g.line)).toEqual([4, 6, 7, 8]);
    const { graph, instance } = fileInstance(getTask('shortest-path'), g, { source: 'a' });
    expect(instance.target).toEqual([0, 2, 5, 6.5]);
    expect(instance.target).toEqual(referenceDistances(graph, 0)); // graphology-shortest-path 2.1
  });

  it('reads TSV, a named weight column, other endpoint names and directed edges', () => {
    const g = readGraphFile({ name: 'flows.tsv', weight: 'km', directed: true }, 'from\tto\tkm\tnote\nx\ty\t4\tok\ny\tz\t1\t\n');
    expect(g).toMatchObject({ directed: true, ids: ['x', 'y', 'z'], weightName: 'km' });
    expect(Array.from(g.weight)).toEqual([4, 1]);
  });

  it('refuses bad headers, short rows, bad weights and duplicates with file and line', () => {
    const bad = (text: string, task = 'shortest-path') => refusal(() => fileInstance(getTask(task), readGraphFile({ name: 'e.csv' }, text))).message;
    expect(bad('a,b,weight\n1,2,3\n')).toContain("e.csv, line 1: the header ('a', 'b', 'weight') must name a source column (source | from");
    expect(bad('source,target,weight\n1,2\n')).toBe("e.csv, line 2: expected at least 3 fields separated by ',', found 2");
    expect(bad('source,target,weight\n1,2,x\n')).toBe("e.csv, line 2: weight 'x' is not a finite number");
    expect(bad('source,target,weight\n1,2,1\n2,3,\n')).toBe("e.csv, line 3: edge '2' - '3' has no weight 'weight'; task 'shortest-path' needs a non-negative weight on every edge");
    expect(bad('source,target\n1,2\n')).toContain("has no weight (no weight column in the header");
    expect(bad('source,target,weight\n1,2,1\n2,3,-4\n')).toBe("e.csv, line 3: edge '2' - '3' has weight -4; task 'shortest-path' allows weights >= 0");
    expect(bad('source,target,weight\n1,2,1\n2,3,0\n', 'widest-path')).toBe("e.csv, line 3: edge '2' - '3' has weight 0; task 'widest-path' allows weights > 0");
    expect(bad('source,target,weight\n1,2,1\n2,1,4\n')).toBe("e.csv, line 3: duplicate edge '2' - '1' (first on line 2); each edge may appear once");
    expect(bad('# only a comment\n')).toContain('e.csv: no header row');
  });

  it('hop-count reads a file without weights', () => {
    const { instance } = fileInstance(getTask('hop-count'), readGraphFile({ name: 'e.csv' }, 'source,target\n1,2\n2,3\n'), { source: '3' });
    expect(instance.target).toEqual([2, 1, 0]);
  });

  it('refuses a file past the node cap at the first line past it', () => {
    const n = GRAPH_FILE_LIMITS.graphFileNodes.max;
    const rows = ['source,target'];
    for (let i = 0; i < n; i++) rows.push(`${i},${i + 1}`);
    const error = refusal(() => readGraphFile({ name: 'big.csv' }, rows.join('\n')));
    expect(error.message).toBe(`big.csv, line ${n + 1}: more than ${n} nodes; allowed 2..${n} nodes in a graph file`);
  });
});

describe('sources and tasks', () => {
  const g = (): FileGraph => readGraphFile({ name: 'two.csv' }, 'source,target,weight\na,b,1\nc,d,1\n');
  it('refuses an unknown source id, naming the ids allowed', () => {
    expect(refusal(() => fileInstance(getTask('shortest-path'), g(), { source: 'q' })).message).toBe(
      "two.csv: unknown source node id 'q'; allowed one of the file's 4 node ids ('a', 'b', 'c', 'd')",
    );
    expect(refusal(() => fileInstance(getTask('shortest-path'), readGraphFile({ name: 's.gr' }, DIMACS_SAMPLE), { source: '9' })).message).toBe(
      "s.gr: unknown source node id '9'; allowed 1..6",
    );
  });
  it('refuses a disconnected source', () => {
    const directed = readGraphFile({ name: 'd.csv', directed: true }, 'source,target,weight\na,b,1\nc,b,1\n');
    expect(refusal(() => fileInstance(getTask('shortest-path'), directed, { source: 'b' })).message).toBe(
      "d.csv: source 'b' is disconnected: it reaches none of the other 2 nodes along the arcs; allowed a source that reaches at least one other node, e.g. 'a'",
    );
  });
  it('checks without solving: reachability by breadth-first search agrees with the solved mask', () => {
    expect(checkFile(getTask('shortest-path'), g(), { source: 'c' }).reachable).toBe(2);
    const directed = readGraphFile({ name: 'd.csv', directed: true }, 'source,target,weight\na,b,1\nb,c,1\nd,a,1\n');
    expect(checkFile(getTask('shortest-path'), directed, { source: 'a' }).reachable).toBe(3);
    expect(fileInstance(getTask('shortest-path'), directed, { source: 'a' }).reached).toBe(3);
  });
  it('masks nodes the source cannot reach and counts the rest', () => {
    const { instance, reached } = fileInstance(getTask('shortest-path'), g(), { source: 'a' });
    expect(instance.mask).toEqual([1, 1, 0, 0]);
    expect(reached).toBe(2);
  });
  it('refuses tasks that cannot read a file', () => {
    expect(() => fileInstance(getTask('earliest-finish'), g())).toThrow("task 'earliest-finish' cannot be scored on graph files; tasks that can: shortest-path, widest-path, hop-count");
  });
});

const GRAPHML = `<?xml version="1.0" encoding="UTF-8"?>
<graphml xmlns="http://graphml.graphdrawing.org/xmlns">
  <key id="d0" for="edge" attr.name="cost" attr.type="double"/>
  <graph id="G" edgedefault="undirected">
    <node id="n0"/>
    <node id="n1"/>
    <node id="n2"/>
    <node id="n3"/>
    <edge source="n0" target="n1"><data key="d0">4</data></edge>
    <edge source="n1" target="n2"><data key="d0">1</data></edge>
    <edge source="n0" target="n2"><data key="d0">7</data></edge>
    <edge source="n2" target="n3"><data key="d0">2.5</data></edge>
  </graph>
</graphml>
`;

const GEXF = `<?xml version="1.0" encoding="UTF-8"?>
<gexf xmlns="http://gexf.net/1.3" version="1.3">
  <graph defaultedgetype="directed">
    <nodes>
      <node id="0" label="depot"/>
      <node id="1" label="a"/>
      <node id="2" label="b"/>
    </nodes>
    <edges>
      <edge id="0" source="0" target="1" weight="3"/>
      <edge id="1" source="1" target="2" weight="4"/>
      <edge id="2" source="0" target="2" weight="9"/>
    </edges>
  </graph>
</gexf>
`;

describe('GraphML and GEXF through graphology-graphml and graphology-gexf', () => {
  it('GraphML: a named weight attribute, node ids kept, distances as graphology-shortest-path gives them', () => {
    const g = readGraphFile({ name: 'net.graphml', weight: 'cost' }, GRAPHML);
    expect(g).toMatchObject({ format: 'graphml', directed: false, ids: ['n0', 'n1', 'n2', 'n3'] });
    expect(Array.from(g.line)).toEqual([9, 10, 11, 12]);
    const { graph, instance } = fileInstance(getTask('shortest-path'), g, { source: 'n0' });
    expect(instance.target).toEqual([0, 4, 5, 7.5]);
    expect(instance.target).toEqual(referenceDistances(graph, 0));
  });

  it('GEXF: directed edges and their weight attribute', () => {
    const g = readGraphFile({ name: 'net.gexf' }, GEXF);
    expect(g).toMatchObject({ format: 'gexf', directed: true, ids: ['0', '1', '2'] });
    const { graph, instance } = fileInstance(getTask('shortest-path'), g, { source: '0' });
    expect(instance.target).toEqual([0, 3, 7]);
    expect(instance.target).toEqual(referenceDistances(graph, 0));
  });

  it('refuses broken XML, unknown nodes, duplicates and the wrong root with a line', () => {
    const bad = (name: string, text: string) => refusal(() => readGraphFile({ name }, text)).message;
    expect(bad('b.graphml', GRAPHML.slice(0, GRAPHML.indexOf('<edge source="n2"') + 12))).toMatch(/^b\.graphml, line 12: not well-formed XML: /);
    expect(bad('b.graphml', GRAPHML.replace('target="n3"', 'target="n9"'))).toBe(
      "b.graphml, line 12: unknown node id 'n9'; allowed one of the 4 node ids the file declares",
    );
    expect(bad('b.gexf', GEXF.replace('source="0" target="2"', 'source="0" target="1"'))).toBe("b.gexf, line 12: duplicate edge '0' -> '1' (first on line 10); each arc may appear once");
    expect(bad('b.gexf', GRAPHML)).toBe('b.gexf, line 1: the root element is <graphml>, expected <gexf> for a GEXF file');
    expect(bad('b.graphml', 'x'.repeat(GRAPH_FILE_LIMITS.graphFileXmlBytes.max + 1))).toBe(`b.graphml: ${GRAPH_FILE_LIMITS.graphFileXmlBytes.max + 1} bytes; allowed at most 16777216 bytes for a graphml file`);
  });
});

describe('formats and hashes', () => {
  it('infers the format from the extension, or says which extensions it knows', () => {
    expect(inferFormat('a.CSV')).toBe('edge-list');
    expect(inferFormat('roads.gr')).toBe('dimacs');
    expect(() => inferFormat('a.xlsx')).toThrow("a.xlsx: cannot tell the format from the extension '.xlsx'; known: .csv (edge-list)");
  });
  it('refuses bytes that are not UTF-8', () => {
    expect(refusal(() => readGraphFile({ name: 'a.csv' }, new Uint8Array([0xff, 0xfe, 0x00]))).message).toContain('a.csv: not UTF-8 text');
  });
  it('hashes bytes with SHA-256 (FIPS 180-2, appendix B.1: "abc")', async () => {
    expect(await contentHash('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    expect(await contentHash(new TextEncoder().encode('abc'))).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });
});
