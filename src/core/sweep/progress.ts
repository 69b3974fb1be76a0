/**
 * Progress of a sweep in gradient evaluations (sample-steps). The total is an estimate that shrinks
 * as samples flip (they are not attacked at larger budgets) and is corrected with the evaluations
 * each batch actually spent.
 */
import type { AttackId } from '../attacks/types.ts';
import type { SweepProgress } from './types.ts';

/** Reports are spaced at least this far apart, except at batch ends, so a worker is not flooded. */
const MIN_REPORT_INTERVAL_MS = 100;

export class ProgressTracker {
  private done = 0;
  private total: number;
  private inBatch = 0;
  private readonly startedAt = performance.now();
  private lastReport = Number.NEGATIVE_INFINITY;

  constructor(
    initialTotal: number,
    private readonly report: ((p: SweepProgress) => void) | undefined,
  ) {
    this.total = initialTotal;
  }

  /** The attack reported `fraction` of a batch of `planned` evaluations done. */
  within(planned: number, fraction: number, attack: AttackId, eps: number): void {
    this.inBatch = planned * Math.min(1, Math.max(0, fraction));
    this.emit(attack, eps, false);
  }

  /** A batch finished after spending `spent` evaluations where `planned` were estimated. */
  batchDone(planned: number, spent: number, attack: AttackId, eps: number): void {
    this.inBatch = 0;
    this.done += spent;
    this.total += spent - planned;
    this.emit(attack, eps, true);
  }

  /** Work planned for samples that will not be attacked after all (they flipped). */
  dropPlanned(evaluations: number): void {
    this.total = Math.max(this.done, this.total - evaluations);
  }

  private emit(attack: AttackId, eps: number, force: boolean): void {
    if (this.report === undefined) return;
    const now = performance.now();
    if (!force && now - this.lastReport < MIN_REPORT_INTERVAL_MS) return;
    this.lastReport = now;
    const done = this.done + this.inBatch;
    const seconds = (now - this.startedAt) / 1000;
    this.report({
      done,
      total: Math.max(done, this.total),
      rate: seconds > 0 ? done / seconds : 0,
      attack,
      eps,
    });
  }
}
