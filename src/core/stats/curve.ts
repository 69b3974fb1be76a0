/**
 * Summaries of a robustness curve and of per-sample flip budgets, computed from plain sweep data.
 */
import type { AttackId } from '../attacks/types.ts';
import type { CurvePoint, SampleRecord } from '../sweep/types.ts';

/** Median of the finite values (mean of the two middle ones for an even count); NaN when empty. */
export function median(values: readonly number[]): number {
  const sorted = values.filter((v) => Number.isFinite(v)).sort((a, b) => a - b);
  const n = sorted.length;
  if (n === 0) return Number.NaN;
  const mid = n >> 1;
  return n % 2 === 1 ? sorted[mid]! : (sorted[mid - 1]! + sorted[mid]!) / 2;
}

/** The points of one attack's curve, ordered by budget. */
export function curveOf(points: readonly CurvePoint[], attack: AttackId): CurvePoint[] {
  return points.filter((p) => p.attack === attack).sort((a, b) => a.eps - b.eps);
}

/**
 * Median smallest flipping budget over the samples that were correct clean. Samples never flipped
 * count as larger than every budget, so when at least half of them held out the median is not
 * known from the grid and the result is null. NaN when no sample was correct clean.
 */
export function medianFlipBudget(records: readonly SampleRecord[], attack: AttackId): number | null {
  const budgets: number[] = [];
  for (const r of records) {
    if (r.cleanPred !== r.label) continue;
    const eps = r.minFlipEps[attack];
    if (eps === undefined) continue;
    budgets.push(eps === null ? Number.POSITIVE_INFINITY : eps);
  }
  if (budgets.length === 0) return Number.NaN;
  budgets.sort((a, b) => a - b);
  const n = budgets.length;
  const mid = n >> 1;
  const value = n % 2 === 1 ? budgets[mid]! : (budgets[mid - 1]! + budgets[mid]!) / 2;
  return Number.isFinite(value) ? value : null;
}

/**
 * Area under a robust-accuracy curve by the trapezoid rule over its budget range, divided by the
 * range so that it reads as a mean accuracy. A single point returns its accuracy.
 */
export function meanRobustAccuracy(points: readonly CurvePoint[]): number {
  const sorted = [...points].sort((a, b) => a.eps - b.eps);
  const first = sorted[0];
  const last = sorted[sorted.length - 1];
  if (first === undefined || last === undefined) return Number.NaN;
  const range = last.eps - first.eps;
  if (range === 0) return first.robustAccuracy;
  let area = 0;
  for (let i = 1; i < sorted.length; i++) {
    const a = sorted[i - 1]!;
    const b = sorted[i]!;
    area += ((a.robustAccuracy + b.robustAccuracy) / 2) * (b.eps - a.eps);
  }
  return area / range;
}
