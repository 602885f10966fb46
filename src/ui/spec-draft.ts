/**
 * Editing the sheet: pure functions from a draft spec and one edit to the next
 * draft, and the validation that turns a draft into a runnable spec. The draft
 * has the spec's shape but may hold values the schema refuses (an empty number
 * field, a size out of range); `validateDraft` names every such field, and
 * nothing runs until it passes.
 */
import { validateSpec } from '../experiment/check.ts';
import { SpecError, armModel, type ArmSpec, type ExperimentSpec, type ModelOptions, type StepRule } from '../experiment/spec.ts';
import { canonicalJson } from '../util/hash.ts';
import { taskInfo } from './catalogue.ts';
import { armLetter } from './palette.ts';

export type Draft = ExperimentSpec;
export type ArmOverrides = ArmSpec['model'];

/** The model switches an arm card shows; `steps` fields are edited one by one. */
export const SWITCH_KEYS = [
  'aggregator',
  'aggregatorTemperature',
  'message',
  'messageTemperature',
  'update',
  'activation',
  'bias',
  'hidden',
  'nodeTransform',
  'edgeTransform',
] as const;
export type SwitchKey = (typeof SWITCH_KEYS)[number];
export const STEP_KEYS = ['rule', 'count', 'factor', 'tolerance', 'cap', 'trainJitter'] as const;
export type StepKey = (typeof STEP_KEYS)[number];

/** One edit, as a component reports it. */
export type SpecEdit =
  | { kind: 'field'; path: ReadonlyArray<string | number>; value: unknown }
  | { kind: 'task'; task: string }
  | { kind: 'arm-name'; arm: number; name: string }
  | { kind: 'arm-note'; arm: number; note: string }
  | { kind: 'arm-switch'; arm: number; key: SwitchKey; value: unknown }
  | { kind: 'arm-step'; arm: number; key: StepKey; value: unknown }
  /** The arm's own learning rate; undefined: the budget's. */
  | { kind: 'arm-learning-rate'; arm: number; value: number | undefined }
  | { kind: 'arm-add' }
  | { kind: 'arm-duplicate'; arm: number }
  | { kind: 'arm-remove'; arm: number };

export type Validation = { ok: true; spec: ExperimentSpec } | { ok: false; problems: string[] };

function clone<T>(value: T): T {
  return structuredClone(value);
}

/** Immutable set at a path of object keys and array indices; `undefined` removes an object field. */
export function setAt<T>(root: T, path: ReadonlyArray<string | number>, value: unknown): T {
  if (path.length === 0) return value as T;
  const [head, ...rest] = path;
  const container: Record<string | number, unknown> | unknown[] = Array.isArray(root)
    ? [...(root as unknown[])]
    : { ...((root ?? {}) as Record<string | number, unknown>) };
  const current = (container as Record<string | number, unknown>)[head!];
  const next = setAt(current, rest, value);
  // Setting an object field to undefined removes it (an optional field left out).
  if (next === undefined && !Array.isArray(container)) delete (container as Record<string | number, unknown>)[head!];
  else (container as Record<string | number, unknown>)[head!] = next;
  return container as T;
}

/** A name not used by another arm, within the schema's 40 characters. */
export function uniqueArmName(wanted: string, taken: readonly string[]): string {
  const base = wanted.slice(0, 34).trim() || 'arm';
  if (!taken.includes(base)) return base;
  for (let i = 2; ; i++) {
    const name = `${base} ${i}`;
    if (!taken.includes(name)) return name;
  }
}

function withArm(draft: Draft, index: number, change: (arm: ArmSpec) => ArmSpec): Draft {
  return { ...draft, arms: draft.arms.map((arm, i) => (i === index ? change(arm) : arm)) };
}

/** A transform override must have one entry per input feature (or be one name). */
function fitTransforms(draft: Draft): Draft {
  const task = taskInfo(draft.task);
  if (!task) return draft;
  const fit = (choice: unknown, count: number) => (Array.isArray(choice) && choice.length !== count ? (choice[0] as string) : choice);
  const model = {
    ...draft.model,
    nodeTransform: fit(draft.model.nodeTransform, task.nodeFeatures.length) as ModelOptions['nodeTransform'],
    edgeTransform: fit(draft.model.edgeTransform, task.edgeFeatures.length) as ModelOptions['edgeTransform'],
  };
  const arms = draft.arms.map((arm) => {
    const m: ArmOverrides = { ...arm.model };
    if (m.nodeTransform !== undefined) m.nodeTransform = fit(m.nodeTransform, task.nodeFeatures.length) as ModelOptions['nodeTransform'];
    if (m.edgeTransform !== undefined) m.edgeTransform = fit(m.edgeTransform, task.edgeFeatures.length) as ModelOptions['edgeTransform'];
    return { ...arm, model: m };
  });
  return { ...draft, model, arms };
}

