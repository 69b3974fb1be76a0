/**
 * `brink gate --run <run-dir> --min-accuracy <acc>@<eps> ...`: a check for CI pipelines. Exit 0 when
 * every threshold holds, 1 with one line naming the first that fails (a point the run lacks fails
 * too: the run does not show the requirement), 2 for bad usage.
 */
import type { FlagTable, ParsedArgs } from './args.ts';
import { UsageError, formatUsage, parseChoice, parseNumber, requireValue } from './args.ts';
import { readSavedRun } from './savedRunFiles.ts';
import { attackIds, isAttackId } from '../core/attacks/registry.ts';
import type { AttackId } from '../core/attacks/types.ts';
import { fixed6 } from '../core/export/csvFormat.ts';
import { epsLabeller } from '../core/export/epsLabels.ts';
import type { SavedRun } from '../core/savedRun/types.ts';
import type { CurvePoint } from '../core/sweep/types.ts';
import type { Norm } from '../core/types.ts';

export const GATE_FLAGS: FlagTable = {
  run: { kind: 'string', placeholder: '<run-dir>', description: 'run folder written by sweep (or its run.brink.json)' },
  'min-accuracy': { kind: 'string', repeatable: true, placeholder: '<acc>@<eps>', description: 'required robust accuracy at a budget of the run (or one at most 1e-4 above), e.g. 0.6@0.0314, 60%@8/255 (repeatable)' },
  attack: { kind: 'string', placeholder: '<id>', description: 'check only this search (default: every search in the run must hold)' },
  norm: { kind: 'string', placeholder: 'linf|l2', description: 'the norm the thresholds are meant for (the run must use it)' },
  'lower-bound': { kind: 'boolean', description: 'compare the Wilson 95 % lower bound instead of the measured accuracy' },
  help: { kind: 'boolean', description: 'show this text' },
};

export const GATE_USAGE = formatUsage('gate', '--run <run-dir> --min-accuracy <acc>@<eps> [--min-accuracy ...] [--attack <id>] [--norm linf|l2]', GATE_FLAGS);

/** One required robust accuracy at one budget. */
export interface Threshold {
  readonly text: string;
  readonly accuracy: number;
  readonly eps: number;
  readonly epsText: string;
}

/** Budgets closer than this are the same budget. */
const EPS_TOLERANCE = 1e-9;
/**
 * A run budget up to this much above the required one also counts (so 8/255 finds a run's 0.0314):
 * a larger budget can only lower robust accuracy, since the sweep's budgets are nested balls.
 */
const EPS_ABOVE = 1e-4;

/** Run the gate; resolves with 0 (all thresholds hold) or 1 (one failed, reason on stderr). */
export async function gateCommand(args: ParsedArgs): Promise<number> {
  if (args.flags.has('help')) {
    process.stdout.write(`${GATE_USAGE}\n`);
    return 0;
  }
  if (args.positional.length > 0) throw new UsageError(`unexpected argument "${args.positional[0]}"`);
  const target = requireValue(args, 'run');
  const texts = args.lists.get('min-accuracy') ?? [];
  if (texts.length === 0) throw new UsageError('missing --min-accuracy <acc>@<eps>');
  const thresholds = texts.map(parseThreshold);
  const attack = attackFlag(args.values.get('attack'));
  const normText = args.values.get('norm');
  const norm = normText === undefined ? undefined : parseChoice(normText, '--norm', ['linf', 'l2'] as const);
  const { run } = await readSavedRun(target);
  const failure = firstFailure(run, thresholds, { attack, norm, lowerBound: args.flags.has('lower-bound') });
  if (failure !== null) {
    process.stderr.write(`brink: gate failed: ${failure}\n`);
    return 1;
  }
  process.stdout.write(`brink: gate passed: ${thresholds.map((t) => t.text).join(', ')} hold${thresholds.length === 1 ? 's' : ''} for ${attack ?? 'every search'} in ${target}\n`);
  return 0;
}

