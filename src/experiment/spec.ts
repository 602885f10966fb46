/**
 * The experiment spec: the one document that defines an experiment. Presets,
 * share links and result files all carry it. Untrusted input enters only
 * through `parseSpec`, which validates with a schema and names the field, the
 * value received and the allowed range on every refusal.
 */
import { z } from 'zod';
import { LIMITS } from './limits.ts';
import { ACTIVATION_NAMES, AGGREGATOR_NAMES, MESSAGE_NAMES, STEP_RULE_NAMES, TRANSFORM_NAMES, UPDATE_NAMES } from '../model/catalogue.ts';
import type { ModelOptions, StepRule } from '../model/options.ts';
import type { Budget, MetricName, Schedule } from '../train/options.ts';
import { GRAPH_FILE_FORMATS } from '../graphs/files/types.ts';
import {
  RECURRENCE_DEFAULTS,
  RECURRENCE_DIRECTIONS,
  RECURRENCE_OTHERS,
  RECURRENCE_SEMIRINGS,
  RECURRENCE_SOURCES,
  recurrenceProblems,
  type RecurrenceSpec,
} from '../tasks/recurrence/options.ts';

export type { AggregatorName, MessageName, UpdateName, TransformName, ModelOptions, StepRule } from '../model/options.ts';
export type { Budget, MetricName, Schedule } from '../train/options.ts';

export const SPEC_VERSION = 1;

/** The model's names come from the model catalogue (src/model/catalogue.ts), in its order. */
export const AGGREGATORS = AGGREGATOR_NAMES;
export const MESSAGES = MESSAGE_NAMES;
export const UPDATES = UPDATE_NAMES;
export const ACTIVATIONS = ACTIVATION_NAMES;
export const TRANSFORMS = TRANSFORM_NAMES;
export const STEP_RULES = STEP_RULE_NAMES;
export const METRICS = ['mae', 'mre', 'miss'] as const;
export const LOSSES = ['huber', 'mse'] as const;
export const SCHEDULES = ['constant', 'warmup-cosine'] as const;

/** The fit gate when a preset states none: in-distribution relative error at most 5%. */
export const DEFAULT_FIT_GATE = 0.05;

const text = (max: number = LIMITS.textLength.max) => z.string().max(max);
const int = (min: number, max: number) => z.number().int().min(min).max(max);
const num = (min: number, max: number) => z.number().min(min).max(max);
const temperature = num(LIMITS.temperature.min, LIMITS.temperature.max);

const transformList = z.union([z.enum(TRANSFORMS), z.array(z.enum(TRANSFORMS)).min(1).max(8)]);

export const stepRuleSchema = z
  .object({
    rule: z.enum(STEP_RULES).default('nodes'),
    /** `fixed`: the step count. */
    count: int(1, LIMITS.messageSteps.max).default(16),
    /** `proportional`: steps = ceil(factor x nodes). */
    factor: num(0.05, 8).default(1),
    /** `until-stable`: stop when the largest state change is below tolerance x (1 + largest state). */
    tolerance: num(1e-8, 1).default(1e-3),
    /** Upper bound for every rule. */
    cap: int(1, LIMITS.messageSteps.max).default(256),
    /** Training only: add a uniform random 0..jitter extra steps per batch, so states stay stable under more steps at test. */
    trainJitter: int(0, LIMITS.stepJitter.max).default(16),
  })
  .strict();

export const modelSchema = z
  .object({
    hidden: int(LIMITS.hidden.min, LIMITS.hidden.max).default(32),
    aggregator: z.enum(AGGREGATORS).default('sum'),
    /** Temperature for smooth-max / smooth-min aggregation. */
    aggregatorTemperature: temperature.default(1),
    /** false: every layer bias-free (the network is then positively homogeneous with relu / leaky-relu). */
    bias: z.boolean().default(true),
    activation: z.enum(ACTIVATIONS).default('relu'),
    message: z.enum(MESSAGES).default('mlp'),
    messageTemperature: temperature.default(1),
    update: z.enum(UPDATES).default('mlp'),
    /** One transform for all node inputs, or one per node input feature. */
    nodeTransform: transformList.default('identity'),
    edgeTransform: transformList.default('identity'),
    steps: stepRuleSchema.default(stepRuleSchema.parse({})),
  })
  .strict();

