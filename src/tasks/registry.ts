/** Registry of tasks: one line per task. */
import type { Task } from './types.ts';
import { shortestPath } from './shortest-path.ts';
import { hopCount } from './hop-count.ts';
import { widestPathTask } from './widest-path.ts';
import { earliestFinishTask } from './earliest-finish.ts';
import { descendantCount } from './descendant-count.ts';
import { chargePotential } from './charge-potential.ts';

export const tasks: Record<string, Task> = {
  'shortest-path': shortestPath,
  'hop-count': hopCount,
  'widest-path': widestPathTask,
  'earliest-finish': earliestFinishTask,
  'descendant-count': descendantCount,
  'charge-potential': chargePotential,
};

export function getTask(id: string): Task {
  const task = Object.prototype.hasOwnProperty.call(tasks, id) ? tasks[id] : undefined;
  if (!task) throw new Error(`tasks/registry: unknown task '${id}'; valid ids: ${Object.keys(tasks).join(', ')}`);
  return task;
}
