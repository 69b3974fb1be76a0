/**
 * Pieces the iterative searches added after FGSM and PGD share: progress in planned units, and the
 * final verdict on samples a targeted search had to leave alone. (pgd.ts keeps its own copies.)
 */
import * as tf from '@tensorflow/tfjs';
import type { AttackContext, AttackProblem } from './types.ts';
import { misclassified } from './losses.ts';

/**
 * Progress in planned units (e.g. samples × steps × restarts): units saved because samples were
 * already flipped count as done, so the fraction moves evenly, only grows, and ends at 1.
 */
export class PlanProgress {
  private done = 0;
  constructor(
    readonly total: number,
    private readonly context: Pick<AttackContext, 'onProgress'>,
  ) {}
  /** Move forward by `amount` units. */
  advance(amount: number): void {
    this.reach(this.done + amount);
  }
  /** Move forward to `value` units (never backwards, never past the total). */
  reach(value: number): void {
    const next = Math.min(this.total, value);
    if (next <= this.done) return;
    this.done = next;
    this.context.onProgress?.(this.done, this.total);
  }
  /** Report completion. */
  finish(): void {
    this.reach(this.total);
  }
}

/**
 * Samples a search did not move (attackable 0) keep x; set their flags to the model's own verdict
 * at x, so `flipped` always means "misclassified".
 */
export async function flagUnattackable(problem: AttackProblem, attackable: Uint8Array, flipped: Uint8Array): Promise<void> {
  const skipped: number[] = [];
  attackable.forEach((a, i) => {
    if (a === 0) skipped.push(i);
  });
  if (skipped.length === 0) return;
  const mis = tf.tidy(() => {
    const index = tf.tensor1d(skipped, 'int32');
    return misclassified(problem.logits(tf.gather(problem.x, index)), tf.gather(problem.labels, index));
  });
  const values = await mis.data();
  mis.dispose();
  skipped.forEach((sample, i) => {
    flipped[sample] = values[i] === 0 ? 0 : 1;
  });
}

/** Row indices [0, count) as a plain array. */
export function allRows(count: number): number[] {
  return Array.from({ length: count }, (_, i) => i);
}