export function applyEdit(draft: Draft, edit: SpecEdit): Draft {
  switch (edit.kind) {
    case 'field':
      return setAt(draft, edit.path, edit.value);
    case 'task': {
      const task = taskInfo(edit.task);
      let next: Draft = { ...draft, task: edit.task };
      if (task && !task.families.includes(next.train.family)) next = setAt(next, ['train', 'family'], task.families[0]);
      if (task && next.test.family !== undefined && !task.families.includes(next.test.family)) {
        const { family: _dropped, ...test } = next.test;
        next = { ...next, test };
      }
      return fitTransforms(next);
    }
    case 'arm-name':
      return withArm(draft, edit.arm, (arm) => ({ ...arm, name: edit.name }));
    case 'arm-note':
      return withArm(draft, edit.arm, (arm) => {
        const { note: _old, ...rest } = arm;
        return edit.note.trim() ? { ...rest, note: edit.note } : rest;
      });
    case 'arm-switch':
      return withArm(draft, edit.arm, (arm) => ({ ...arm, model: { ...arm.model, [edit.key]: edit.value } }));
    case 'arm-step':
      return withArm(draft, edit.arm, (arm) => ({
        ...arm,
        model: { ...arm.model, steps: { ...(arm.model.steps ?? {}), [edit.key]: edit.value } },
      }));
    case 'arm-learning-rate':
      return withArm(draft, edit.arm, (arm) => {
        const { learningRate: _old, ...rest } = arm;
        return edit.value === undefined ? rest : { ...rest, learningRate: edit.value };
      });
    case 'arm-add': {
      const name = uniqueArmName(`arm ${draft.arms.length + 1}`, draft.arms.map((a) => a.name));
      return { ...draft, arms: [...draft.arms, { name, model: {} }] };
    }
    case 'arm-duplicate': {
      const source = draft.arms[edit.arm];
      if (!source) return draft;
      const copy: ArmSpec = { ...clone(source), name: uniqueArmName(`${source.name} copy`, draft.arms.map((a) => a.name)) };
      const arms = [...draft.arms];
      arms.splice(edit.arm + 1, 0, copy);
      return { ...draft, arms };
    }
    case 'arm-remove':
      if (draft.arms.length <= 2) return draft;
      return { ...draft, arms: draft.arms.filter((_, i) => i !== edit.arm) };
  }
}

export function validateDraft(draft: Draft): Validation {
  try {
    return { ok: true, spec: validateSpec(draft) };
  } catch (error) {
    if (error instanceof SpecError) return { ok: false, problems: error.problems };
    return { ok: false, problems: [error instanceof Error ? error.message : String(error)] };
  }
}

/** Every arm's effective model: the shared model with the arm's overrides. */
export function effectiveModels(draft: Draft): ModelOptions[] {
  return draft.arms.map((_, i) => armModel(draft, i));
}

/** The switches whose effective value is not the same in every arm: the thing under test. */
export function differingSwitches(models: readonly ModelOptions[]): Set<SwitchKey | `steps.${StepKey}`> {
  const differ = new Set<SwitchKey | `steps.${StepKey}`>();
  if (models.length < 2) return differ;
  for (const key of SWITCH_KEYS) {
    const first = canonicalJson(models[0]![key]);
    if (models.some((m) => canonicalJson(m[key]) !== first)) differ.add(key);
  }
  for (const key of STEP_KEYS) {
    const first = models[0]!.steps[key];
    if (models.some((m) => m.steps[key] !== first)) differ.add(`steps.${key}`);
  }
  return differ;
}

/** Loose text → list of numbers ("16, 32 64" → [16, 32, 64]); NaN marks a bad entry so validation names it. */
export function parseNumberList(text: string): number[] {
  return text
    .split(/[\s,;]+/)
    .filter((part) => part.length > 0)
    .map((part) => (/^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i.test(part) ? Number(part) : NaN));
}

