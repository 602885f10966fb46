/** Registry of tasks: one line per built-in task, and the recurrence task built from its spec object. */
import type { Task } from './types.ts';
import { shortestPath } from './shortest-path.ts';
import { hopCount } from './hop-count.ts';
import { widestPathTask } from './widest-path.ts';
import { earliestFinishTask } from './earliest-finish.ts';
import { descendantCount } from './descendant-count.ts';
import { chargePotential } from './charge-potential.ts';
import { recurrenceTask } from './recurrence/task.ts';
import { recurrenceLabel, type RecurrenceSpec } from './recurrence/options.ts';

export const tasks: Record<string, Task> = {
  'shortest-path': shortestPath,
  'hop-count': hopCount,
  'widest-path': widestPathTask,
  'earliest-finish': earliestFinishTask,
  'descendant-count': descendantCount,
  'charge-potential': chargePotential,
};

/** What a spec's `task` holds: a built-in task's id, or a recurrence (src/tasks/recurrence/). */
export type TaskRef = string | { recurrence: RecurrenceSpec };

/**
 * The built-in task of that id, or undefined (own keys only: "constructor" must
 * not find Object's); a recurrence's task, which throws for a combination
 * `recurrenceProblems` refuses (the spec checker reports those by field first).
 */
export function findTask(ref: TaskRef): Task | undefined {
  if (typeof ref !== 'string') return recurrenceTask(ref.recurrence);
  return Object.hasOwn(tasks, ref) ? tasks[ref] : undefined;
}

export function getTask(ref: TaskRef): Task {
  const task = findTask(ref);
  if (!task) throw new Error(`tasks/registry: unknown task '${String(ref)}'; valid ids: ${Object.keys(tasks).join(', ')}`);
  return task;
}

/** The task's name for text: the id, or the recurrence's short label. */
export function taskLabel(ref: TaskRef): string {
  return typeof ref === 'string' ? ref : recurrenceLabel(ref.recurrence);
}
