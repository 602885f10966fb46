/**
 * What the sheet can offer in its pickers: tasks, graph families and every
 * model switch the engine supports, with a one-line gloss for each choice.
 * Read from the engine's registries, the model catalogue's records (names and
 * hints) and schema constants, so a new task, family or aggregator appears
 * here without touching a component.
 */
import { findTask, tasks, type TaskRef } from '../tasks/registry.ts';
import { recurrenceAlignment } from '../tasks/recurrence/alignment.ts';
import type { Task } from '../tasks/types.ts';
import { families } from '../graphs/registry.ts';
import { LOSSES, METRICS } from '../experiment/spec.ts';
import {
  ACTIVATION_NAMES,
  AGGREGATOR_RECORDS,
  MESSAGE_RECORDS,
  STEP_RULE_RECORDS,
  TRANSFORM_RECORDS,
  UPDATE_RECORDS,
  type OptionRecord,
} from '../model/catalogue.ts';

export interface Choice {
  value: string;
  label: string;
  hint?: string;
}

export interface TaskInfo {
  id: string;
  title: string;
  describe: string;
  alignedAggregator: string;
  alignedStructure: string;
  nodeFeatures: string[];
  edgeFeatures: string[];
  families: string[];
  /** For a recurrence: the aggregator and message layer its ⊕ and ⊗ suggest (one line). */
  suggestion?: string;
}

export interface FamilyInfo {
  id: string;
  title: string;
  minNodes: number;
}

function infoOf(t: Task): TaskInfo {
  return {
    id: t.id,
    title: t.title,
    describe: t.describe,
    alignedAggregator: t.alignedAggregator,
    alignedStructure: t.alignedStructure,
    nodeFeatures: [...t.nodeFeatureNames],
    edgeFeatures: [...t.edgeFeatureNames],
    families: [...t.families],
  };
}

export function taskCatalogue(): TaskInfo[] {
  return Object.values(tasks).map(infoOf);
}

export function familyCatalogue(): FamilyInfo[] {
  return Object.values(families).map((f) => ({ id: f.id, title: f.title, minNodes: f.minNodes }));
}

/** A built-in task by id, or a recurrence built from its object (undefined for an unknown id or a refused combination). */
export function taskInfo(ref: TaskRef): TaskInfo | undefined {
  if (typeof ref === 'string') return taskCatalogue().find((t) => t.id === ref);
  let task: Task | undefined;
  try {
    task = findTask(ref);
  } catch {
    return undefined; // the draft's validation names the field
  }
  return task && { ...infoOf(task), suggestion: recurrenceAlignment(ref.recurrence.semiring).line };
}

const METRIC_LABELS: Record<string, string> = {
  mae: 'mean absolute error',
  mre: 'mean relative error',
  miss: 'share of nodes off by more than 5 %',
};

const choices = (values: readonly string[]): Choice[] => values.map((value) => ({ value, label: value }));
const hinted = (records: readonly OptionRecord[]): Choice[] => records.map((r) => ({ value: r.name, label: r.name, hint: r.hint }));

export const OPTIONS = {
  aggregator: hinted(AGGREGATOR_RECORDS),
  message: hinted(MESSAGE_RECORDS),
  update: hinted(UPDATE_RECORDS),
  activation: choices(ACTIVATION_NAMES),
  transform: hinted(TRANSFORM_RECORDS),
  stepRule: hinted(STEP_RULE_RECORDS),
  metric: METRICS.map((value) => ({ value, label: `${value} — ${METRIC_LABELS[value] ?? value}` })),
  loss: choices(LOSSES),
} as const;

export function metricLabel(metric: string): string {
  return METRIC_LABELS[metric] ?? metric;
}
