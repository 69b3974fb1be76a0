/**
 * Brink's command line: a thin Node adapter over src/core.
 * Exit codes: 0 success, 1 an internal failure, 2 bad usage or bad input (one-line message).
 */
import { parseArgs, UsageError, type FlagTable, type ParsedArgs } from './args.ts';
import { SWEEP_FLAGS, SWEEP_USAGE, sweepCommand } from './sweepCommand.ts';

interface Command {
  readonly flags: FlagTable;
  readonly usage: string;
  readonly run: (args: ParsedArgs) => Promise<void>;
}

const COMMANDS: Readonly<Record<string, Command>> = {
  sweep: { flags: SWEEP_FLAGS, usage: SWEEP_USAGE, run: sweepCommand },
};

const HELP = `brink — adversarial robustness sweeps for image classifiers, on your own machine.

commands:
  sweep    attacks × budgets over a labelled sample set → curve.csv, samples.csv, run.json

Run "npm run -s cli -- <command> --help" for a command's flags.`;

async function main(argv: readonly string[]): Promise<number> {
  const [name, ...rest] = argv;
  if (name === undefined || name === '--help' || name === 'help') {
    process.stdout.write(`${HELP}\n`);
    return name === undefined ? 2 : 0;
  }
  const command = COMMANDS[name];
  if (!command) throw new UsageError(`unknown command "${name}" (commands: ${Object.keys(COMMANDS).join(', ')})`);
  await command.run(parseArgs(rest, command.flags));
  return 0;
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
