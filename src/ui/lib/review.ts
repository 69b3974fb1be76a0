/**
 * Pure helpers of the review screen: the plan that repeats a saved run's configuration, labels
 * that tell runs apart, and the words of the saved-run banner.
 */
import type { SweepConfig } from '../../core/sweep/types.ts';
import type { SavedRun } from '../../core/savedRun/types.ts';
import type { PlanSettings } from './plan.ts';

/**
 * A budget as the plan editor writes it: the run's own spelling when it has one, k/255 when the
 * value is exactly that fraction, else the shortest decimal that reads back to the same number.
 */
export function budgetText(eps: number, label?: string): string {
  if (label !== undefined && label !== '') return label;
  const levels = Math.round(eps * 255);
  if (eps !== 0 && levels / 255 === eps) return `${levels}/255`;
  return String(eps);
}

/**
 * The plan that gives back `config` through toSweepConfig: the same searches, norm, budgets,
 * seed and batch size, and every search's options in the plan's shared option pool (the first
 * search's value wins where two searches set one option differently, as on the command line).
 */
export function planFromConfig(config: SweepConfig, health: PlanSettings['health']): PlanSettings {
  const options: Record<string, unknown> = {};
  for (const attack of config.attacks) {
    for (const [key, value] of Object.entries(attack.options)) if (!(key in options)) options[key] = value;
  }
  return {
    attacks: config.attacks.map((a) => a.id),
    norm: config.norm,
    budgets: config.eps.map((eps, i) => budgetText(eps, config.epsLabels?.[i])).join(', '),
    options,
    seed: config.seed,
    batchSize: config.batchSize,
    health,
  };
}

/** `wanted`, or `wanted (2)`, `wanted (3)` … — the first not in `taken`. */
export function uniqueLabel(wanted: string, taken: readonly string[]): string {
  if (!taken.includes(wanted)) return wanted;
  for (let n = 2; ; n++) {
    const candidate = `${wanted} (${n})`;
    if (!taken.includes(candidate)) return candidate;
  }
}

/** An ISO time as "2025-03-04 17:05 UTC" (fixed, independent of the browser's locale); other text as given. */
export function savedAtText(iso: string): string {
  const time = Date.parse(iso);
  if (!Number.isFinite(time)) return iso;
  const d = new Date(time).toISOString();
  return `${d.slice(0, 10)} ${d.slice(11, 16)} UTC`;
}

/** The first 12 hex digits of a hash, as the comparison warnings print them. */
export function shortHash(sha256: string): string {
  return `${sha256.slice(0, 12)}…`;
}

/** The banner's first line for a run read from a file. */
export function savedRunHeadline(fileName: string, saved: SavedRun): string {
  return `Loaded from a saved run: ${fileName}, saved ${savedAtText(saved.savedAt)}`;
}

/** The main model file of a run (model.json or the .onnx file), else the first file, else "model". */
export function modelFileName(saved: SavedRun): string {
  const files = saved.run.model.files;
  return files.find((f) => /\.(json|onnx)$/i.test(f.name))?.name ?? files[0]?.name ?? 'model';
}

/** Which demo model a run measured, by the SHA-256 of its model files (null: not a demo model). */
export function demoModelOf<Id extends string>(saved: SavedRun, demoHashes: Readonly<Partial<Record<Id, string>>>): Id | null {
  for (const [id, sha] of Object.entries(demoHashes) as [Id, string | undefined][]) if (sha === saved.run.model.sha256) return id;
  return null;
}

/** What the review step's status line is made from. */
export interface ReviewStepFacts {
  /** Runs kept on the review screen (read from files or kept from this session). */
  readonly kept: number;
  /** Whether this session has a finished run of its own. */
  readonly current: boolean;
  /** Runs ticked for the comparison. */
  readonly compared: number;
  /** A review action (saving, a report, the demo comparison) is in progress. */
  readonly busy: boolean;
}

/** The review step's status line, e.g. "2 runs to compare" or "nothing saved yet". */
export function reviewStepText(facts: ReviewStepFacts): string {
  if (facts.busy) return 'working…';
  const runs = facts.kept + (facts.current ? 1 : 0);
  if (facts.compared >= 2) return `${facts.compared} runs to compare`;
  if (runs === 0) return 'nothing saved yet';
  if (facts.kept === 0) return "this session's run only";
  if (runs === 1) return '1 saved run';
  return `${facts.compared} of ${runs} runs ticked`;
}
