/** flips.csv: one row per sample, `file,label,clean_pred,flip_eps,adv_pred`. */
import type { FlipRecord } from '../flips/types.ts';
import { csvText, fixed6 } from './csvFormat.ts';

export const FLIPS_CSV_HEADER = ['file', 'label', 'clean_pred', 'flip_eps', 'adv_pred'] as const;

/**
 * Flip budgets as CSV in sample order. flip_eps has six decimals, or is exactly 0 for a sample misclassified clean, and
 * empty when nothing flipped it up to the largest budget. Labels and predictions are class indices.
 */
export function flipsCsv(records: readonly FlipRecord[]): string {
  const rows = records.map((r) => [r.file, String(r.label), String(r.cleanPred), r.flipEps === null ? '' : r.flipEps === 0 ? '0' : fixed6(r.flipEps), String(r.advPred)]);
  return csvText(FLIPS_CSV_HEADER, rows);
}
