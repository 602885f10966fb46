/**
 * What the sheet can offer in its pickers: tasks, graph families and every
 * model switch the engine supports, with a one-line gloss for each choice.
 * Read from the engine's registries and schema constants, so a new task,
 * family or aggregator appears here without touching a component.
 */
import { tasks } from '../tasks/registry.ts';
import { families } from '../graphs/registry.ts';
import {
  ACTIVATIONS,
  AGGREGATORS,
  LOSSES,
  MESSAGES,
  METRICS,
  STEP_RULES,
  TRANSFORMS,
  UPDATES,
} from '../experiment/spec.ts';

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

const AGGREGATOR_HINTS: Record<string, string> = {
  sum: 'adds incoming messages; grows with degree',
  mean: 'averages incoming messages',
  max: 'keeps the largest message per channel',
  min: 'keeps the smallest message per channel',
  'smooth-max': 'log-sum-exp: a soft maximum with a temperature',
  'smooth-min': 'a soft minimum with a temperature',
};
const MESSAGE_HINTS: Record<string, string> = {
  mlp: 'a small network of sender, receiver and edge',
  'min-plus': 'semiring layer: min over (input + weight)',
  'max-plus': 'semiring layer: max over (input + weight)',
  'smooth-min-plus': 'soft min-plus with a temperature',
  'smooth-max-plus': 'soft max-plus with a temperature',
};
const UPDATE_HINTS: Record<string, string> = {
  mlp: 'residual: state plus a small network (zero-initialised)',
  gated: 'a learned gate between old state and the proposal',
  aggregate: 'the new state is the aggregate itself',
};
const STEP_HINTS: Record<string, string> = {
  nodes: 'one message step per node: grows with the graph',
  fixed: 'the same number of steps at every size',
  proportional: 'steps = factor × nodes, rounded up',
  'until-stable': 'iterate until states stop changing (capped)',
};
const TRANSFORM_HINTS: Record<string, string> = {
  identity: 'raw value',
  log1p: 'log(1 + x)',
  reciprocal: '1 / x',
  'inverse-square': '1 / x²',
  square: 'x²',
  sqrt: '√x',
  standardize: '(x − mean) / sd over the training graphs',
};
const METRIC_LABELS: Record<string, string> = {
  mae: 'mean absolute error',
  mre: 'mean relative error',
  miss: 'share of nodes off by more than 5 %',
};

const choices = (values: readonly string[], hints: Record<string, string> = {}): Choice[] =>
  values.map((value) => ({ value, label: value, ...(hints[value] ? { hint: hints[value] } : {}) }));

export const OPTIONS = {
  aggregator: choices(AGGREGATORS, AGGREGATOR_HINTS),
  message: choices(MESSAGES, MESSAGE_HINTS),
  update: choices(UPDATES, UPDATE_HINTS),
  activation: choices(ACTIVATIONS),
  transform: choices(TRANSFORMS, TRANSFORM_HINTS),
  stepRule: choices(STEP_RULES, STEP_HINTS),
  metric: METRICS.map((value) => ({ value, label: `${value} — ${METRIC_LABELS[value] ?? value}` })),
  loss: choices(LOSSES),
} as const;

export function metricLabel(metric: string): string {
  return METRIC_LABELS[metric] ?? metric;
}
