/**
 * Helpers of the per-class views: which search × budget to show, the matrix's totals, and the cell
 * shading (always drawn with the count written in the cell, so colour is never the only cue).
 */
import type { AttackId } from '../../core/attacks/types.ts';
import { flipMatrices, perClassRobustness, type FlipMatrix, type PerClassPoint, type SweepStatistics } from '../../core/stats/perClass.ts';
import { sweepResultOf } from '../../core/savedRun/saveRun.ts';
import type { SavedRun } from '../../core/savedRun/types.ts';
import type { Norm } from '../../core/types.ts';
import { describeEps, formatEps } from './budgets.ts';
import { attackLabel } from './figure.ts';

/** What the per-class views draw: the per-class table and the flip matrix of every search × budget. */
export type ClassViews = Pick<SweepStatistics, 'perClass' | 'flipMatrices'>;

/** The per-class views of a run read from a saved-run file, computed from its per-image records by the core. */
export function savedRunClassViews(saved: SavedRun): ClassViews {
  const result = sweepResultOf(saved);
  const names = saved.run.samples.classNames ?? [];
  return { perClass: perClassRobustness(result, names), flipMatrices: flipMatrices(result, names) };
}

/** One search × budget of the sweep, as a menu entry. */
export interface StatChoice {
  readonly key: string;
  readonly attack: AttackId;
  readonly eps: number;
  readonly label: string;
}

/** Menu key of a search × budget. */
export function choiceKey(attack: AttackId, eps: number): string {
  return `${attack}@${eps}`;
}

/** Every search × budget above 0 of the statistics, in sweep order. */
export function statChoices(stats: ClassViews, norm: Norm): StatChoice[] {
  return stats.perClass
    .filter((p) => p.eps > 0)
    .map((p) => ({ key: choiceKey(p.attack, p.eps), attack: p.attack, eps: p.eps, label: `${attackLabel(p.attack)} at ε = ${norm === 'linf' ? describeEps(p.eps) : formatEps(p.eps)}` }));
}

/** The choice shown first: the last search at its largest budget (where the differences are largest). */
export function defaultChoice(choices: readonly StatChoice[]): string | null {
  const last = choices[choices.length - 1];
  if (last === undefined) return null;
  const sameAttack = choices.filter((c) => c.attack === last.attack);
  return sameAttack.reduce((best, c) => (c.eps > best.eps ? c : best)).key;
}

/** The per-class point and the flip matrix of one choice (null when the key is not in the statistics). */
export function statsAt(stats: ClassViews, key: string): { perClass: PerClassPoint; matrix: FlipMatrix } | null {
  const perClass = stats.perClass.find((p) => choiceKey(p.attack, p.eps) === key);
  const matrix = stats.flipMatrices.find((m) => choiceKey(m.attack, m.eps) === key);
  return perClass === undefined || matrix === undefined ? null : { perClass, matrix };
}

/** Row sums (images per true class), column sums (images per class after the attack), diagonal and total. */
export function matrixTotals(matrix: FlipMatrix): { rows: number[]; columns: number[]; diagonal: number; total: number } {
  const k = matrix.counts.length;
  const rows = matrix.counts.map((row) => row.reduce((a, b) => a + b, 0));
  const columns = Array.from({ length: k }, (_, p) => matrix.counts.reduce((sum, row) => sum + (row[p] ?? 0), 0));
  const diagonal = matrix.counts.reduce((sum, row, t) => sum + (row[t] ?? 0), 0);
  return { rows, columns, diagonal, total: rows.reduce((a, b) => a + b, 0) };
}

/**
 * Background of a matrix cell: its share of the row, from transparent to the accent (diagonal,
 * still the true class) or to the warning red (off the diagonal, a wrong class).
 */
export function cellShade(count: number, rowTotal: number, onDiagonal: boolean): string {
  const share = rowTotal > 0 ? count / rowTotal : 0;
  const alpha = count === 0 ? 0 : 0.12 + 0.6 * share;
  return onDiagonal ? `rgba(47, 93, 98, ${alpha.toFixed(3)})` : `rgba(162, 59, 42, ${alpha.toFixed(3)})`;
}

