/**
 * The flip-budget form as the workbench edits it (persisted), and its translation into a worker
 * request. Budgets are typed like the sweep's (0.03 or 8/255); an empty field takes the default.
 */
import { DEFAULT_TOL, defaultMaxEps } from '../../core/flips/defaults.ts';
import { FLIP_SEARCH_IDS, isFlipSearchId } from '../../core/flips/searches.ts';
import type { FlipSearchId } from '../../core/flips/types.ts';
import type { Norm, Preprocessing } from '../../core/types.ts';
import type { FlipRequest } from '../../worker/protocol.ts';
import { formatEps, parseBudgetValue } from './budgets.ts';

export interface FlipSettings {
  readonly search: FlipSearchId;
  readonly norm: Norm;
  /** Largest budget as typed; '' = the budget within which any image can become flat grey. */
  readonly maxEps: string;
  /** Bisection tolerance as typed; '' = half a grey level. */
  readonly tol: string;
  /** Images to measure, spread over the classes; null = all of them. */
  readonly limit: number | null;
  /** Iterations per search for PGD and APGD-CE; null = the search's own default. */
  readonly steps: number | null;
}

export const DEFAULT_FLIP_SETTINGS: FlipSettings = { search: 'pgd', norm: 'linf', maxEps: '', tol: '', limit: 24, steps: null };

/** Bars of the flip-budget histogram. */
export const FLIP_BINS = 20;

/** The choices of search, in the core's menu order, with what each does here. */
export const FLIP_SEARCH_WORDS: Readonly<Record<FlipSearchId, string>> = {
  pgd: 'PGD with the margin loss, bisection over ε (each image keeps its last flipping point as the next start)',
  'apgd-ce': 'APGD on cross-entropy, bisection over ε',
  deepfool: 'DeepFool: one estimate of the nearest boundary per image, no bisection (fast; can overshoot)',
};

/** Searches offered, in menu order. */
export function flipSearchChoices(): readonly FlipSearchId[] {
  return FLIP_SEARCH_IDS;
}

/** Settings read back from storage; anything unusable takes the default. */
export function flipSettingsFrom(value: unknown): FlipSettings {
  if (typeof value !== 'object' || value === null) return DEFAULT_FLIP_SETTINGS;
  const v = value as Partial<Record<keyof FlipSettings, unknown>>;
  const wholeOrNull = (x: unknown, fallback: number | null): number | null => (x === null ? null : typeof x === 'number' && Number.isInteger(x) && x >= 1 ? x : fallback);
  return {
    search: typeof v.search === 'string' && isFlipSearchId(v.search) ? v.search : DEFAULT_FLIP_SETTINGS.search,
    norm: v.norm === 'l2' ? 'l2' : 'linf',
    maxEps: typeof v.maxEps === 'string' ? v.maxEps : '',
    tol: typeof v.tol === 'string' ? v.tol : '',
    limit: wholeOrNull(v.limit, DEFAULT_FLIP_SETTINGS.limit),
    steps: wholeOrNull(v.steps, null),
  };
}

/** What the request needs besides the form. */
export interface FlipContext {
  /** H·W·C of the model's images (for the default largest budget). */
  readonly pixelsPerImage: number;
  readonly seed: number;
  readonly batchSize: number;
  readonly preprocessing: Preprocessing;
}

export type FlipBuild =
  | { readonly ok: true; readonly request: FlipRequest; readonly maxEps: number; readonly tol: number }
  | { readonly ok: false; readonly error: string };

/** The largest budget the form means: the typed one, or the flat-grey default. */
export function resolvedMaxEps(settings: FlipSettings, pixelsPerImage: number): number | null {
  return settings.maxEps.trim() === '' ? defaultMaxEps(settings.norm, pixelsPerImage) : parseBudgetValue(settings.maxEps);
}

/** The worker request for the form, or the first problem in it, in words. */
export function toFlipRequest(settings: FlipSettings, ctx: FlipContext): FlipBuild {
  const maxEps = resolvedMaxEps(settings, ctx.pixelsPerImage);
  if (maxEps === null || !(maxEps > 0)) return { ok: false, error: `“${settings.maxEps}” is not a budget above 0 (write 0.5 or 128/255).` };
  if (settings.norm === 'linf' && maxEps > 1) return { ok: false, error: `${formatEps(maxEps)} is above 1, the whole pixel range; an L∞ budget cannot do more than 1.` };
  const tol = settings.tol.trim() === '' ? DEFAULT_TOL : parseBudgetValue(settings.tol);
  if (tol === null || !(tol > 0)) return { ok: false, error: `“${settings.tol}” is not a tolerance above 0 (write 0.002 or 1/510).` };
  if (tol >= maxEps) return { ok: false, error: `The tolerance ${formatEps(tol)} must be smaller than the largest budget ${formatEps(maxEps)}.` };
  if (settings.limit !== null && !(Number.isInteger(settings.limit) && settings.limit >= 1)) return { ok: false, error: 'The number of images must be a whole number ≥ 1.' };
  if (settings.steps !== null && !(Number.isInteger(settings.steps) && settings.steps >= 1)) return { ok: false, error: 'The iterations must be a whole number ≥ 1.' };
  const options = settings.steps !== null && settings.search !== 'deepfool' ? { steps: settings.steps } : {};
  return {
    ok: true,
    maxEps,
    tol,
    request: {
      search: settings.search,
      norm: settings.norm,
      maxEps: settings.maxEps.trim() === '' ? null : maxEps,
      tol,
      options,
      limit: settings.limit,
      seed: ctx.seed,
      batchSize: ctx.batchSize,
      binCount: FLIP_BINS,
      preprocessing: ctx.preprocessing,
    },
  };
}
