/**
 * A small, strict command-line parser: every flag is declared, unknown flags and missing values
 * are usage errors (exit code 2) with a one-line message naming the flag.
 */

/** Bad usage or bad input: the CLI prints the message on one line and exits with code 2. */
export class UsageError extends Error {
  override readonly name = 'UsageError';
}

export type FlagKind = 'string' | 'boolean';

export interface FlagSpec {
  readonly kind: FlagKind;
  /** May be given more than once (values collected in order). */
  readonly repeatable?: boolean;
  readonly description: string;
  /** Shown in the usage text, e.g. "<dir>". */
  readonly placeholder?: string;
}

export type FlagTable = Readonly<Record<string, FlagSpec>>;

export interface ParsedArgs {
  readonly positional: readonly string[];
  /** Last value of each string flag given. */
  readonly values: ReadonlyMap<string, string>;
  /** All values of repeatable flags. */
  readonly lists: ReadonlyMap<string, readonly string[]>;
  readonly flags: ReadonlySet<string>;
}

/** Parse `argv` (without the command name) against the flag table. Accepts `--flag value` and `--flag=value`. */
export function parseArgs(argv: readonly string[], table: FlagTable): ParsedArgs {
  const positional: string[] = [];
  const values = new Map<string, string>();
  const lists = new Map<string, string[]>();
  const flags = new Set<string>();
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i]!;
    if (!arg.startsWith('--')) {
      positional.push(arg);
      continue;
    }
    const eq = arg.indexOf('=');
    const name = eq >= 0 ? arg.slice(2, eq) : arg.slice(2);
    const spec = table[name];
    if (!spec) throw new UsageError(`unknown flag --${name} (see --help)`);
    if (spec.kind === 'boolean') {
      if (eq >= 0) throw new UsageError(`--${name} takes no value`);
      flags.add(name);
      continue;
    }
    let value: string | undefined;
    if (eq >= 0) value = arg.slice(eq + 1);
    else {
      value = argv[i + 1];
      if (value === undefined || (value.startsWith('--') && value.length > 2)) throw new UsageError(`--${name} needs a value ${spec.placeholder ?? ''}`.trim());
      i++;
    }
    if (spec.repeatable) lists.set(name, [...(lists.get(name) ?? []), value]);
    if (!spec.repeatable && values.has(name)) throw new UsageError(`--${name} given twice`);
    values.set(name, value);
  }
  return { positional, values, lists, flags };
}

/** The value of a required string flag. */
export function requireValue(args: ParsedArgs, name: string): string {
  const v = args.values.get(name);
  if (v === undefined || v === '') throw new UsageError(`missing --${name}`);
  return v;
}

/** A finite number, optionally bounded; `what` names the flag in the message. */
export function parseNumber(text: string, what: string, options: { min?: number; integer?: boolean; positive?: boolean } = {}): number {
  const trimmed = text.trim();
  const value = /^[-+]?(\d+\.?\d*|\.\d+)(e[-+]?\d+)?$/i.test(trimmed) ? Number(trimmed) : Number.NaN;
  if (!Number.isFinite(value)) throw new UsageError(`${what}: "${text}" is not a number`);
  if (options.integer && !Number.isInteger(value)) throw new UsageError(`${what}: "${text}" is not a whole number`);
  if (options.positive && value <= 0) throw new UsageError(`${what}: must be greater than 0 (got ${text})`);
  if (options.min !== undefined && value < options.min) throw new UsageError(`${what}: must be at least ${options.min} (got ${text})`);
  return value;
}

/** A comma-separated list of numbers. */
export function parseNumberList(text: string, what: string, options: { min?: number } = {}): number[] {
  const parts = text.split(',').map((s) => s.trim());
  if (parts.length === 0 || parts.some((p) => p === '')) throw new UsageError(`${what}: expected a comma-separated list of numbers (got "${text}")`);
  return parts.map((p) => parseNumber(p, what, options));
}

/** One of a fixed set of words. */
export function parseChoice<T extends string>(text: string, what: string, choices: readonly T[]): T {
  if ((choices as readonly string[]).includes(text)) return text as T;
  throw new UsageError(`${what}: "${text}" is not one of ${choices.join(', ')}`);
}

/** Usage text generated from the flag table. */
export function formatUsage(command: string, synopsis: string, table: FlagTable): string {
  const rows = Object.entries(table).map(([name, spec]) => {
    const left = `  --${name}${spec.kind === 'string' ? ` ${spec.placeholder ?? '<value>'}` : ''}`;
    return `${left.padEnd(34)} ${spec.description}`;
  });
  return [`usage: brink ${command} ${synopsis}`, '', ...rows].join('\n');
}
