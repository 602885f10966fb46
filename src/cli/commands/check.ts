import { parse, UsageError } from '../args.ts';
import { loadSpec } from '../load.ts';
import { specHash } from '../../experiment/results.ts';
import { recurrenceAlignment } from '../../tasks/recurrence/alignment.ts';

export async function commandCheck(args: string[]): Promise<number> {
  const { positionals, values } = parse(args, { json: { type: 'boolean' } });
  if (positionals.length !== 1) throw new UsageError('usage: farfield check <preset.json | link>');
  const { spec } = await loadSpec(positionals[0]);
  const hash = specHash(spec);
  // A recurrence gets the aggregator and message layer its ⊕ and ⊗ suggest (read from the model catalogue).
  const suggestion = typeof spec.task === 'string' ? null : recurrenceAlignment(spec.task.recurrence.semiring).line;
  if (values.json) {
    process.stdout.write(JSON.stringify({ specHash: hash, spec, ...(suggestion ? { suggestion } : {}) }, null, 2) + '\n');
  } else {
    process.stdout.write(JSON.stringify(spec, null, 2) + '\n');
    if (suggestion) process.stdout.write(`suggested for ${suggestion}\n`);
    process.stdout.write(`ok: ${spec.arms.length} arms × ${spec.seeds.count} seeds = ${spec.arms.length * spec.seeds.count} runs · spec hash ${hash}\n`);
  }
  return 0;
}
