/** What every report section reads: the saved run and values derived from it once. */
import { getAttack } from '../attacks/registry.ts';
import type { AttackId } from '../attacks/types.ts';
import { epsLabeller } from '../export/epsLabels.ts';
import { sweepResultOf } from '../savedRun/saveRun.ts';
import type { SavedRun } from '../savedRun/types.ts';
import { classNamesFor } from '../stats/perClass.ts';
import type { SweepResult } from '../sweep/types.ts';

export interface ReportContext {
  readonly saved: SavedRun;
  readonly result: SweepResult;
  /** Class names in index order (index strings where the run recorded none). */
  readonly classNames: readonly string[];
  /** A budget as printed in curve.csv. */
  readonly eps: (eps: number) => string;
  /** The searches in sweep order. */
  readonly attacks: readonly AttackId[];
}

/** Derive the shared values. */
export function reportContext(saved: SavedRun): ReportContext {
  const result = sweepResultOf(saved);
  const attacks: AttackId[] = [];
  for (const a of saved.run.config.attacks) if (!attacks.includes(a.id)) attacks.push(a.id);
  return {
    saved,
    result,
    classNames: classNamesFor(saved.records, saved.run.samples.classNames ?? []),
    eps: epsLabeller(saved.run.config),
    attacks,
  };
}

/** Menu label of a search, e.g. "PGD". */
export function attackLabel(id: AttackId): string {
  return getAttack(id).meta.label;
}

/** The class name of an index, or the index itself. */
export function className(context: ReportContext, index: number): string {
  return context.classNames[index] ?? String(index);
}