/** A number field's text → number (empty or junk → NaN, which validation names). */
export function parseNumber(text: string): number {
  const trimmed = text.trim();
  return trimmed === '' ? NaN : Number(trimmed);
}

export function sameSpec(a: ExperimentSpec, b: ExperimentSpec): boolean {
  return canonicalJson(a) === canonicalJson(b);
}

export type { StepRule };

/** The spec fields the problems name ("train.sizes[0]: got …" → "train.sizes[0]"), to mark those inputs. */
export function problemFields(problems: readonly string[]): Set<string> {
  const fields = new Set<string>();
  for (const problem of problems) {
    const match = /^([A-Za-z_$][\w$]*(?:\.[A-Za-z_$][\w$]*|\[\d+\])*): /.exec(problem);
    if (!match) continue;
    fields.add(match[1]!);
    // "test.sizes[2]" also marks the whole list input "test.sizes".
    fields.add(match[1]!.replace(/\[\d+\]$/, ''));
  }
  return fields;
}

/** "arms[1].model.steps.count" style field name for a path. */
export function fieldName(path: ReadonlyArray<string | number>): string {
  return path.map((p, i) => (typeof p === 'number' ? `[${p}]` : `${i === 0 ? '' : '.'}${p}`)).join('');
}

/** What an arm card shows: the arm's effective model, what it sets itself, and what differs between arms. */
export interface ArmCardView {
  index: number;
  letter: string;
  name: string;
  note: string;
  color: string;
  model: ModelOptions;
  /** Switches the arm sets itself (the rest come from the shared model). */
  overridden: Set<string>;
  /** Switches whose value is not the same in every arm. */
  differs: Set<string>;
  /** The arm's own learning rate, if it overrides the budget's. */
  learningRate: number | undefined;
  sharedLearningRate: number;
  /** The training switches in force for this arm in words (schedule, L1, step supervision), and whether the arm sets any itself. */
  training: { text: string; own: boolean };
  nodeFeatures: string[];
  edgeFeatures: string[];
  canRemove: boolean;
}

/** One letter code for an arm everywhere (cards, figures, tables, messages): palette.ts. */
export { armLetter };

export function armCards(draft: Draft, colorOf: (index: number) => string): ArmCardView[] {
  const task = taskInfo(draft.task);
  const models = effectiveModels(draft);
  const differs = differingSwitches(models) as Set<string>;
  const rates = draft.arms.map((arm) => arm.learningRate ?? draft.budget.learningRate);
  if (rates.some((r) => r !== rates[0])) differs.add('learningRate');
  const training = draft.arms.map((_, index) => trainingWords(draft, index));
  if (training.some((t) => t.text !== training[0]!.text)) differs.add('training');
  return draft.arms.map((arm, index) => {
    const overridden = new Set<string>(Object.entries(arm.model).filter(([k, v]) => v !== undefined && k !== 'steps').map(([k]) => k));
    for (const [k, v] of Object.entries(arm.model.steps ?? {})) if (v !== undefined) overridden.add(`steps.${k}`);
    return {
      index,
      letter: armLetter(index),
      name: arm.name,
      note: arm.note ?? '',
      color: colorOf(index),
      model: models[index]!,
      overridden,
      differs,
      learningRate: arm.learningRate,
      sharedLearningRate: draft.budget.learningRate,
      training: training[index]!,
      nodeFeatures: task?.nodeFeatures ?? ['node input'],
      edgeFeatures: task?.edgeFeatures ?? ['edge input'],
      canRemove: draft.arms.length > 2,
    };
  });
}

/** "warm-up 50 steps, then cosine to 0.05×; L1 1e-5; step supervision", or "constant rate". */
export function trainingWords(draft: Draft, index: number): { text: string; own: boolean } {
  const arm = draft.arms[index]!;
  const b = draft.budget;
  const schedule = arm.schedule ?? b.schedule;
  const sparsity = arm.sparsity ?? b.sparsity ?? 0;
  const stepwise = arm.stepSupervision ?? b.stepSupervision ?? false;
  const parts = [schedule?.kind === 'warmup-cosine' ? `warm-up ${schedule.warmup} steps, then cosine to ${schedule.floor}× the rate` : 'constant rate'];
  if (sparsity > 0) parts.push(`L1 ${sparsity}`);
  if (stepwise) parts.push('step supervision');
  return { text: parts.join('; '), own: arm.schedule !== undefined || arm.sparsity !== undefined || arm.stepSupervision !== undefined };
}
