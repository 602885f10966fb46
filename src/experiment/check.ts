/**
 * Checks a schema-valid spec against the catalogue: the task and families
 * exist and fit together, sizes suit the family, per-feature transforms match
 * the task's inputs, and the total work stays under the caps.
 */
import { SpecError, parseSpec, type ExperimentSpec } from './spec.ts';
import { LIMITS } from './limits.ts';
import { findTask, tasks } from '../tasks/registry.ts';
import { families } from '../graphs/registry.ts';
import { recurrenceProblems } from '../tasks/recurrence/options.ts';
import { recurrenceWeightProblems } from '../tasks/recurrence/check.ts';
import { fileTaskRule } from '../tasks/file-instance.ts';
import { inferFormat } from '../graphs/files/read.ts';
import { fileRungFamily } from '../graphs/files/types.ts';

export function checkSpec(spec: ExperimentSpec): ExperimentSpec {
  const problems: string[] = [];
  if (typeof spec.task !== 'string') {
    // Combinations of the recurrence's fields that have no meaning, before the task is built from them.
    problems.push(...recurrenceProblems(spec.task.recurrence));
    if (problems.length) throw new SpecError(problems);
  }
  const task = findTask(spec.task);
  if (!task) {
    problems.push(`task: got ${JSON.stringify(spec.task)}, allowed ${Object.keys(tasks).map((t) => JSON.stringify(t)).join(' | ')} or { "recurrence": ... }`);
    throw new SpecError(problems);
  }
  if (typeof spec.task !== 'string') problems.push(...recurrenceWeightProblems(spec.task.recurrence, spec));
  const familyField = (field: string, id: string) => {
    const family = Object.hasOwn(families, id) ? families[id] : undefined;
    if (!family) {
      problems.push(`${field}: got ${JSON.stringify(id)}, allowed ${Object.keys(families).map((f) => JSON.stringify(f)).join(' | ')}`);
      return null;
    }
    if (!task.families.includes(id)) {
      problems.push(`${field}: task "${task.id}" does not make sense on family "${id}"; allowed ${task.families.map((f) => JSON.stringify(f)).join(' | ')}`);
      return null;
    }
    return family;
  };
  const trainFamily = familyField('train.family', spec.train.family);
  const testFamily = spec.test.family === undefined ? trainFamily : familyField('test.family', spec.test.family);
  if (trainFamily && spec.train.sizes[0] < trainFamily.minNodes) {
    problems.push(`train.sizes[0]: got ${spec.train.sizes[0]}, family "${trainFamily.id}" needs at least ${trainFamily.minNodes} nodes`);
  }
  if (testFamily) {
    spec.test.sizes.forEach((size, i) => {
      if (size < testFamily.minNodes) problems.push(`test.sizes[${i}]: got ${size}, family "${testFamily.id}" needs at least ${testFamily.minNodes} nodes`);
    });
  }
  if (new Set(spec.test.sizes).size !== spec.test.sizes.length) problems.push(`test.sizes: sizes must not repeat (got ${JSON.stringify(spec.test.sizes)})`);
  if (new Set(spec.test.weightScales).size !== spec.test.weightScales.length) problems.push(`test.weightScales: scales must not repeat`);
  const primary = spec.test.primary;
  if (primary && (!spec.test.sizes.includes(primary.size) || !spec.test.weightScales.includes(primary.scale))) {
    problems.push(
      `test.primary: got size ${primary.size} at scale ${primary.scale}, allowed a rung of the ladder (sizes ${spec.test.sizes.join(', ')}; scales ${spec.test.weightScales.join(', ')})`,
    );
  }
  const names = new Set<string>();
  spec.arms.forEach((arm, i) => {
    if (names.has(arm.name)) problems.push(`arms[${i}].name: "${arm.name}" is used by another arm; arm names must be unique`);
    names.add(arm.name);
  });
  const checkTransforms = (field: string, choice: unknown, count: number) => {
    if (Array.isArray(choice) && choice.length !== count) {
      problems.push(`${field}: got ${choice.length} transforms, task "${task.id}" has ${count} input feature(s); give one name or exactly ${count}`);
    }
  };
  checkTransforms('model.nodeTransform', spec.model.nodeTransform, task.nodeFeatureNames.length);
  checkTransforms('model.edgeTransform', spec.model.edgeTransform, task.edgeFeatureNames.length);
  spec.arms.forEach((arm, i) => {
    if (arm.model.nodeTransform !== undefined) checkTransforms(`arms[${i}].model.nodeTransform`, arm.model.nodeTransform, task.nodeFeatureNames.length);
    if (arm.model.edgeTransform !== undefined) checkTransforms(`arms[${i}].model.edgeTransform`, arm.model.edgeTransform, task.edgeFeatureNames.length);
  });
  if (!task.iterate) {
    // Step-wise supervision fits each step to the exact algorithm's state after that many rounds.
    const why = `task "${task.id}" has no intermediate states (no per-round exact algorithm), so step-wise supervision cannot be used`;
    if (spec.budget.stepSupervision && spec.arms.some((arm) => arm.stepSupervision === undefined)) problems.push(`budget.stepSupervision: ${why}`);
    spec.arms.forEach((arm, i) => {
      if (arm.stepSupervision) problems.push(`arms[${i}].stepSupervision: ${why}`);
    });
  }
  // Graph files are read only when a host supplies them; here: can the task read one, and do their rungs stay apart.
  (spec.test.files ?? []).forEach((file, i) => {
    if (i === 0) {
      try {
        fileTaskRule(task);
      } catch (error) {
        problems.push(`test.files: ${(error instanceof Error ? error.message : String(error)).replace(/^[a-z-]+\/[a-z-]+: /, '')}`);
      }
    }
    let format = file.format;
    if (!format) {
      try {
        format = inferFormat(file.name);
      } catch (error) {
        problems.push(`test.files[${i}].format: missing, and ${error instanceof Error ? error.message : String(error)}`);
      }
    }
    if (file.directed !== undefined && format && format !== 'edge-list') {
      problems.push(`test.files[${i}].directed: only edge lists take it; a ${format} file states its own direction`);
    }
    if (spec.test.files!.findIndex((f) => fileRungFamily(f) === fileRungFamily(file)) < i) {
      problems.push(`test.files[${i}].name: "${file.name}" has the same base name as another file; their rungs would share a label`);
    }
  });
  const totalRuns = spec.arms.length * spec.seeds.count;
  if (totalRuns > LIMITS.totalRuns.max) {
    problems.push(`seeds.count: ${spec.arms.length} arms × ${spec.seeds.count} seeds = ${totalRuns} runs, allowed at most ${LIMITS.totalRuns.max}`);
  }
  if (spec.test.sizes.length * spec.test.weightScales.length > LIMITS.ladderRungs.max) {
    problems.push(`test: ${spec.test.sizes.length} sizes × ${spec.test.weightScales.length} scales = ${spec.test.sizes.length * spec.test.weightScales.length} rungs, allowed at most ${LIMITS.ladderRungs.max}`);
  }
  if (problems.length) throw new SpecError(problems);
  return spec;
}

/** Schema, then catalogue: the one entry point for untrusted specs. */
export function validateSpec(input: unknown): ExperimentSpec {
  return checkSpec(parseSpec(input));
}
