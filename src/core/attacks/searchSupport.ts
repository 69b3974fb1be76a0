/**
 * Pieces the iterative searches share: progress in planned units, the final verdict on samples a
 * targeted search had to leave alone, and the restart driver of PGD and APGD.
 */
import * as tf from '@tensorflow/tfjs';
import type { AttackContext, AttackId, AttackOutcome, AttackProblem, TargetMode } from './types.ts';
import { misclassified } from './losses.ts';
import { resolveTargets } from './targets.ts';
import { makeYielder, throwIfAborted } from './control.ts';
import { activeSamples, createSearchState, type SearchState } from './searchState.ts';

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

/** What the restart driver hands every restart of a search. */
export interface RestartRun {
  /** Target class per sample (null when untargeted); owned by the driver. */
  readonly targets: tf.Tensor1D | null;
  readonly state: SearchState;
  readonly progress: PlanProgress;
  /** One yielder for the whole run (see control.ts). */
  readonly pause: () => Promise<void>;
}

/** The options the restart driver reads. */
export interface RestartPlan {
  readonly steps: number;
  readonly restarts: number;
  readonly target: TargetMode;
}

/**
 * Runs `plan.restarts` restarts of an iterative search with PGD's bookkeeping (README.md): targets are
 * resolved once, each restart attacks only the attackable samples not yet flipped, progress counts
 * planned sample-steps (samples × steps × restarts), and skipped samples get the model's own verdict.
 */
export async function runRestarts(
  id: AttackId,
  problem: AttackProblem,
  plan: RestartPlan,
  context: AttackContext,
  restart: (run: RestartRun, samples: number[]) => Promise<void>,
): Promise<AttackOutcome> {
  throwIfAborted(context.signal);
  const n = problem.x.shape[0];
  if (n === 0) return { adv: tf.clone(problem.x), flipped: new Uint8Array(0), gradientEvaluations: 0 };
  const { targets, attackable } = await resolveTargets(id, problem, plan.target);
  try {
    const state = createSearchState(new Float32Array(await problem.x.data()), n);
    const progress = new PlanProgress(n * plan.steps * plan.restarts, context);
    const run: RestartRun = { targets, state, progress, pause: makeYielder() };
    for (let r = 0; r < plan.restarts; r++) {
      throwIfAborted(context.signal);
      const samples = activeSamples(state, attackable);
      if (samples.length === 0) break;
      await restart(run, samples);
      progress.reach(n * plan.steps * (r + 1));
    }
    await flagUnattackable(problem, attackable, state.flipped);
    progress.finish();
    return { adv: tf.tensor4d(state.points, problem.x.shape), flipped: state.flipped, gradientEvaluations: state.gradientRows / n };
  } finally {
    targets?.dispose();
  }
}