/**
 * An arm's overrides: the model fields with no defaults, so only what the arm
 * states changes the shared model (zod fills defaults even inside `.partial()`).
 */
export const modelOverrideSchema = z
  .object({
    hidden: int(LIMITS.hidden.min, LIMITS.hidden.max).optional(),
    aggregator: z.enum(AGGREGATORS).optional(),
    aggregatorTemperature: temperature.optional(),
    bias: z.boolean().optional(),
    activation: z.enum(ACTIVATIONS).optional(),
    message: z.enum(MESSAGES).optional(),
    messageTemperature: temperature.optional(),
    update: z.enum(UPDATES).optional(),
    nodeTransform: transformList.optional(),
    edgeTransform: transformList.optional(),
    steps: z
      .object({
        rule: z.enum(STEP_RULES).optional(),
        count: int(1, LIMITS.messageSteps.max).optional(),
        factor: num(0.05, 8).optional(),
        tolerance: num(1e-8, 1).optional(),
        cap: int(1, LIMITS.messageSteps.max).optional(),
        trainJitter: int(0, LIMITS.stepJitter.max).optional(),
      })
      .strict()
      .optional(),
  })
  .strict();

/** Arms override the shared model defaults; only the fields given are changed. */
/** Model fields a sweep may vary. */
export const SWEEP_FIELDS = [
  'hidden',
  'aggregator',
  'aggregatorTemperature',
  'bias',
  'activation',
  'message',
  'messageTemperature',
  'update',
  'nodeTransform',
  'edgeTransform',
] as const;

/**
 * Learning-rate schedule. `constant` keeps the rate; `warmup-cosine` rises
 * linearly from 0 over `warmup` steps, then follows a cosine from the full
 * rate down to `floor` × rate at the last step.
 */
export const scheduleSchema = z
  .object({
    kind: z.enum(SCHEDULES),
    warmup: int(0, LIMITS.trainingSteps.max).default(0),
    floor: num(0, 1).default(0.05),
  })
  .strict();

/** Training switches an arm may set for itself (so their effect can itself be A/B-tested). */
const trainingSwitches = {
  /** Overrides budget.learningRate for this arm only (learning-rate studies; deliberately diverging arms in tests). */
  learningRate: num(LIMITS.learningRate.min, LIMITS.learningRate.max).optional(),
  /** Overrides budget.schedule. */
  schedule: scheduleSchema.optional(),
  /** Overrides budget.sparsity: strength of an L1 penalty on every weight matrix (biases excluded). */
  sparsity: num(0, LIMITS.sparsity.max).optional(),
  /** Overrides budget.stepSupervision: the exact algorithm's state after k rounds supervises the decoded state after step k. */
  stepSupervision: z.boolean().optional(),
};

export const armSchema = z
  .object({
    name: z.string().min(1).max(40).regex(/^[\p{L}\p{N}_ .,:=+\-()×]+$/u, 'use letters, digits, spaces and _ . , : = + - ( ) ×'),
    note: text(400).optional(),
    model: modelOverrideSchema.default({}),
    ...trainingSwitches,
  })
  .strict();

/**
 * `task` as an object: a semiring path problem (src/tasks/recurrence/). A
 * built-in task stays a plain string, so existing presets, hashes and links
 * are unchanged; the object travels in hashes and links like every field.
 */
