/**
 * A real graph from an open data set that an npm package carries: U.S. state
 * and county borders from the `us-atlas` package (ISC licence; TopoJSON built
 * from the U.S. Census Bureau's cartographic boundary files, public domain),
 * weighted by great-circle distance between centroids. The shipped files are
 * rebuilt from the package byte for byte, imported with our readers and solved;
 * distances agree with graphology-shortest-path 2.1's Dijkstra.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { graphologyDistances } from '../helpers.ts';
import { usCountiesGr, usStatesCsv } from '../../scripts/us-atlas-graphs.ts';
import { readGraphFile } from '../../src/graphs/files/read.ts';
import { fileInstance } from '../../src/tasks/file-instance.ts';
import { getTask } from '../../src/tasks/registry.ts';

const shipped = (name: string) => readFileSync(fileURLToPath(new URL(`../../presets/graphs/${name}`, import.meta.url)), 'utf8');

describe('us-atlas borders (ISC; U.S. Census Bureau boundaries, public domain)', () => {
  it('the shipped files are what scripts/us-atlas-graphs.ts derives from the package', () => {
    expect(shipped('us-states.csv')).toBe(usStatesCsv());
    expect(shipped('us-counties.gr')).toBe(usCountiesGr());
  });

  it('states: 48 contiguous states and D.C. (Alaska, Hawaii and the territories share no border), 107 borders', () => {
    const g = readGraphFile({ name: 'us-states.csv' }, shipped('us-states.csv'));
    expect(g.ids).toHaveLength(49);
    expect(g.src).toHaveLength(107);
    // Common knowledge: Missouri and Tennessee each border 8 states, the most of any.
    const degree = (id: string) => {
      const i = g.ids.indexOf(id);
      let d = 0;
      for (let e = 0; e < g.src.length; e++) if (g.src[e] === i || g.dst[e] === i) d++;
      return d;
    };
    expect(degree('Missouri')).toBe(8);
    expect(degree('Tennessee')).toBe(8);
    expect(degree('Maine')).toBe(1);
  });

  for (const [file, source] of [
    ['us-states.csv', 'Kansas'],
    ['us-counties.gr', '2014'],
  ] as const) {
    it(`${file}: shortest-path targets from ${source} equal graphology-shortest-path's Dijkstra`, () => {
      const g = readGraphFile({ name: file }, shipped(file));
      const { graph, instance } = fileInstance(getTask('shortest-path'), g, { source });
      const want = graphologyDistances(graph, instance.source!);
      for (let i = 0; i < graph.order; i++) {
        expect(instance.mask[i]).toBe(Number.isFinite(want[i]) ? 1 : 0);
        expect(instance.target[i]).toBe(Number.isFinite(want[i]) ? want[i] : 0); // integer kilometres: sums are exact
      }
    });
  }

  it('counties: node 2014 is Douglas County, Kansas (FIPS 20045); the contiguous counties are reached, Alaska and Hawaii are not', () => {
    const text = shipped('us-counties.gr');
    expect(text).toContain('c n 2014 20045 Douglas\n');
    const g = readGraphFile({ name: 'us-counties.gr' }, text);
    expect(g.ids).toHaveLength(3216);
    const { reached } = fileInstance(getTask('hop-count'), g, { source: '2014' });
    expect(reached).toBe(3106);
  });
});
