/**
 * `farfield bench`: the performance numbers of DESIGN.md "Performance method"
 * measured in one run (see bench/run-bench.ts); a readable report, or the
 * JSON document with --json.
 */
import { parse, intFlag, UsageError } from '../args.ts';

export async function commandBench(args: string[]): Promise<number> {
  const { values, positionals } = parse(args, {
    json: { type: 'boolean' },
    quick: { type: 'boolean' },
    quiet: { type: 'boolean' },
    presets: { type: 'string' },
    'skip-presets': { type: 'boolean' },
    'skip-browser': { type: 'boolean' },
    'skip-scaling': { type: 'boolean' },
    'long-steps': { type: 'string' },
    seconds: { type: 'string' },
    workers: { type: 'string' },
    'preset-timeout': { type: 'string' },
  });
  if (positionals.length) throw new UsageError(`unexpected argument "${positionals[0]}"; usage: farfield bench [--quick] [--json] [--presets a,b | --skip-presets] [--skip-browser] [--skip-scaling] [--long-steps N]`);
  // Loaded on demand, so other commands (and the `run` children the bench times) never load the bench code.
  const { defaultOptions, runBench } = await import('../../../bench/run-bench.ts');
  const { renderReport } = await import('../../../bench/report.ts');
  const { choosePresets } = await import('../../../bench/presets.ts');
  const quick = Boolean(values.quick);
  const options = defaultOptions(quick);
  if (values.presets !== undefined) {
    if (values['skip-presets']) throw new UsageError('--presets and --skip-presets exclude each other');
    try {
      choosePresets(values.presets); // refuse unknown names before minutes of measuring
    } catch (error) {
      throw new UsageError(error instanceof Error ? error.message.replace(/^bench\/presets: /, '--presets: ') : String(error));
    }
    options.presets = values.presets;
    options.skipPresets = false;
  }
  if (values['skip-presets']) options.skipPresets = true;
  if (values['skip-browser']) options.browser = false;
  if (values['skip-scaling']) options.presetScaling = false;
  options.longSteps = intFlag('long-steps', values['long-steps'], 10, 1_000_000) ?? options.longSteps;
  const seconds = intFlag('seconds', values.seconds, 1, 3600);
  if (seconds !== undefined) options.seconds = seconds;
  options.workers = intFlag('workers', values.workers, 1, 64) ?? options.workers;
  options.presetTimeoutSeconds = intFlag('preset-timeout', values['preset-timeout'], 10, 86_400) ?? options.presetTimeoutSeconds;

  const log = values.quiet ? () => {} : (line: string) => process.stderr.write(`bench: ${line}\n`);
  // Ctrl-C while presets run stops them and still prints everything measured
  // (a second Ctrl-C quits). Before the presets, Ctrl-C quits at once as usual:
  // the handler is installed only for that phase, since in-process training
  // blocks the event loop and would delay it.
  const stop = new AbortController();
  const interrupt = () => {
    if (stop.signal.aborted) process.exit(130);
    process.stderr.write('bench: interrupted: stopping the presets, then printing what was measured (Ctrl-C again to quit)\n');
    stop.abort();
  };
  options.stopPresets = stop.signal;
  options.onPhase = (phase) => {
    if ((phase !== 'presets' && phase !== 'browser') || process.listeners('SIGINT').includes(interrupt)) return;
    process.on('SIGINT', interrupt);
    process.on('SIGTERM', interrupt);
  };
  let doc;
  try {
    doc = await runBench(options, log);
  } finally {
    process.removeListener('SIGINT', interrupt);
    process.removeListener('SIGTERM', interrupt);
  }
  process.stdout.write(values.json ? JSON.stringify(doc, null, 1) + '\n' : renderReport(doc) + '\n');
  return 0;
}
