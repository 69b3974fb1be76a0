/**
 * Progress of a sweep in planned gradient evaluations (sample-steps, from each attack's
 * meta.estimateGradientEvaluations). The total shrinks as samples flip, since they are not attacked
 * at larger budgets. Within a batch the attack's own done/total fraction is used; a search that stops
 * early on flipped samples still counts its planned steps (as the attacks' own progress does), so
 * `done` never goes backwards and ends equal to `total`.
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

  /** A batch of `planned` evaluations finished. */
  batchDone(planned: number, attack: AttackId, eps: number): void {
    this.inBatch = 0;
    this.done += planned;
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
