/**
 * The health panel's words: settings of the extra searches, how a status reads (a word and a mark,
 * never colour alone), a one-line summary and the numbers behind each check.
 */
import { getAttack } from '../../core/attacks/registry.ts';
import type { HealthCheck, HealthStatus } from '../../core/health/types.ts';
import type { HealthRequest } from '../../worker/protocol.ts';
import { formatEps } from './budgets.ts';
import { count, percent } from './format.ts';

/** What the plan keeps about the checks (persisted with it). */
export interface HealthSettings {
  /** Run the checks by themselves after every complete sweep. */
  readonly after: boolean;
  /** Model queries per image for the gradient-free search (Square) the checks add. */
  readonly queries: number;
  /** Random draws per image for the noise baseline the checks add. */
  readonly draws: number;
}

/** The searches' own defaults, read from their metadata. */
export const DEFAULT_HEALTH_SETTINGS: HealthSettings = {
  after: false,
  queries: (getAttack('square').meta.defaults as { queries: number }).queries,
  draws: (getAttack('noise').meta.defaults as { draws: number }).draws,
};

/** The worker request for these settings. */
export function healthRequest(settings: HealthSettings): HealthRequest {
  return { squareOptions: { queries: settings.queries }, noiseOptions: { draws: settings.draws } };
}

/** Settings read back from storage: anything missing or not a positive whole number takes the default. */
export function healthSettingsFrom(value: unknown): HealthSettings {
  if (typeof value !== 'object' || value === null) return DEFAULT_HEALTH_SETTINGS;
  const v = value as Partial<Record<keyof HealthSettings, unknown>>;
  const whole = (x: unknown, fallback: number): number => (typeof x === 'number' && Number.isInteger(x) && x >= 1 ? x : fallback);
  return {
    after: v.after === true,
    queries: whole(v.queries, DEFAULT_HEALTH_SETTINGS.queries),
    draws: whole(v.draws, DEFAULT_HEALTH_SETTINGS.draws),
  };
}

/** How each status is shown: a word, a mark that reads without colour, and a sentence for screen readers. */
export const STATUS_LOOK: Readonly<Record<HealthStatus, { readonly word: string; readonly mark: string; readonly meaning: string }>> = {
  pass: { word: 'pass', mark: '✓', meaning: 'nothing suspicious found' },
  warn: { word: 'warning', mark: '!', meaning: 'the robustness number may be too good' },
  skip: { word: 'not run', mark: '–', meaning: 'this check did not apply to this sweep' },
};

/** Statuses in the order the panel sorts them: warnings first, so they are not missed. */
const ORDER: readonly HealthStatus[] = ['warn', 'pass', 'skip'];

/** The checks with warnings first, otherwise in their own order. */
export function checksInPanelOrder(checks: readonly HealthCheck[]): HealthCheck[] {
  return [...checks].sort((a, b) => ORDER.indexOf(a.status) - ORDER.indexOf(b.status));
}

/** "1 warning, 6 pass, 1 not run" (zero counts left out; "no checks" when empty). */
export function statusSummary(checks: readonly HealthCheck[]): string {
  const parts: string[] = [];
  for (const status of ORDER) {
    const n = checks.filter((c) => c.status === status).length;
    if (n === 0) continue;
    parts.push(status === 'warn' ? `${n} warning${n === 1 ? '' : 's'}` : `${n} ${STATUS_LOOK[status].word}`);
  }
  return parts.length === 0 ? 'no checks' : parts.join(', ');
}

/** Number names that hold shares in [0, 1] (shown as percentages). */
const SHARES = new Set(['share', 'robustAccuracy', 'chance']);

/** "doubledStepsNewFlips" → "doubled steps new flips"; "eps" → "ε". */
export function numberLabel(name: string): string {
  if (name === 'eps') return 'ε';
  return name.replace(/([A-Z])/g, ' $1').toLowerCase();
}

/** One number as the panel shows it: budgets to four digits, shares as percentages, counts grouped. */
export function numberText(name: string, value: number): string {
  if (name === 'eps') return formatEps(value);
  if (SHARES.has(name)) return percent(value);
  if (Number.isInteger(value)) return count(value);
  return String(Number(value.toPrecision(4)));
}

/** The numbers behind a check as [label, text] pairs, in the check's own order. */
export function checkNumbers(check: HealthCheck): [string, string][] {
  return Object.entries(check.numbers).map(([name, value]) => [numberLabel(name), numberText(name, value)]);
}
