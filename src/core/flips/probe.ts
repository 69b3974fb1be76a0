/**
 * A bisection probe: one search over a batch in which every row has its own budget and may start
 * from a given point (the warm start). Probes return what an AttackMethod returns, so the sweep's
 * rules hold: every point is inside its row's threat model and `flipped` means misclassified there.
 */
import type * as tf from '@tensorflow/tfjs';
import type { AttackContext, AttackOutcome } from '../attacks/types.ts';
import type { LogitsFn, Norm } from '../types.ts';

export interface ProbeProblem {
  readonly logits: LogitsFn;
  /** Clean pixels, NHWC in [0,1]; owned by the caller. */
  readonly x: tf.Tensor4D;
  /** True class per row, int32. */
  readonly labels: tf.Tensor1D;
  /** Budget of each row, in pixel units for `norm`. */
  readonly eps: Float32Array;
  readonly norm: Norm;
  /** Where each row's search begins (a point of that row's threat model), or null for the search's own start. */
  readonly start: tf.Tensor4D | null;
}

/** Runs one probe; the caller owns (and disposes) the returned `adv`. */
export type FlipProbe = (problem: ProbeProblem, context: AttackContext) => Promise<AttackOutcome>;
