/** `farfield` command line: run, check, sample, and the rest; user errors print one clear message and exit 1. */
import { SpecError } from '../experiment/spec.ts';
import { UsageError } from './args.ts';
import { commandRun } from './commands/run.ts';
import { commandCheck } from './commands/check.ts';
import { commandSample } from './commands/sample.ts';
import { commandProbe } from './commands/probe.ts';
import { commandMerge } from './commands/merge.ts';
import { commandBench } from './commands/bench.ts';
import { commandShare } from './commands/share.ts';
import { commandReport } from './commands/report.ts';
import { commandScore } from './commands/score.ts';

const HELP = `farfield — does this message-passing architecture keep working on larger graphs?

Commands:
  run <preset.json | link> [--seeds N] [--workers K] [--out FILE] [--json] [--shard i/N] [--resume] [--backend wasm|cpu] [--quiet] [--keep-networks DIR]
      train every arm on every seed, score on the size ladder, print the table and verdicts
      --graphs a.gr,b.csv  add graph files as rungs (or supply the files a shared link names)
      (--keep-networks: save each trained network as DIR/run<i>-<arm>-seed<s>.json + .bin, TensorFlow.js weights format)
  check <preset.json | link>
      validate; print the normalised spec and its hash
  sample --task ID --family ID --nodes N [--count C] [--seed S] [--scale X] [--weights LO,HI]
      print generated graphs with their exact targets as JSON
  sample --task ID --graphs FILE [--source ID] [--weight COLUMN] [--directed]
      print a graph file's graph with its exact targets, in the same JSON
  probe <preset.json | link> [--json] [--seeds N] [--arms a,b]
      train each arm on the first seed (or N), print the algebraic audit, learned-vs-true probes and the alignment trace

  share <preset.json | link> [--base URL] [--fingerprint HEX]
      print a share link carrying the whole spec (open it in the sheet, or pass it to run)
  merge part-1.json part-2.json ... [--out FILE] [--json]
      combine shard results (run --shard i/N) and recompute the statistics
  report <results.json> [--out report.html] [--base URL]
      one self-contained HTML file: question, arms, setup, every figure, verdicts with caveats, fingerprint and share link; opens offline, prints to A4
  score <network.json> [<preset.json | link>] [--graphs a.gr,b.csv] [--json]
      score a saved network on its own ladder (must reproduce its run's errors exactly), another preset's, or graph files, without retraining
  bench [--quick] [--json] [--presets a,b | --skip-presets] [--long-steps N] [--seconds S] [--workers K]
      measure WASM vs CPU training speed, FLOP/s, worker scaling, preset wall times and tensor leaks; check the speed targets

Exit codes: 0 done, 1 bad input or failed command, 2 usage error.`;

export type Command = (args: string[]) => Promise<number>;

const COMMANDS: Record<string, Command> = {
  run: commandRun,
  check: commandCheck,
  sample: commandSample,
  probe: commandProbe,
  merge: commandMerge,
  share: commandShare,
  report: commandReport,
  score: commandScore,
  bench: commandBench,
};

export async function main(argv: string[]): Promise<number> {
  const [name, ...rest] = argv;
  if (!name || name === 'help' || name === '--help' || name === '-h') {
    process.stdout.write(HELP + '\n');
    return name ? 0 : 2;
  }
  const command = COMMANDS[name];
  if (!command) {
    process.stderr.write(`farfield: unknown command "${name}"; known: ${Object.keys(COMMANDS).join(', ')}\n`);
    return 2;
  }
  try {
    return await command(rest);
  } catch (error) {
    if (error instanceof UsageError) {
      process.stderr.write(`farfield ${name}: ${error.message}\n`);
      return 2;
    }
    if (error instanceof SpecError || (error instanceof Error && /^(LinkError|PresetError|SpecError|GraphFileError)$/.test(error.name))) {
      process.stderr.write(`farfield ${name}: ${error.message}\n`);
      return 1;
    }
    if (error instanceof Error && (error as NodeJS.ErrnoException).code === 'ERR_PARSE_ARGS_UNKNOWN_OPTION') {
      process.stderr.write(`farfield ${name}: ${error.message}\n`);
      return 2;
    }
    // A user-facing error from the engine ("tasks/x: ..."): no stack trace.
    if (error instanceof Error && /^[a-z-]+\/[a-z-]+: /.test(error.message)) {
      process.stderr.write(`farfield ${name}: ${error.message}\n`);
      return 1;
    }
    throw error;
  }
}