/** "0.6@0.0314", "60%@8/255" → a threshold. */
export function parseThreshold(text: string): Threshold {
  const at = text.lastIndexOf('@');
  if (at <= 0 || at === text.length - 1) throw new UsageError(`--min-accuracy: "${text}" is not <accuracy>@<eps> (e.g. 0.6@0.0314)`);
  const accText = text.slice(0, at).trim();
  const epsText = text.slice(at + 1).trim();
  const accuracy = accText.endsWith('%') ? parseNumber(accText.slice(0, -1), '--min-accuracy', { min: 0 }) / 100 : parseNumber(accText, '--min-accuracy', { min: 0 });
  if (accuracy > 1) throw new UsageError(`--min-accuracy: accuracy "${accText}" is above 1 (write 0.6 or 60%)`);
  return { text, accuracy, eps: parseBudget(epsText), epsText };
}

/** A budget as a number or a fraction such as 8/255. */
function parseBudget(text: string): number {
  const slash = text.indexOf('/');
  if (slash < 0) return parseNumber(text, '--min-accuracy budget', { min: 0 });
  const numerator = parseNumber(text.slice(0, slash), '--min-accuracy budget', { min: 0 });
  const denominator = parseNumber(text.slice(slash + 1), '--min-accuracy budget', { positive: true });
  return numerator / denominator;
}

function attackFlag(text: string | undefined): AttackId | undefined {
  if (text === undefined) return undefined;
  const id = text.trim().toLowerCase();
  if (!isAttackId(id)) throw new UsageError(`--attack: unknown search "${text}" (known: ${attackIds().join(', ')})`);
  return id;
}

/** The reason the first failing threshold fails, or null when all hold. */
export function firstFailure(saved: SavedRun, thresholds: readonly Threshold[], filter: { attack: AttackId | undefined; norm: Norm | undefined; lowerBound: boolean }): string | null {
  const { config, curve, complete } = saved.run;
  if (filter.norm !== undefined && filter.norm !== config.norm) return `the thresholds are for ${filter.norm} but the run used ${config.norm}`;
  const attacks = filter.attack !== undefined ? [filter.attack] : [...new Set(config.attacks.map((a) => a.id))];
  const label = epsLabeller(config);
  const cancelled = complete ? '' : ' (the run was cancelled before it finished)';
  for (const t of thresholds) {
    for (const attack of attacks) {
      const point = pointFor(curve, attack, t.eps);
      if (point === undefined) {
        const budgets = curve.filter((p) => p.attack === attack).map((p) => label(p.eps));
        return `${t.text}: the run has no ${attack} point at eps=${t.epsText}${cancelled} (${attack} budgets: ${budgets.length > 0 ? budgets.join(', ') : 'none'})`;
      }
      const measured = filter.lowerBound ? point.ci95Low : point.robustAccuracy;
      if (measured < t.accuracy) return describeFailure(t, point, label(point.eps), filter.lowerBound);
    }
  }
  return null;
}

/** The run's point of this search at the required budget, or at the smallest budget just above it. */
function pointFor(curve: readonly CurvePoint[], attack: AttackId, eps: number): CurvePoint | undefined {
  const near = curve.filter((p) => p.attack === attack && p.eps >= eps - EPS_TOLERANCE && p.eps <= eps + EPS_ABOVE);
  return near.sort((a, b) => a.eps - b.eps)[0];
}

function describeFailure(t: Threshold, p: CurvePoint, eps: string, lowerBound: boolean): string {
  const what = lowerBound ? `Wilson 95 % lower bound ${fixed6(p.ci95Low)} of robust accuracy ${fixed6(p.robustAccuracy)}` : `robust accuracy ${fixed6(p.robustAccuracy)}`;
  return `${t.text}: ${p.attack} ${p.norm} eps=${eps}: ${what} is below the required ${t.accuracy} (${p.robust} of ${p.samples} samples robust)`;
}
