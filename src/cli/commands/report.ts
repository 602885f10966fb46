/**
 * `farfield report results.json [--out report.html] [--base URL]`: one
 * self-contained HTML file with the question, the arms, the setup, every
 * figure as inline SVG, the verdicts with their caveats, and how to reproduce
 * them. The figures are the sheet's own, drawn into linkedom's light DOM (Node
 * has no document); the report itself is built by src/report/report.ts, the
 * same module the sheet's button uses.
 */
import { readFileSync, statSync, writeFileSync } from 'node:fs';
import { parse, UsageError } from '../args.ts';
import { readResultsText, ResultsFileError, RESULTS_MAX_BYTES } from '../../report/results-file.ts';

const USAGE = 'usage: farfield report <results.json> [--out report.html] [--base URL]';

function readResultsFile(path: string) {
  let text: string;
  try {
    const size = statSync(path).size;
    if (size > RESULTS_MAX_BYTES) throw new Error(`${size} bytes, allowed at most ${RESULTS_MAX_BYTES}`);
    text = readFileSync(path, 'utf8');
  } catch (error) {
    throw new Error(`cli/report: ${path}: ${error instanceof Error ? error.message : String(error)}`);
  }
  try {
    return readResultsText(text, path);
  } catch (error) {
    if (error instanceof ResultsFileError) throw new Error(`cli/report: ${error.message}`);
    throw error;
  }
}

export async function commandReport(args: string[]): Promise<number> {
  const { values, positionals } = parse(args, { out: { type: 'string' }, base: { type: 'string' } });
  if (positionals.length !== 1) throw new UsageError(USAGE);
  if (values.base !== undefined && !/^https?:\/\/\S+$/.test(values.base)) throw new UsageError(`--base: got "${values.base}", allowed an http(s) address of the sheet`);
  const { doc, fingerprintMismatch, fingerprintUnverified } = readResultsFile(positionals[0]!);
  if (fingerprintUnverified) {
    process.stderr.write(`report: some errors in the file are not finite numbers, which JSON stores as null; its fingerprint ${doc.fingerprint} is shown as recorded, unchecked\n`);
  }
  if (fingerprintMismatch) {
    process.stderr.write(`report: the file says fingerprint ${fingerprintMismatch}, its runs give ${doc.fingerprint}; the report shows ${doc.fingerprint}\n`);
  }
  // Loaded here, not at the top: every other command would pay for the figure code at start-up.
  const [{ parseHTML }, { buildReport }] = await Promise.all([import('linkedom'), import('../../report/report.ts')]);
  const { document } = parseHTML('<!doctype html><html><head></head><body></body></html>');
  const html = await buildReport(doc, { document: document as unknown as Document, fingerprintUnverified, ...(values.base ? { linkBase: values.base } : {}) });
  if (values.out) {
    writeFileSync(values.out, html);
    process.stderr.write(`report: wrote ${values.out} (${Math.round(html.length / 1024)} kB; opens offline, prints to A4)\n`);
  } else {
    process.stdout.write(html);
  }
  return 0;
}
