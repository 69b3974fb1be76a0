/**
 * What flip budgets say about the whole robustness curve: a sample is robust at ε exactly when its
 * flip budget exceeds ε, so one flip-budget run gives the robust accuracy at every ε at once.
 */
import { robustAccuracyEstimate } from '../stats/wilson.ts';
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
    return { eps, samples: n, robust, ...robustAccuracyEstimate(robust, n) };
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

/** Flip budgets binned for a histogram, with the two kinds of sample that have no finite positive budget. */
export interface FlipHistogram {
  /** binCount + 1 ascending edges from 0 to maxEps; bin i holds budgets in (edges[i], edges[i+1]] (the first also 0 < budget). */
  readonly edges: readonly number[];
  readonly counts: readonly number[];
  /** Samples misclassified clean (budget 0). */
  readonly misclassified: number;
  /** Samples nothing flipped up to maxEps. */
  readonly neverFlipped: number;
}

/** Histogram of the positive flip budgets in `binCount` equal bins over (0, maxEps]. */
export function flipBudgetHistogram(records: readonly FlipRecord[], binCount: number, maxEps: number): FlipHistogram {
  if (!Number.isInteger(binCount) || binCount < 1) throw new Error(`binCount must be a positive integer, got ${binCount}`);
  const edges = Array.from({ length: binCount + 1 }, (_, i) => (maxEps * i) / binCount);
  const counts = new Array<number>(binCount).fill(0);
  let misclassified = 0;
  let neverFlipped = 0;
  for (const r of records) {
    if (r.flipEps === null) neverFlipped++;
    else if (r.flipEps === 0) misclassified++;
    else counts[Math.min(binCount - 1, Math.max(0, Math.ceil((r.flipEps / maxEps) * binCount) - 1))]!++;
  }
  return { edges, counts, misclassified, neverFlipped };
}
