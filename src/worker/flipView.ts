/**
 * Pure helpers that shape a flip-budget run for the workbench: which samples to measure, where the
 * histogram ends, and the budgets at which the derived curve is drawn.
 */
import type { FlipRecord } from '../core/flips/types.ts';

/**
 * The smallest "round" number ≥ v: 1, 2, 2.5 or 5 times a power of ten (0 for v ≤ 0). Used so that
 * histogram bars have readable edges.
 */
export function niceCeil(v: number): number {
  if (!(v > 0) || !Number.isFinite(v)) return 0;
  const power = 10 ** Math.floor(Math.log10(v));
  for (const m of [1, 2, 2.5, 5, 10]) {
    // The relative slack keeps a value that is already round (0.02) from being pushed to the next step by rounding.
    if (m * power >= v * (1 - 1e-12)) return m * power;
  }
  return 10 * power;
}

/**
 * Upper edge of the flip-budget histogram: the largest finite positive flip budget, rounded up to a
 * round number, but never above maxEps; maxEps itself when no sample has a positive budget.
 */
export function histogramUpper(records: readonly FlipRecord[], maxEps: number): number {
  let largest = 0;
  for (const r of records) if (r.flipEps !== null && r.flipEps > largest) largest = r.flipEps;
  if (largest === 0) return maxEps;
  return Math.min(maxEps, niceCeil(largest));
}

/** `count` + 1 evenly spaced budgets from 0 to `upper`, both included. */
export function curveGrid(upper: number, count: number): number[] {
  if (!Number.isInteger(count) || count < 1) throw new Error(`count must be a positive integer, got ${count}`);
  return Array.from({ length: count + 1 }, (_, i) => (upper * i) / count);
}

/** Records of a run on a subset, renumbered to the samples' indices in the whole set. */
export function remapRecords(records: readonly FlipRecord[], indices: readonly number[]): FlipRecord[] {
  return records.map((r) => ({ ...r, index: indices[r.index] ?? r.index }));
}
