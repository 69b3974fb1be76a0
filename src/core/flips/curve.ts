/**
 * What flip budgets say about the whole robustness curve: a sample is robust at ε exactly when its
 * flip budget exceeds ε, so one flip-budget run gives the robust accuracy at every ε at once.
 */
import { wilsonInterval } from '../stats/wilson.ts';
import type { FlipCurvePoint, FlipRecord } from './types.ts';

/** Flip budgets as numbers: 0 for misclassified clean, +∞ for samples nothing flipped. */
export function flipBudgetValues(records: readonly FlipRecord[]): number[] {
  return records.map((r) => (r.flipEps === null ? Number.POSITIVE_INFINITY : r.flipEps));
}

/**
 * Robust accuracy at each budget of `grid`: the share of samples whose flip budget exceeds ε
 * (`null` = never flipped, larger than every ε), with its Wilson 95 % interval. Grid order is kept.
 */
export function robustAccuracyFromFlips(flipEps: readonly (number | null)[], grid: readonly number[]): FlipCurvePoint[] {
  const sorted = flipEps.map((e) => (e === null ? Number.POSITIVE_INFINITY : e)).sort((a, b) => a - b);
  const n = sorted.length;
  return grid.map((eps) => {
    const robust = n - countAtMost(sorted, eps);
    const ci = wilsonInterval(robust, n);
    return { eps, samples: n, robust, robustAccuracy: n === 0 ? 0 : robust / n, ci95Low: ci.low, ci95High: ci.high };
  });
}

/** How many values of the ascending array are ≤ v (binary search). */
function countAtMost(sorted: readonly number[], v: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (sorted[mid]! <= v) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * Median flip budget over the samples correct clean (the typical distance to the nearest flip the
 * search found). Never-flipped samples count as larger than every budget, so the median is null once
 * half of them hold out; NaN when no sample was correct clean.
 */
export function medianFlipEps(records: readonly FlipRecord[]): number | null {
  const values = records
    .filter((r) => r.cleanPred === r.label)
    .map((r) => (r.flipEps === null ? Number.POSITIVE_INFINITY : r.flipEps))
    .sort((a, b) => a - b);
  const n = values.length;
  if (n === 0) return Number.NaN;
  const mid = n >> 1;
  const value = n % 2 === 1 ? values[mid]! : (values[mid - 1]! + values[mid]!) / 2;
  return Number.isFinite(value) ? value : null;
}
