/**
 * What the sheet can offer in its pickers: tasks, graph families and every
 * model switch the engine supports, with a one-line gloss for each choice.
 * Read from the engine's registries, the model catalogue's records (names and
 * hints) and schema constants, so a new task, family or aggregator appears
 * here without touching a component.
 */
import { tasks } from '../tasks/registry.ts';
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
}

export interface FamilyInfo {
  id: string;
  title: string;
  minNodes: number;
}

export function taskCatalogue(): TaskInfo[] {
  return Object.values(tasks).map((t) => ({
    id: t.id,
    title: t.title,
    describe: t.describe,
    alignedAggregator: t.alignedAggregator,
    alignedStructure: t.alignedStructure,
    nodeFeatures: [...t.nodeFeatureNames],
    edgeFeatures: [...t.edgeFeatureNames],
    families: [...t.families],
  }));
}

export function familyCatalogue(): FamilyInfo[] {
  return Object.values(families).map((f) => ({ id: f.id, title: f.title, minNodes: f.minNodes }));
}

export function taskInfo(id: string): TaskInfo | undefined {
  return taskCatalogue().find((t) => t.id === id);
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
