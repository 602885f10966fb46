import { parse, UsageError } from '../args.ts';
import { loadSpec } from '../load.ts';
import { specHash } from '../../experiment/results.ts';

export async function commandCheck(args: string[]): Promise<number> {
  const { positionals, values } = parse(args, { json: { type: 'boolean' } });
  if (positionals.length !== 1) throw new UsageError('usage: farfield check <preset.json | link>');
  const { spec } = await loadSpec(positionals[0]);
  const hash = specHash(spec);
  if (values.json) {
    process.stdout.write(JSON.stringify({ specHash: hash, spec }, null, 2) + '\n');
  } else {
    process.stdout.write(JSON.stringify(spec, null, 2) + '\n');
    process.stdout.write(`ok: ${spec.arms.length} arms × ${spec.seeds.count} seeds = ${spec.arms.length * spec.seeds.count} runs · spec hash ${hash}\n`);
  }
  return 0;
}
