/**
 * `brink flips`: the minimal flip budget of every sample (the smallest ε at which a search flips it,
 * by bisection over ε, or DeepFool's estimate), written to flips.csv in --out.
 */
import { mkdir, writeFile } from 'node:fs/promises';
import path from 'node:path';
import type { FlagTable, ParsedArgs } from './args.ts';
import { UsageError, formatUsage, parseChoice, parseNumber, requireValue } from './args.ts';
import { PREPROCESSING_FLAGS, RUN_FLAGS, SEARCH_FLAGS, attackOptionsFor, runSettingsFromFlags, searchOptionsFromFlags } from './sweepFlags.ts';
import { EXTRA_SEARCH_FLAGS, extraSearchOptionsFromFlags } from './searchOptionFlags.ts';
import { INPUT_FLAGS, loadInputsFromFlags, resizeFromFlags } from './loadInputs.ts';
import { startNodeBackend } from './nodePlatform.ts';
import { getAttack } from '../core/attacks/registry.ts';
import { pgdMeta } from '../core/attacks/pgd.ts';
import { makeLogitsFn } from '../core/models/pipeline.ts';
import { runFlipBudgets } from '../core/flips/runFlipBudgets.ts';
import { DEFAULT_TOL, checkBisectionSettings, defaultMaxEps } from '../core/flips/defaults.ts';
import { FLIP_SEARCH_IDS, validateFlipOptions } from '../core/flips/searches.ts';
import type { FlipBudgetConfig, FlipProgress, FlipSearchId } from '../core/flips/types.ts';
import { flipsCsv } from '../core/export/flipsCsv.ts';
import type { Norm } from '../core/types.ts';

const { target: _target, ...UNTARGETED_SEARCH_FLAGS } = SEARCH_FLAGS;

export const FLIPS_FLAGS: FlagTable = {
  ...INPUT_FLAGS,
  norm: { kind: 'string', placeholder: 'linf|l2', description: 'threat model norm, in pixel units on [0,1]' },
  attack: { kind: 'string', placeholder: FLIP_SEARCH_IDS.join('|'), description: 'search whose flip budgets are measured (default pgd; deepfool: its estimate, no bisection)' },
  'max-eps': { kind: 'string', placeholder: '<E>', description: 'largest budget tried (default: L∞ 0.5, L2 0.5·√pixels, where any image can become flat grey)' },
  tol: { kind: 'string', placeholder: '<T>', description: `bisection tolerance in pixel units (default 1/510 ≈ ${DEFAULT_TOL.toFixed(5)}, half a grey level)` },
  ...UNTARGETED_SEARCH_FLAGS,
  restarts: { kind: 'string', placeholder: '<R>', description: 'restarts per search (pgd default 2: the warm start, then a random one; apgd-ce default 1)' },
  loss: { kind: 'string', placeholder: 'ce|margin', description: 'pgd: loss on logits (default margin, which heads for the nearest boundary)' },
  'top-k': EXTRA_SEARCH_FLAGS['top-k']!,
  overshoot: EXTRA_SEARCH_FLAGS['overshoot']!,
  'max-iterations': EXTRA_SEARCH_FLAGS['max-iterations']!,
  ...PREPROCESSING_FLAGS,
  ...RUN_FLAGS,
  out: { kind: 'string', placeholder: '<dir>', description: 'folder for flips.csv' },
  help: { kind: 'boolean', description: 'show this text' },
};

export const FLIPS_USAGE = formatUsage('flips', '--model <model.json> --samples <dir|csv> --norm linf|l2 [--attack pgd|apgd-ce|deepfool] [--max-eps E] [--tol T] --out <dir> [options]', FLIPS_FLAGS);

const NORMS: readonly Norm[] = ['linf', 'l2'];

/** Run the flips command; resolves when flips.csv is written. */
export async function flipsCommand(args: ParsedArgs): Promise<void> {
  if (args.flags.has('help')) {
    process.stdout.write(`${FLIPS_USAGE}\n`);
    return;
  }
  if (args.positional.length > 0) throw new UsageError(`unexpected argument "${args.positional[0]}"`);
  const outDir = requireValue(args, 'out');
  const norm = parseChoice(requireValue(args, 'norm'), '--norm', NORMS);
  const search = parseChoice(args.values.get('attack') ?? 'pgd', '--attack', FLIP_SEARCH_IDS);
  const options = searchOptions(args, search);
  const { seed, batchSize, limit } = runSettingsFromFlags(args);
  const maxEpsText = args.values.get('max-eps');
  const givenMaxEps = maxEpsText === undefined ? null : parseNumber(maxEpsText, '--max-eps', { positive: true });
  const tol = parseNumber(args.values.get('tol') ?? String(DEFAULT_TOL), '--tol', { positive: true });
  if (givenMaxEps !== null) asUsage(() => checkBisectionSettings(givenMaxEps, tol));
  resizeFromFlags(args); // a bad --resize fails before the backend starts

  await startNodeBackend();
  const inputs = await loadInputsFromFlags(args, limit);
  try {
    const { samples } = inputs;
    const maxEps = givenMaxEps ?? defaultMaxEps(norm, samples.height * samples.width * samples.channels);
    asUsage(() => checkBisectionSettings(maxEps, tol));
    const config: FlipBudgetConfig = { search, norm, maxEps, tol, options, seed, batchSize };
    const logits = makeLogitsFn(inputs.model, inputs.preprocessing);
    const result = await runFlipBudgets({ logits, samples, config }, { onProgress: flipProgress() });
    await mkdir(outDir, { recursive: true });
    await writeFile(path.join(outDir, 'flips.csv'), flipsCsv(result.records));
    const never = result.records.filter((r) => r.flipEps === null).length;
    const median = result.medianFlipEps === null ? `above ${maxEps}` : Number.isNaN(result.medianFlipEps) ? 'n/a' : result.medianFlipEps.toFixed(6);
    process.stderr.write(`brink: ${search} ${norm}: median flip budget ${median} over ${result.cleanCorrect} clean-correct samples, ${never} not flipped up to ${maxEps}; wrote flips.csv to ${outDir}\n`);
  } finally {
    inputs.model.dispose();
  }
}

/** The search's options from the flags, completed and checked by the search (a bad value is a usage error). */
function searchOptions(args: ParsedArgs, search: FlipSearchId): Record<string, unknown> {
  const raw = { ...searchOptionsFromFlags(args, { kind: 'untargeted' }), ...extraSearchOptionsFromFlags(args) };
  const defaults = search === 'pgd' ? pgdMeta.defaults : getAttack(search).meta.defaults;
  return asUsage(() => validateFlipOptions(search, attackOptionsFor(defaults as object, raw)));
}

function asUsage<T>(fn: () => T): T {
  try {
    return fn();
  } catch (err) {
    throw new UsageError(err instanceof Error ? err.message : String(err));
  }
}

/** Progress lines on stderr, at most one every half second. */
function flipProgress(intervalMs = 500): (p: FlipProgress) => void {
  let last = 0;
  return (p) => {
    const now = Date.now();
    if (now - last < intervalMs && p.done < p.total) return;
    last = now;
    process.stderr.write(`brink: flips: ${p.done}/${p.total} samples done (${p.probes} searches)\n`);
  };
}
