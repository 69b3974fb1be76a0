/**
 * Flags of `brink sweep` and their translation into core settings (attack options, preprocessing,
 * seed, batch size and sample limit). Kept apart from the command so other commands can share them.
 */
import type { FlagTable, ParsedArgs } from './args.ts';
import { UsageError, parseChoice, parseNumber, parseNumberList } from './args.ts';
import type { InputRange, Layout, ModelDescription, Preprocessing } from '../core/types.ts';
import type { TargetMode } from '../core/attacks/types.ts';

export const PREPROCESSING_FLAGS: FlagTable = {
  'input-range': { kind: 'string', placeholder: '0,1|0,255|-1,1', description: 'value range the model expects (default 0,1)' },
  mean: { kind: 'string', placeholder: 'a[,b,c]', description: 'per-channel mean subtracted after range scaling' },
  std: { kind: 'string', placeholder: 'a[,b,c]', description: 'per-channel standard deviation divided after the mean' },
  layout: { kind: 'string', placeholder: 'nhwc|nchw', description: "model input layout (default: detected from the model)" },
};

export const SEARCH_FLAGS: FlagTable = {
  steps: { kind: 'string', placeholder: '<N>', description: 'iterations per restart (iterative searches)' },
  'step-size': { kind: 'string', placeholder: '<A>', description: 'step size in pixel units (default 2.5·ε/steps)' },
  restarts: { kind: 'string', placeholder: '<R>', description: 'restarts of iterative searches (default 1)' },
  'no-random-start': { kind: 'boolean', description: 'start iterative searches at the clean image' },
  loss: { kind: 'string', placeholder: 'ce|margin', description: 'loss on logits the search maximises (default ce)' },
  target: { kind: 'string', placeholder: '<class>|least-likely', description: 'targeted search towards a class (index or name)' },
};

/** Seed, batch size and sample limit, shared by the commands that run searches. */
export const RUN_FLAGS: FlagTable = {
  seed: { kind: 'string', placeholder: '<S>', description: 'random seed (default 0): same seed, same bytes' },
  batch: { kind: 'string', placeholder: '<B>', description: 'samples per batch (default 32)' },
  limit: { kind: 'string', placeholder: '<N>', description: 'use only the first N samples' },
};

/** What RUN_FLAGS set (defaults: seed 0, batches of 32, every sample). */
export interface RunSettings {
  readonly seed: number;
  readonly batchSize: number;
  readonly limit: number | undefined;
}

/** Seed, batch size and limit from RUN_FLAGS (a bad value is a usage error naming the flag). */
export function runSettingsFromFlags(args: ParsedArgs): RunSettings {
  const seed = parseNumber(args.values.get('seed') ?? '0', '--seed', { integer: true, min: 0 });
  const batchSize = parseNumber(args.values.get('batch') ?? '32', '--batch', { integer: true, positive: true });
  const limitText = args.values.get('limit');
  const limit = limitText === undefined ? undefined : parseNumber(limitText, '--limit', { integer: true, positive: true });
  return { seed, batchSize, limit };
}

const INPUT_RANGES: readonly InputRange[] = ['0,1', '0,255', '-1,1'];
const LAYOUTS: readonly Layout[] = ['nhwc', 'nchw'];

/** Preprocessing from flags, starting from what the model description suggests. */
export function preprocessingFromFlags(args: ParsedArgs, base: Preprocessing, description: ModelDescription): Preprocessing {
  const range = args.values.get('input-range');
  const mean = args.values.get('mean');
  const std = args.values.get('std');
  const layout = args.values.get('layout');
  const channelCount = (values: number[], what: string): number[] => {
    if (values.length !== 1 && values.length !== description.channels) {
      throw new UsageError(`--${what}: give 1 value or ${description.channels} (one per channel), got ${values.length}`);
    }
    return values;
  };
  const stdValues = std === undefined ? base.std : channelCount(parseNumberList(std, '--std'), 'std');
  if (stdValues.some((s) => s <= 0)) throw new UsageError('--std: every value must be greater than 0');
  return {
    inputRange: range === undefined ? base.inputRange : parseChoice(range, '--input-range', INPUT_RANGES),
    mean: mean === undefined ? base.mean : channelCount(parseNumberList(mean, '--mean'), 'mean'),
    std: stdValues,
    layout: layout === undefined ? base.layout : parseChoice(layout, '--layout', LAYOUTS),
  };
}

/** Resolve --target against the class names (an index or a name), or least-likely. */
export function targetFromFlag(text: string | undefined, classNames: readonly string[]): TargetMode {
  if (text === undefined) return { kind: 'untargeted' };
  if (text === 'least-likely') return { kind: 'least-likely' };
  const byName = classNames.indexOf(text);
  if (byName >= 0) return { kind: 'class', classIndex: byName };
  if (/^\d+$/.test(text)) {
    const index = Number(text);
    if (index >= classNames.length) throw new UsageError(`--target: class ${index} is out of range 0..${classNames.length - 1}`);
    return { kind: 'class', classIndex: index };
  }
  throw new UsageError(`--target: "${text}" is neither least-likely, a class index nor one of the class names`);
}

/** Raw search options from flags; each attack keeps the ones it knows (see attackOptionsFor). */
export function searchOptionsFromFlags(args: ParsedArgs, target: TargetMode): Record<string, unknown> {
  const options: Record<string, unknown> = { target };
  const steps = args.values.get('steps');
  if (steps !== undefined) options['steps'] = parseNumber(steps, '--steps', { integer: true, positive: true });
  const stepSize = args.values.get('step-size');
  if (stepSize !== undefined) options['stepSize'] = parseNumber(stepSize, '--step-size', { positive: true });
  const restarts = args.values.get('restarts');
  if (restarts !== undefined) options['restarts'] = parseNumber(restarts, '--restarts', { integer: true, positive: true });
  if (args.flags.has('no-random-start')) options['randomStart'] = false;
  const loss = args.values.get('loss');
  if (loss !== undefined) options['loss'] = parseChoice(loss, '--loss', ['ce', 'margin']);
  return options;
}

/** Keep only the options an attack declares in its defaults. */
export function attackOptionsFor(defaults: object, options: Readonly<Record<string, unknown>>): Record<string, unknown> {
  const known = new Set(Object.keys(defaults));
  return Object.fromEntries(Object.entries(options).filter(([key]) => known.has(key)));
}