export const recurrenceTaskSchema = z
  .object({
    recurrence: z
      .object({
        semiring: z.enum(RECURRENCE_SEMIRINGS),
        source: z.enum(RECURRENCE_SOURCES).default(RECURRENCE_DEFAULTS.source),
        others: z.enum(RECURRENCE_OTHERS).default(RECURRENCE_DEFAULTS.others),
        direction: z.enum(RECURRENCE_DIRECTIONS).default(RECURRENCE_DEFAULTS.direction),
      })
      .strict(),
  })
  .strict();

/**
 * A graph file scored as one more test rung (never trained on). The file's
 * content is not in the spec: the host supplies it, and `sha256` (of the
 * file's bytes) ties the spec, its hash and its share link to exactly that
 * content. A preset may leave the hash out; the CLI and the sheet fill it in
 * when they read the file. Names resolve relative to the preset file.
 */
export const graphFileSchema = z
  .object({
    name: z.string().min(1).max(200),
    /** Absent: from the extension (.csv .tsv .txt .edges: edge-list; .gr .dimacs: dimacs; .graphml; .gexf). */
    format: z.enum(GRAPH_FILE_FORMATS).optional(),
    /** Weight column (edge list) or edge attribute (GraphML, GEXF); absent: "weight". */
    weight: z.string().min(1).max(60).optional(),
    /** Source node id as the file writes it, for tasks that start from one; absent: the file's first node. */
    source: z.string().min(1).max(200).optional(),
    /** Edge lists only: edges run source -> target; absent: undirected. */
    directed: z.boolean().optional(),
    sha256: z.string().regex(/^[0-9a-f]{64}$/, 'a SHA-256 in 64 lowercase hex digits').optional(),
  })
  .strict();

const weightRange = z
  .tuple([num(LIMITS.weightBound.min, LIMITS.weightBound.max), num(LIMITS.weightBound.min, LIMITS.weightBound.max)])
  .refine(([lo, hi]) => lo <= hi, 'lower bound must not exceed upper bound');

