/** Which samples the flip gallery shows, and in which order. */
import type { AttackId } from '../../core/attacks/types.ts';
import type { AdversarialOutcome, SampleRecord } from '../../core/sweep/types.ts';

export interface FlipItem {
  readonly record: SampleRecord;
  /** The smallest budget that flipped the sample (> 0). */
  readonly eps: number;
  /** The sample's outcome at that budget. */
  readonly outcome: AdversarialOutcome | null;
}

export type FlipOrder = 'eps-ascending' | 'eps-descending';

/**
 * Samples that `attack` flipped (correct clean, wrong at some budget), optionally of one true
 * class, sorted by flipping budget (ties by sample order).
 */
export function flippedItems(records: readonly SampleRecord[], attack: AttackId, classIndex: number | null, order: FlipOrder): FlipItem[] {
  const items: FlipItem[] = [];
  for (const record of records) {
    const eps = record.minFlipEps[attack];
    if (typeof eps !== 'number' || eps <= 0) continue;
    if (classIndex !== null && record.label !== classIndex) continue;
    const outcome = record.outcomes.find((o) => o.attack === attack && o.eps === eps) ?? null;
    items.push({ record, eps, outcome });
  }
  const sign = order === 'eps-ascending' ? 1 : -1;
  return items.sort((a, b) => sign * (a.eps - b.eps) || a.record.index - b.record.index);
}

/** The attacks present in a result's records, in sweep order. */
export function attacksIn(records: readonly SampleRecord[]): AttackId[] {
  const seen: AttackId[] = [];
  for (const r of records) for (const o of r.outcomes) if (!seen.includes(o.attack)) seen.push(o.attack);
  return seen;
}
