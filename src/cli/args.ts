/**
 * Argument helpers shared by `main.ts` and every command: kept apart from
 * `main.ts` so the commands never import the module that imports them.
 */
import { parseArgs, type ParseArgsConfig } from 'node:util';

/** A mistake in how the command was called: printed as one line, exit code 2. */
export class UsageError extends Error {}

export function parse<const T extends NonNullable<ParseArgsConfig['options']>>(args: string[], options: T) {
  try {
    return parseArgs({ args, options, allowPositionals: true as const, strict: true as const });
  } catch (error) {
    throw new UsageError(error instanceof Error ? error.message : String(error));
  }
}

/** Whole number within a range, or a usage error naming the flag. */
export function intFlag(name: string, value: string | undefined, min: number, max: number): number | undefined {
  if (value === undefined) return undefined;
  const n = Number(value);
  if (!Number.isInteger(n) || n < min || n > max) throw new UsageError(`--${name}: got "${value}", allowed a whole number ${min}..${max}`);
  return n;
}
