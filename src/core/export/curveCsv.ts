/**
 * The two CSV exports: curve.csv (one row per attack × budget of the robustness curve) and
 * samples.csv (one row per sample × attack × budget, the per-image evidence behind the curve).
 */
import type { SweepResult } from '../sweep/types.ts';
import { csvText, fixed6 } from './csvFormat.ts';
import { epsLabeller } from './epsLabels.ts';

export const CURVE_CSV_HEADER = [
  'attack',
  'norm',
  'eps',
  'samples',
  'clean_correct',
  'robust',
  'robust_accuracy',
  'ci95_low',
  'ci95_high',
] as const;

/**
 * The curve as CSV, in sweep order (attack, then ascending budget). Budgets are printed as the user
 * wrote them (SweepConfig.epsLabels) or in shortest round-trip form; accuracies with six decimals.
 */
export function curveCsv(result: SweepResult): string {
  const label = epsLabeller(result.config);
  const rows = result.curve.map((p) => [
    p.attack,
    p.norm,
    label(p.eps),
    String(p.samples),
    String(p.cleanCorrect),
    String(p.robust),
    fixed6(p.robustAccuracy),
    fixed6(p.ci95Low),
    fixed6(p.ci95High),
  ]);
  return csvText(CURVE_CSV_HEADER, rows);
}

export const SAMPLES_CSV_HEADER = [
  'file',
  'label',
  'clean_pred',
  'clean_conf',
  'attack',
  'norm',
  'eps',
  'adv_pred',
  'adv_conf',
  'linf',
  'l2',
  'flipped',
] as const;

/**
 * Per-sample outcomes as CSV. Labels and predictions are class indices; confidences (softmax
 * probability of the predicted class) and δ sizes have six decimals; flipped is 1 or 0. File names
 * are quoted when they hold commas, quotes or line breaks.
 */
export function samplesCsv(result: SweepResult): string {
  const label = epsLabeller(result.config);
  const norm = result.config.norm;
  const rows: string[][] = [];
  for (const r of result.records) {
    for (const o of r.outcomes) {
      rows.push([
        r.file,
        String(r.label),
        String(r.cleanPred),
        fixed6(r.cleanConf),
        o.attack,
        norm,
        label(o.eps),
        String(o.advPred),
        fixed6(o.advConf),
        fixed6(o.linf),
        fixed6(o.l2),
        o.flipped ? '1' : '0',
      ]);
    }
  }
  return csvText(SAMPLES_CSV_HEADER, rows);
}
