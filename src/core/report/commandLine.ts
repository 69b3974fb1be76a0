/**
 * The command line that recreates a saved run's numbers: the recorded one for a CLI run, or, for a
 * workbench run, the equivalent `sweep` command built from its configuration (with notes where the
 * command line cannot say exactly what the workbench did).
 */
import { getAttack } from '../attacks/registry.ts';
import type { TargetMode } from '../attacks/types.ts';
import { epsLabeller } from '../export/epsLabels.ts';
import type { SavedRun } from '../savedRun/types.ts';
import { DEFAULT_RESIZE } from '../samples/crop.ts';

export interface ReproduceCommand {
  /** One shell command line (POSIX quoting). */
  readonly command: string;
  /** False when the command line cannot express every setting of the run (see notes). */
  readonly exact: boolean;
  readonly notes: readonly string[];
}

/** Quote an argument for a POSIX shell when it holds anything beyond plain path characters. */
export function shellQuote(arg: string): string {
  if (arg !== '' && /^[A-Za-z0-9_./,:=@%+-]+$/.test(arg)) return arg;
  return `'${arg.replace(/'/g, `'\\''`)}'`;
}

/** CLI flag of each search option, and how a value is written (null: leave the flag out). */
const OPTION_FLAGS: Readonly<Record<string, { flag: string; write: (value: unknown) => string[] | null }>> = {
  steps: { flag: '--steps', write: (v) => [String(v)] },
  stepSize: { flag: '--step-size', write: (v) => (v === null ? null : [String(v)]) },
  restarts: { flag: '--restarts', write: (v) => [String(v)] },
  randomStart: { flag: '--no-random-start', write: (v) => (v === false ? [] : null) },
  loss: { flag: '--loss', write: (v) => [String(v)] },
  target: { flag: '--target', write: (v) => targetArg(v as TargetMode) },
  queries: { flag: '--queries', write: (v) => [String(v)] },
  pInit: { flag: '--p-init', write: (v) => (v === null ? null : [String(v)]) },
  draws: { flag: '--draws', write: (v) => [String(v)] },
  topK: { flag: '--top-k', write: (v) => [String(v)] },
  overshoot: { flag: '--overshoot', write: (v) => [String(v)] },
  maxIterations: { flag: '--max-iterations', write: (v) => [String(v)] },
};

function targetArg(target: TargetMode): string[] | null {
  if (target.kind === 'untargeted') return null;
  return [target.kind === 'least-likely' ? 'least-likely' : String(target.classIndex)];
}

/** The command for a saved run. */
export function reproduceCommand(saved: SavedRun): ReproduceCommand {
  const recorded = saved.run.commandLine;
  if (recorded !== undefined && recorded.length > 0) {
    return {
      command: recorded.map(shellQuote).join(' '),
      exact: true,
      notes: ['Run it from the repository root of the same Brink version, with the model and sample files at the paths shown; the SHA-256 values in this report identify those files.'],
    };
  }
  return workbenchCommand(saved);
}

/** The sweep command equivalent to a workbench run's configuration. */
function workbenchCommand(saved: SavedRun): ReproduceCommand {
  const { config, preprocessing, model, samples } = saved.run;
  const notes: string[] = [];
  const modelFile = model.files.find((f) => /\.(json|onnx)$/i.test(f.name))?.name ?? 'model.json';
  const args = ['npm', 'run', '-s', 'cli', '--', 'sweep', '--model', `model/${modelFile}`, '--samples', 'samples/'];
  if (samples.classNames !== undefined && samples.classNames.length > 0) {
    args.push('--classes', 'classes.txt');
    notes.push('classes.txt: the class names listed in this report, one per line, in index order.');
  }
  const label = epsLabeller(config);
  args.push('--attack', config.attacks.map((a) => a.id).join(','), '--norm', config.norm, '--eps', config.eps.map(label).join(','));
  const conflicts = optionArgs(saved, args);
  if (samples.resize !== undefined && samples.resize !== DEFAULT_RESIZE) args.push('--resize', samples.resize);
  args.push('--input-range', preprocessing.inputRange, '--mean', preprocessing.mean.join(','), '--std', preprocessing.std.join(','), '--layout', preprocessing.layout);
  args.push('--seed', String(config.seed), '--batch', String(config.batchSize), '--out', 'brink-rerun');
  notes.unshift('Built from the workbench run\'s configuration: model/ holds the model files and samples/ the sample files as loaded (a folder per class, or the CSV manifest with its images); the SHA-256 values in this report identify them.');
  if (conflicts.length > 0) notes.push(`Not exact: the command line sets one value per option for every search, and not every option has a flag; this run used ${conflicts.join(', ')}. Where searches differ, the flags above take the first search's value.`);
  notes.push('The browser and Node builds of the WASM backend may differ in the last bits of floating-point results, which can move a sample that sits exactly on a decision boundary.');
  return { command: args.map(shellQuote).join(' '), exact: conflicts.length === 0, notes };
}

/** Append the search-option flags; returns the options whose values differ between searches. */
function optionArgs(saved: SavedRun, args: string[]): string[] {
  const conflicts: string[] = [];
  for (const a of saved.run.config.attacks) {
    const defaults = getAttack(a.id).meta.defaults as Record<string, unknown>;
    for (const [key, value] of Object.entries(a.options)) {
      if (!(key in OPTION_FLAGS) && JSON.stringify(defaults[key]) !== JSON.stringify(value)) conflicts.push(`${key} (${a.id}: no command-line flag)`);
    }
  }
  for (const [key, spec] of Object.entries(OPTION_FLAGS)) {
    const users = saved.run.config.attacks.filter((a) => key in a.options);
    if (users.length === 0) continue;
    const values = users.map((a) => JSON.stringify(a.options[key]));
    // Each search left at its own default: the CLI's defaults give the same values without the flag.
    const allDefault = users.every((a, i) => JSON.stringify((getAttack(a.id).meta.defaults as Record<string, unknown>)[key]) === values[i]);
    if (allDefault) continue;
    if (new Set(values).size > 1) conflicts.push(`${key} (${users.map((a, i) => `${a.id} ${values[i]}`).join(', ')})`);
    const written = spec.write(users[0]!.options[key]);
    if (written !== null) args.push(spec.flag, ...written);
  }
  return conflicts;
}
