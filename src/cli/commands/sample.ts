import { parse, UsageError, intFlag } from '../args.ts';
import { sampleGraphs } from '../../tasks/sample.ts';
import { LIMITS } from '../../experiment/limits.ts';
import { sampleFile } from '../graph-files.ts';
import { SpecError, parseTaskRef } from '../../experiment/spec.ts';
import type { TaskRef } from '../../tasks/registry.ts';

/** `--task`: a task id, or a recurrence as JSON (`'{"recurrence":{"semiring":"max-plus"}}'`), checked as a spec's task is. */
function taskFlag(value: string): TaskRef {
  let input: unknown = value;
  if (value.trimStart().startsWith('{')) {
    try {
      input = JSON.parse(value);
    } catch (error) {
      throw new UsageError(`--task: not valid JSON (${error instanceof Error ? error.message : String(error)}); give a task id or '{"recurrence":{"semiring":...}}'`);
    }
  }
  try {
    return parseTaskRef(input);
  } catch (error) {
    if (error instanceof SpecError) throw new UsageError(`--task: ${error.message}`);
    throw error;
  }
}

export async function commandSample(args: string[]): Promise<number> {
  const { values, positionals } = parse(args, {
    task: { type: 'string' },
    family: { type: 'string' },
    nodes: { type: 'string' },
    count: { type: 'string' },
    seed: { type: 'string' },
    scale: { type: 'string' },
    weights: { type: 'string' },
    graphs: { type: 'string' },
    source: { type: 'string' },
    weight: { type: 'string' },
    directed: { type: 'boolean' },
  });
  if (positionals.length) throw new UsageError(`unexpected argument "${positionals[0]}"`);
  if (values.graphs !== undefined) {
    if (!values.task) throw new UsageError('usage: farfield sample --task ID --graphs FILE [--source ID] [--weight COLUMN] [--directed]');
    const sample = await sampleFile(taskFlag(values.task), values.graphs, { source: values.source, weight: values.weight, directed: values.directed });
    process.stdout.write(JSON.stringify(sample) + '\n');
    return 0;
  }
  if (!values.task || !values.family || !values.nodes) throw new UsageError('usage: farfield sample --task ID --family ID --nodes N [--count C] [--seed S] [--scale X] [--weights LO,HI]');
  const nodes = intFlag('nodes', values.nodes, LIMITS.trainNodes.min, LIMITS.testNodes.max)!;
  const count = intFlag('count', values.count, 1, 1000) ?? 1;
  const seed = intFlag('seed', values.seed, 0, 2 ** 31 - 1) ?? 1;
  let weightScale = 1;
  if (values.scale !== undefined) {
    weightScale = Number(values.scale);
    if (!(weightScale >= LIMITS.weightScale.min && weightScale <= LIMITS.weightScale.max)) {
      throw new UsageError(`--scale: got "${values.scale}", allowed a number ${LIMITS.weightScale.min}..${LIMITS.weightScale.max}`);
    }
  }
  let weightRange: [number, number] | undefined;
  if (values.weights !== undefined) {
    const parts = values.weights.split(',').map(Number);
    if (parts.length !== 2 || !parts.every((x) => x >= LIMITS.weightBound.min && x <= LIMITS.weightBound.max) || parts[0]! > parts[1]!) {
      throw new UsageError(`--weights: got "${values.weights}", allowed LO,HI with ${LIMITS.weightBound.min} <= LO <= HI <= ${LIMITS.weightBound.max}`);
    }
    weightRange = [parts[0]!, parts[1]!];
  }
  const sample = sampleGraphs({ task: taskFlag(values.task), family: values.family, nodes, count, seed, weightScale, weightRange });
  process.stdout.write(JSON.stringify(sample) + '\n');
  return 0;
}