export const specSchema = z
  .object({
    farfield: z.literal(SPEC_VERSION),
    question: text(300).min(1),
    /** What we expect, honestly stated, and what was held equal between arms. */
    expectation: text().default(''),
    task: z.union([z.string().min(1).max(40), recurrenceTaskSchema]),
    train: z
      .object({
        family: z.string().min(1).max(40),
        sizes: z
          .tuple([int(LIMITS.trainNodes.min, LIMITS.trainNodes.max), int(LIMITS.trainNodes.min, LIMITS.trainNodes.max)])
          .refine(([lo, hi]) => lo <= hi, 'smallest size must not exceed largest'),
        graphs: int(LIMITS.trainGraphs.min, LIMITS.trainGraphs.max).default(256),
        weightRange: weightRange.default([1, 10]),
        familyParams: z.record(z.string().max(40), z.number().finite()).default({}),
      })
      .strict(),
    test: z
      .object({
        family: z.string().min(1).max(40).optional(),
        sizes: z.array(int(LIMITS.testNodes.min, LIMITS.testNodes.max)).min(1).max(LIMITS.ladderRungs.max),
        weightScales: z.array(num(LIMITS.weightScale.min, LIMITS.weightScale.max)).min(1).max(8).default([1]),
        graphsPerRung: int(LIMITS.testGraphsPerRung.min, LIMITS.testGraphsPerRung.max).default(16),
        validationGraphs: int(LIMITS.validationGraphs.min, LIMITS.validationGraphs.max).default(32),
        /**
         * Fresh in-distribution graphs (training sizes) that score each run for the fit gate; they play
         * no part in choosing the kept weights. Default: as many as validationGraphs.
         */
        fitGraphs: int(LIMITS.validationGraphs.min, LIMITS.validationGraphs.max).optional(),
        /**
         * A declared primary rung: only it is tested (its pairs adjusted among themselves), and every
         * other rung is descriptive. Without it, all (rung, pair) tests are adjusted together (Holm).
         */
        primary: z
          .object({
            size: int(LIMITS.testNodes.min, LIMITS.testNodes.max),
            scale: num(LIMITS.weightScale.min, LIMITS.weightScale.max).default(1),
          })
          .strict()
          .optional(),
        /** Graph files, each one more rung after the generated ones (absent: none; existing hashes unchanged). */
        files: z
          .array(graphFileSchema)
          .min(1)
          .max(LIMITS.graphFiles.max)
          .refine((files) => new Set(files.map((f) => f.name)).size === files.length, 'file names must differ')
          .optional(),
      })
      .strict(),
    budget: z
      .object({
        steps: int(LIMITS.trainingSteps.min, LIMITS.trainingSteps.max).default(300),
        batchGraphs: int(LIMITS.batchGraphs.min, LIMITS.batchGraphs.max).default(16),
        learningRate: num(LIMITS.learningRate.min, LIMITS.learningRate.max).default(0.003),
        clipNorm: num(1e-3, 1e6).default(1),
        loss: z.enum(LOSSES).default('huber'),
        /** Validate every k steps and keep the best weights by the preset's metric (0: never; keep the last). */
        validateEvery: int(0, LIMITS.trainingSteps.max).default(50),
        /** Learning-rate schedule (absent: constant). */
        schedule: scheduleSchema.optional(),
        /** L1 penalty strength on every weight matrix (absent: 0). */
        sparsity: num(0, LIMITS.sparsity.max).optional(),
        /** Step-wise supervision with the exact algorithm's intermediate states (absent: off). */
        stepSupervision: z.boolean().optional(),
        /**
         * The fit gate: an arm whose in-distribution relative error (median over seeds, on fresh graphs)
         * exceeds this is "not fitted" and no verdict calls a winner for it. Absent: DEFAULT_FIT_GATE.
         */
        fitGate: num(LIMITS.fitGate.min, LIMITS.fitGate.max).optional(),
      })
      .strict()
      .default({ steps: 300, batchGraphs: 16, learningRate: 0.003, clipNorm: 1, loss: 'huber', validateEvery: 50 }),
    seeds: z
      .object({
        count: int(LIMITS.seeds.min, LIMITS.seeds.max).default(5),
        base: int(0, 2 ** 31 - 1).default(1),
      })
      .strict()
      .default({ count: 5, base: 1 }),
    metric: z.enum(METRICS).default('mae'),
    model: modelSchema.default(modelSchema.parse({})),
    arms: z.array(armSchema).max(LIMITS.arms.max).default([]),
    /**
     * One or two model knobs over lists of values, expanded into one arm per
     * combination (appended after any explicit arms) when the spec is parsed.
     */
    sweep: z
      .array(
        z
          .object({
            field: z.enum(SWEEP_FIELDS),
            values: z.array(z.union([z.string().max(40), z.number(), z.boolean()])).min(1).max(16),
          })
          .strict(),
      )
      .min(1)
      .max(2)
      .optional(),
  })
  .strict();

export type SpecInput = z.input<typeof specSchema>;
export type ExperimentSpec = z.output<typeof specSchema>;
export type ArmSpec = z.output<typeof armSchema>;
export type GraphFileSpec = z.output<typeof graphFileSchema>;

/**
 * Type-level check: what the schema produces is exactly what the model and
 * training layers take (their own plain types in src/model/options.ts and
 * src/train/options.ts), so neither needs to import this file. A field added
 * on one side only fails to compile here.
 */
type Same<A, B> = (<T>() => T extends A ? 1 : 2) extends <T>() => T extends B ? 1 : 2 ? true : false;
type Holds<T extends true> = T;
export type SchemaMatchesLayers = [
  Holds<Same<z.output<typeof modelSchema>, ModelOptions>>,
  Holds<Same<z.output<typeof stepRuleSchema>, StepRule>>,
  Holds<Same<z.output<typeof scheduleSchema>, Schedule>>,
  Holds<Same<ExperimentSpec['budget'], Budget>>,
  Holds<Same<(typeof METRICS)[number], MetricName>>,
  Holds<Same<z.output<typeof recurrenceTaskSchema>['recurrence'], RecurrenceSpec>>,
];

