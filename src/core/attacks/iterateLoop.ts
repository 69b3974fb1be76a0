/**
 * The iterate loop of one restart that PGD, APGD and the PGD flip probe share, with the bookkeeping of
 * README.md: every iterate is evaluated (the start point and the last one included), a row seen
 * misclassified is frozen (searchState.ts) and dropped from the tensors, and the search stops early
 * once every row is flipped. Each search supplies its own rows, evaluation and update step.
 */
import * as tf from '@tensorflow/tfjs';
import type { LogitsFn } from '../types.ts';
import { misclassified } from './losses.ts';
import { objectiveAndInputGradient, objectiveAndLogits, type LogitObjective } from './objective.ts';
import { throwIfAborted } from './control.ts';
import { tidyObject } from './tensors.ts';
import { recordIterate, type SearchState } from './searchState.ts';

/** One evaluation of the current iterate. */
export interface IterateEvaluation {
  /** Per-row value of the objective the search maximises. */
  readonly loss: tf.Tensor1D;
  /** 1 where the row is misclassified (bool). */
  readonly mis: tf.Tensor1D;
  /** Absent for the final, forward-only evaluation. */
  readonly grad?: tf.Tensor4D;
}

/**
 * The objective and the misclassification flags at x, plus the input gradient of the objective
 * unless `forwardOnly` (the last iterate needs no gradient). Call inside tf.tidy.
 */
export function evaluateIterate(logits: LogitsFn, x: tf.Tensor4D, labels: tf.Tensor1D, objective: LogitObjective, forwardOnly: boolean): IterateEvaluation {
  if (forwardOnly) {
    const { loss, logits: z } = objectiveAndLogits(logits, x, objective);
    return { loss, mis: misclassified(z, labels) };
  }
  const { loss, logits: z, grad } = objectiveAndInputGradient(logits, x, objective);
  return { loss, mis: misclassified(z, labels), grad };
}

/** The tensors a search keeps per attacked row; `current` is the iterate to evaluate. */
export interface IterateRows {
  readonly current: tf.Tensor4D;
}

/**
 * Picks the local rows `keep` out of a row tensor of `count` rows: a copy when every row is kept, a
 * gather otherwise. Call inside tf.tidy.
 */
export function keptRows(keep: number[], count: number): <T extends tf.Tensor>(t: T) => T {
  const sub = keep.length === count ? null : tf.tensor1d(keep, 'int32');
  return <T extends tf.Tensor>(t: T): T => (sub === null ? tf.clone(t) : tf.gather(t, sub));
}

/** What the update step may use besides the rows and the gradient. */
export interface StepFacts {
  /** Index k of the iterate just evaluated (0: the start point). */
  readonly k: number;
  /** Sample of each row of that iterate. */
  readonly samples: readonly number[];
  /** Objective of each row at that iterate. */
  readonly loss: ArrayLike<number>;
}

/** The parts of one restart that differ between the searches. */
export interface IterateSearch<R extends IterateRows> {
  /** Update steps per restart; the loop evaluates steps + 1 iterates. */
  readonly steps: number;
  readonly signal: AbortSignal | undefined;
  /** Awaited between steps (see control.ts makeYielder). */
  readonly pause: () => Promise<void>;
  /** Evaluates `rows.current`; runs inside tf.tidy. */
  evaluate(rows: R, forwardOnly: boolean): IterateEvaluation;
  /** The next rows for the local rows in `keep` (the flipped ones are dropped); runs inside tf.tidy. */
  step(rows: R, grad: tf.Tensor4D, keep: number[], facts: StepFacts): R;
  dispose(rows: R): void;
  /** Called after every update step, before the abort check (e.g. to report progress). */
  afterStep?(): void;
}

/**
 * Runs one restart from `firstRows` (row i belongs to sample `firstSamples[i]`), recording every
 * iterate in `state` and counting the gradient passes there. Disposes the rows it holds, also when
 * it throws (an abort throws signal.reason between steps).
 */
export async function runIterates<R extends IterateRows>(search: IterateSearch<R>, state: SearchState, firstSamples: number[], firstRows: R): Promise<void> {
  let samples = firstSamples;
  let rows = firstRows;
  try {
    for (let k = 0; ; k++) {
      const last = k === search.steps;
      const evaluated = tidyObject(() => search.evaluate(rows, last));
      let stillActive: number[];
      try {
        const [iterate, loss, mis] = await Promise.all([rows.current.data(), evaluated.loss.data(), evaluated.mis.data()]);
        stillActive = recordIterate(state, samples, iterate as Float32Array, loss, mis);
        if (!last) state.gradientRows += samples.length;
        if (last || stillActive.length === 0) break;
        const facts: StepFacts = { k, samples, loss };
        const next = tidyObject(() => search.step(rows, evaluated.grad!, stillActive, facts));
        search.dispose(rows);
        rows = next;
      } finally {
        tf.dispose([evaluated.loss, evaluated.mis, ...(evaluated.grad ? [evaluated.grad] : [])]);
      }
      samples = stillActive.map((i) => samples[i]!);
      search.afterStep?.();
      throwIfAborted(search.signal);
      await search.pause();
    }
  } finally {
    search.dispose(rows);
  }
}
