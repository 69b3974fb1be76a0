/**
 * Brink's command line: a thin Node adapter over src/core.
 * Exit codes: 0 success, 1 an internal failure, 2 bad usage or bad input (one-line message).
 */
import { parseArgs, UsageError, type FlagTable, type ParsedArgs } from './args.ts';
import { SWEEP_FLAGS, SWEEP_USAGE, sweepCommand } from './sweepCommand.ts';
import { FLIPS_FLAGS, FLIPS_USAGE, flipsCommand } from './flipsCommand.ts';
import { REPORT_FLAGS, REPORT_USAGE, reportCommand } from './reportCommand.ts';
import { COMPARE_FLAGS, COMPARE_USAGE, compareCommand } from './compareCommand.ts';
import { GATE_FLAGS, GATE_USAGE, gateCommand } from './gateCommand.ts';
import { DESCRIBE_FLAGS, DESCRIBE_USAGE, describeCommand } from './describeCommand.ts';

interface Command {
  readonly flags: FlagTable;
  readonly usage: string;
  /** Resolves with the exit code, or nothing for 0 (the gate returns 1 when a threshold fails). */
  readonly run: (args: ParsedArgs) => Promise<void | number>;
}

const COMMANDS: Readonly<Record<string, Command>> = {
  sweep: { flags: SWEEP_FLAGS, usage: SWEEP_USAGE, run: sweepCommand },
  flips: { flags: FLIPS_FLAGS, usage: FLIPS_USAGE, run: flipsCommand },
  report: { flags: REPORT_FLAGS, usage: REPORT_USAGE, run: reportCommand },
  compare: { flags: COMPARE_FLAGS, usage: COMPARE_USAGE, run: compareCommand },
  gate: { flags: GATE_FLAGS, usage: GATE_USAGE, run: gateCommand },
  describe: { flags: DESCRIBE_FLAGS, usage: DESCRIBE_USAGE, run: describeCommand },
};

const HELP = `brink — adversarial robustness sweeps for image classifiers, on your own machine.

commands:
  sweep    attacks × budgets over a labelled sample set → curve.csv, samples.csv, run.json, run.brink.json (--health: health.csv)
  flips    the smallest budget that flips each sample (bisection over ε, or DeepFool) → flips.csv
  report   one self-contained HTML report of a sweep's run folder (run.brink.json) → report.html
  compare  two or more run folders side by side → comparison.csv, comparison.svg
  gate     exit 1 when a run's robust accuracy is below a threshold (for CI pipelines)
  describe what Brink detects about a model: input, layout, classes, output kind (ONNX: opset, operators)

Run "npm run -s cli -- <command> --help" for a command's flags.`;

async function main(argv: readonly string[]): Promise<number> {
  const [name, ...rest] = argv;
  if (name === undefined || name === '--help' || name === 'help') {
    process.stdout.write(`${HELP}\n`);
    return name === undefined ? 2 : 0;
  }
  const command = COMMANDS[name];
  if (!command) throw new UsageError(`unknown command "${name}" (commands: ${Object.keys(COMMANDS).join(', ')})`);
  return (await command.run(parseArgs(rest, command.flags))) ?? 0;
}

main(process.argv.slice(2)).then(
  (code) => process.exit(code),
  (err: unknown) => {
    if (err instanceof UsageError) {
      process.stderr.write(`brink: ${err.message}\n`);
      process.exit(2);
    }
    process.stderr.write(`brink: internal error: ${err instanceof Error ? (err.stack ?? err.message) : String(err)}\n`);
    process.exit(1);
  },
);