/** The training switches in force for one arm: the arm's own where it states them, else the budget's. */
export interface ArmTraining {
  learningRate: number;
  schedule: Schedule | null;
  sparsity: number;
  stepSupervision: boolean;
}

export function armTraining(spec: ExperimentSpec, armIndex: number): ArmTraining {
  const arm = spec.arms[armIndex];
  if (!arm) throw new Error(`experiment/spec: arm ${armIndex} is out of range 0..${spec.arms.length - 1}`);
  const b = spec.budget;
  return {
    learningRate: arm.learningRate ?? b.learningRate,
    schedule: arm.schedule ?? b.schedule ?? null,
    sparsity: arm.sparsity ?? b.sparsity ?? 0,
    stepSupervision: arm.stepSupervision ?? b.stepSupervision ?? false,
  };
}

export function fitGateOf(spec: ExperimentSpec): number {
  return spec.budget.fitGate ?? DEFAULT_FIT_GATE;
}

/** A refusal of untrusted input: every problem names its field. */
export class SpecError extends Error {
  constructor(readonly problems: string[]) {
    super(problems.length === 1 ? problems[0]! : `${problems.length} problems:\n  - ${problems.join('\n  - ')}`);
    this.name = 'SpecError';
  }
}

function fieldName(path: ReadonlyArray<PropertyKey>): string {
  if (path.length === 0) return '(top level)';
  return path.map((p, i) => (typeof p === 'number' ? `[${p}]` : `${i === 0 ? '' : '.'}${String(p)}`)).join('');
}

function valueAt(input: unknown, path: ReadonlyArray<PropertyKey>): unknown {
  let cursor: unknown = input;
  for (const key of path) {
    if (cursor === null || typeof cursor !== 'object') return undefined;
    cursor = (cursor as Record<PropertyKey, unknown>)[key];
  }
  return cursor;
}

function show(value: unknown): string {
  if (value === undefined) return 'nothing';
  let out: string;
  try {
    out = JSON.stringify(value) ?? String(value);
  } catch {
    out = String(value);
  }
  return out.length > 60 ? `${out.slice(0, 57)}...` : out;
}

/** One schema issue as "field: got X, allowed Y" (also used for results and saved-network files). */
export function describeIssue(issue: z.core.$ZodIssue, input: unknown): string {
  const field = fieldName(issue.path);
  const received = valueAt(input, issue.path);
  switch (issue.code) {
    case 'too_big':
      return `${field}: got ${show(received)}, allowed at most ${String(issue.maximum)}${issue.origin === 'array' ? ' items' : ''}`;
    case 'too_small':
      return `${field}: got ${show(received)}, allowed at least ${String(issue.minimum)}${issue.origin === 'array' ? ' items' : ''}`;
    case 'invalid_value':
      return `${field}: got ${show(received)}, allowed ${issue.values.map((v) => JSON.stringify(v)).join(' | ')}`;
    case 'unrecognized_keys':
      return `${field === '(top level)' ? '' : `${field}: `}unknown field${issue.keys.length > 1 ? 's' : ''} ${issue.keys.map((k) => `"${k}"`).join(', ')}`;
    case 'invalid_union': {
      // `task` is a string or a recurrence object: report the branch of the kind received, not both.
      const branches = issue.errors.filter((branch) => branch.length > 0);
      const fits = branches.find((branch) => !branch.some((i) => i.code === 'invalid_type' && i.path.length === 0));
      if (fits) return describeIssue({ ...fits[0]!, path: [...issue.path, ...fits[0]!.path] }, input);
      const expected = 'a task id (string) or { "recurrence": { "semiring": ... } }';
      return received === undefined ? `${field}: missing (expected ${expected})` : `${field}: got ${show(received)}, expected ${expected}`;
    }
    case 'invalid_type':
      return received === undefined
        ? `${field}: missing (expected ${issue.expected})`
        : `${field}: got ${show(received)}, expected ${issue.expected}`;
    default:
      return `${field}: ${issue.message} (got ${show(received)})`;
  }
}

