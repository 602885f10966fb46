/** Registry of graph families: one line per family. */
import type { GraphFamily } from './types.ts';
import { er } from './er.ts';
import { geometric } from './geometric.ts';
import { grid } from './grid.ts';
import { path } from './path.ts';
import { tree } from './tree.ts';
import { dag } from './dag.ts';
import { points } from './points.ts';

export const families: Record<string, GraphFamily> = { er, geometric, grid, path, tree, dag, points };

export function getFamily(id: string): GraphFamily {
  const family = Object.prototype.hasOwnProperty.call(families, id) ? families[id] : undefined;
  if (!family) {
    throw new Error(`graphs/registry: unknown graph family '${id}'; valid ids: ${Object.keys(families).join(', ')}`);
  }
  return family;
}
