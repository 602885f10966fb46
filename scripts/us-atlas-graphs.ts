/**
 * Real example graphs for graph-file rungs, derived from the `us-atlas`
 * package (ISC licence; its TopoJSON is built from the U.S. Census Bureau's
 * cartographic boundary files, public domain): states or counties that share
 * a border are joined by an edge weighted by the great-circle distance between
 * their centroids, in whole kilometres (mean Earth radius 6,371 km).
 *
 *   npx tsx scripts/us-atlas-graphs.ts     rewrites presets/graphs/us-states.csv and us-counties.gr
 *
 * test/graphs/files-real.test.ts rebuilds both from the package and compares
 * them byte for byte with the shipped files, so the files stay what this says.
 */
import { createRequire } from 'node:module';
import { writeFileSync } from 'node:fs';
import { feature, neighbors } from 'topojson-client';
import { geoCentroid, geoDistance } from 'd3-geo';
import type { Topology, GeometryCollection } from 'topojson-specification';

const require = createRequire(import.meta.url);
const EARTH_KM = 6371;

interface Adjacency {
  ids: string[];
  names: string[];
  /** [i, j, km] with i < j, each border once. */
  edges: Array<[number, number, number]>;
}

function adjacency(topology: Topology, object: string): Adjacency {
  const collection = topology.objects[object] as GeometryCollection<{ name: string }>;
  const geometries = collection.geometries;
  const near = neighbors(geometries as Parameters<typeof neighbors>[0]);
  const centroids = geometries.map((g) => geoCentroid(feature(topology, g)));
  const edges: Array<[number, number, number]> = [];
  near.forEach((list, i) => {
    for (const j of [...list].sort((a, b) => a - b)) {
      if (j > i) edges.push([i, j, Math.max(1, Math.round(geoDistance(centroids[i]!, centroids[j]!) * EARTH_KM))]);
    }
  });
  return { ids: geometries.map((g) => String(g.id)), names: geometries.map((g) => (g.properties as { name?: string } | undefined)?.name ?? ''), edges };
}

/** State borders as a CSV edge list: source and target are state names, weight in km. */
export function usStatesCsv(): string {
  const { names, edges } = adjacency(require('us-atlas/states-10m.json') as Topology, 'states');
  const lines = [
    '# U.S. states (and D.C.) that share a border; weight: great-circle km between centroids.',
    '# Derived from the us-atlas package (ISC; U.S. Census Bureau boundaries, public domain) by scripts/us-atlas-graphs.ts.',
    'source,target,weight',
    ...edges.map(([i, j, km]) => `"${names[i]}","${names[j]}",${km}`),
  ];
  return lines.join('\n') + '\n';
}

/**
 * County borders in the 9th DIMACS Implementation Challenge shortest-path
 * format: only counties with at least one neighbour (islands dropped), node k
 * = the k-th such county in the package's order, each border as two arcs.
 */
export function usCountiesGr(): string {
  const { ids, names, edges } = adjacency(require('us-atlas/counties-10m.json') as Topology, 'counties');
  const used = new Set<number>();
  for (const [i, j] of edges) used.add(i).add(j);
  const order = [...used].sort((a, b) => a - b);
  const number = new Map(order.map((i, k) => [i, k + 1]));
  const lines = [
    'c U.S. counties that share a border; arc length: great-circle km between centroids.',
    'c Derived from the us-atlas package (ISC; U.S. Census Bureau boundaries, public domain) by scripts/us-atlas-graphs.ts.',
    'c Node k is the k-th county with a neighbour in the package order; FIPS codes and names:',
    ...order.map((i) => `c n ${number.get(i)} ${ids[i]} ${names[i]}`),
    `p sp ${order.length} ${edges.length * 2}`,
  ];
  for (const [i, j, km] of edges) lines.push(`a ${number.get(i)} ${number.get(j)} ${km}`, `a ${number.get(j)} ${number.get(i)} ${km}`);
  return lines.join('\n') + '\n';
}

if (process.argv[1] && import.meta.url.endsWith(process.argv[1].replace(/^.*\//, ''))) {
  writeFileSync('presets/graphs/us-states.csv', usStatesCsv());
  writeFileSync('presets/graphs/us-counties.gr', usCountiesGr());
  process.stdout.write('wrote presets/graphs/us-states.csv and presets/graphs/us-counties.gr\n');
}
