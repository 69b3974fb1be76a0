/** comparison.csv: one row per compared point (baseline against each other run). */
import { csvText, fixed6 } from '../export/csvFormat.ts';
import type { Comparison } from './compareRuns.ts';

export const COMPARE_CSV_HEADER = [
  'baseline',
  'other',
  'attack',
  'norm',
  'eps',
  'samples_a',
  'robust_a',
  'robust_accuracy_a',
  'ci95_low_a',
  'ci95_high_a',
  'samples_b',
  'robust_b',
  'robust_accuracy_b',
  'ci95_low_b',
  'ci95_high_b',
  'difference',
  'difference_ci95_low',
  'difference_ci95_high',
  'robust_only_a',
  'robust_only_b',
] as const;

/**
 * The comparison as CSV: accuracies and intervals with six decimals, difference = b − a with
 * Newcombe's 95 % interval; robust_only_a/_b (paired counts) are empty unless both runs used the
 * same samples.
 */
export function compareCsv(comparison: Comparison): string {
  const rows = comparison.rows.map((r) => [
    r.baseline,
    r.other,
    r.attack,
    r.norm,
    r.epsLabel,
    String(r.a.samples),
    String(r.a.robust),
    fixed6(r.a.robustAccuracy),
    fixed6(r.a.ci95Low),
    fixed6(r.a.ci95High),
    String(r.b.samples),
    String(r.b.robust),
    fixed6(r.b.robustAccuracy),
    fixed6(r.b.ci95Low),
    fixed6(r.b.ci95High),
    fixed6(r.difference),
    fixed6(r.differenceLow),
    fixed6(r.differenceHigh),
    r.onlyA === null ? '' : String(r.onlyA),
    r.onlyB === null ? '' : String(r.onlyB),
  ]);
  return csvText(COMPARE_CSV_HEADER, rows);
}
