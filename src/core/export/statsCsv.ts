/**
 * per_class.csv (robust accuracy per true class, per attack × budget) and flip_matrix.csv (true class →
 * class after the attack, one row per non-zero cell), from the plain data of stats/perClass.ts.
 */
import type { FlipMatrix, PerClassPoint } from '../stats/perClass.ts';
import type { Norm } from '../types.ts';
import { csvText, fixed6 } from './csvFormat.ts';
import { formatNumber } from '../sweep/plan.ts';

export const PER_CLASS_CSV_HEADER = ['attack', 'norm', 'eps', 'class', 'class_name', 'samples', 'clean_correct', 'robust', 'robust_accuracy', 'ci95_low', 'ci95_high'] as const;

/** The per-class table as CSV, in the given order (budgets in shortest round-trip form unless `label` is given). */
export function perClassCsv(points: readonly PerClassPoint[], norm: Norm, label: (eps: number) => string = formatNumber): string {
  const rows = points.flatMap((p) =>
    p.classes.map((c) => [p.attack, norm, label(p.eps), String(c.classIndex), c.className, String(c.samples), String(c.cleanCorrect), String(c.robust), fixed6(c.robustAccuracy), fixed6(c.ci95Low), fixed6(c.ci95High)]),
  );
  return csvText(PER_CLASS_CSV_HEADER, rows);
}

export const FLIP_MATRIX_CSV_HEADER = ['attack', 'norm', 'eps', 'true_class', 'pred_class', 'count'] as const;

/** The flip matrices as CSV in long form: one row per attack × budget × (true, predicted) pair with a non-zero count. */
export function flipMatrixCsv(matrices: readonly FlipMatrix[], norm: Norm, label: (eps: number) => string = formatNumber): string {
  const rows: string[][] = [];
  for (const m of matrices) {
    m.counts.forEach((row, t) => row.forEach((n, p) => n > 0 && rows.push([m.attack, norm, label(m.eps), String(t), String(p), String(n)])));
  }
  return csvText(FLIP_MATRIX_CSV_HEADER, rows);
}