/** Turn a sweep into arms: one per combination of knob values, named "field=value, field=value". */
function expandSweep(spec: ExperimentSpec, input: unknown): ExperimentSpec {
  if (!spec.sweep) return spec;
  const problems: string[] = [];
  spec.sweep.forEach((knob, k) => {
    const fieldSchema = modelOverrideSchema.shape[knob.field];
    knob.values.forEach((value, v) => {
      const checked = fieldSchema.safeParse(value);
      if (!checked.success) {
        problems.push(...checked.error.issues.map((issue) => describeIssue({ ...issue, path: ['sweep', k, 'values', v, ...issue.path] }, input)));
      }
    });
  });
  if (problems.length) throw new SpecError(problems);
  let combos: Array<Record<string, unknown>> = [{}];
  for (const knob of spec.sweep) combos = combos.flatMap((c) => knob.values.map((value) => ({ ...c, [knob.field]: value })));
  const swept: ArmSpec[] = combos.map((model) => ({
    name: Object.entries(model)
      .map(([k, v]) => `${k}=${String(v)}`)
      .join(', ')
      .slice(0, 40),
    model: model as ArmSpec['model'],
  }));
  const arms = [...spec.arms, ...swept];
  if (arms.length > LIMITS.arms.max) throw new SpecError([`sweep: expands to ${arms.length} arms, allowed at most ${LIMITS.arms.max}`]);
  const { sweep: _expanded, ...rest } = spec;
  return { ...rest, arms };
}

/** A `task` value alone (e.g. from a command-line flag): a task id or a recurrence object, refused as the spec would refuse it. */
export function parseTaskRef(input: unknown): ExperimentSpec['task'] {
  const result = specSchema.shape.task.safeParse(input);
  if (!result.success) throw new SpecError(result.error.issues.slice(0, 12).map((issue) => describeIssue({ ...issue, path: ['task', ...issue.path] }, { task: input })));
  if (typeof result.data !== 'string') {
    const problems = recurrenceProblems(result.data.recurrence);
    if (problems.length) throw new SpecError(problems);
  }
  return result.data;
}

/** Validate and normalise untrusted input; throws SpecError naming every bad field. */
export function parseSpec(input: unknown): ExperimentSpec {
  const result = specSchema.safeParse(input);
  if (!result.success) {
    throw new SpecError(result.error.issues.slice(0, 12).map((issue) => describeIssue(issue, input)));
  }
  const spec = expandSweep(result.data, input);
  if (spec.arms.length < LIMITS.arms.min) {
    throw new SpecError([`arms: got ${spec.arms.length} arm(s), allowed at least ${LIMITS.arms.min} (give arms, or a sweep)`]);
  }
  return spec;
}

/** The model options of one arm: shared defaults overridden by the arm's own. */
export function armModel(spec: ExperimentSpec, armIndex: number): ModelOptions {
  const arm = spec.arms[armIndex];
  if (!arm) throw new Error(`experiment/spec: arm ${armIndex} is out of range 0..${spec.arms.length - 1}`);
  const overrides = Object.fromEntries(Object.entries(arm.model).filter(([, v]) => v !== undefined));
  const merged: ModelOptions = { ...spec.model, ...overrides, steps: spec.model.steps };
  if (arm.model.steps) {
    const stepOverrides = Object.fromEntries(Object.entries(arm.model.steps).filter(([, v]) => v !== undefined));
    merged.steps = { ...spec.model.steps, ...stepOverrides };
  }
  return merged;
}
