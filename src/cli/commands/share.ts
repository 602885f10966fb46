/** `farfield share <preset> [--base URL] [--fingerprint HEX]`: print the share link that carries the whole spec. */
import { parse, UsageError } from '../args.ts';
import { loadSpec } from '../load.ts';
import { encodeSpecLink, DEFAULT_LINK_BASE } from '../../share/link.ts';

export async function commandShare(args: string[]): Promise<number> {
  const { values, positionals } = parse(args, { base: { type: 'string' }, fingerprint: { type: 'string' } });
  if (positionals.length !== 1) throw new UsageError('usage: farfield share <preset.json | link> [--base URL] [--fingerprint HEX]');
  const loaded = await loadSpec(positionals[0]);
  const fingerprint = values.fingerprint ?? loaded.fingerprint;
  if (fingerprint !== undefined && !/^[0-9a-f]{12}$/.test(fingerprint)) throw new UsageError(`--fingerprint: got "${fingerprint}", allowed 12 lowercase hex digits`);
  const link = await encodeSpecLink(loaded.spec, { base: values.base ?? DEFAULT_LINK_BASE, fingerprint });
  process.stdout.write(link + '\n');
  return 0;
}
