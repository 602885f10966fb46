/**
 * The codec's one door to the spec checker. `validateSpec` should only ever
 * throw SpecError; if it throws anything else (a checker bug reached by odd
 * input), the codec still answers with a SpecError that says so, rather than
 * leaking a TypeError to whoever opened the link.
 */
import { validateSpec } from '../experiment/check.ts';
import { SpecError, type ExperimentSpec } from '../experiment/spec.ts';

export function validateUntrusted(value: unknown): ExperimentSpec {
  try {
    return validateSpec(value);
  } catch (err) {
    if (err instanceof SpecError) throw err;
    const detail = err instanceof Error ? `${err.name}: ${err.message}` : String(err);
    throw new SpecError([`the spec checker failed on this input (${detail.split('\n')[0]}); this is a bug in Farfield, please report it with the link or file`]);
  }
}

/** The field a SpecError problem names ("train.sizes[0]: got ..." -> "train.sizes[0]"), if any. */
export function problemField(problem: string | undefined): string | undefined {
  const match = /^([A-Za-z_$][\w$]*(?:\.[A-Za-z_$][\w$]*|\[\d+\])*): /.exec(problem ?? '');
  return match?.[1];
}
