/**
 * The one interface every perturbation search implements. See README.md in this folder.
 */
import type * as tf from '@tensorflow/tfjs';
import type { LogitsFn, Norm } from '../types.ts';
import type { Rng } from '../random/rng.ts';

/** Identifiers used in configuration, CSV files and on the command line (lower case). */
export type AttackId = 'fgsm' | 'pgd' | 'apgd-ce' | 'apgd-dlr' | 'square' | 'deepfool' | 'noise';

/** Loss maximised by gradient searches; both are computed from logits. */
export type LossKind = 'ce' | 'margin';

/** Untargeted, towards one given class, or towards each sample's least-likely clean class. */
export type TargetMode =
  | { readonly kind: 'untargeted' }
  | { readonly kind: 'class'; readonly classIndex: number }
  | { readonly kind: 'least-likely' };

/** The batch to perturb. Tensors belong to the caller; the attack must not dispose them. */
export interface AttackProblem {
  readonly logits: LogitsFn;
  /** Clean pixels, NHWC, in [0,1]. */
  readonly x: tf.Tensor4D;
  /** True class per sample, int32 [N]. */
  readonly labels: tf.Tensor1D;
  /** Budget in pixel units for `norm`. */
  readonly eps: number;
  readonly norm: Norm;
}

/**
 * Progress in units the attack chooses (usually gradient evaluations). `done` only grows and the
 * last call has done === total; FGSM and PGD count planned sample-steps (batch × steps × restarts),
 * steps saved on already-flipped samples included.
 */
export type ProgressFn = (done: number, total: number) => void;

export interface AttackContext {
  /** The only source of randomness an attack may use. */
  readonly rng: Rng;
  /** Checked between steps; on abort the attack throws signal.reason (an AbortError). */
  readonly signal?: AbortSignal;
  readonly onProgress?: ProgressFn;
}

/** What an attack hands back. The caller owns (and disposes) `adv`. */
export interface AttackOutcome {
  /**
   * One point per sample inside the threat model (‖adv − x‖ ≤ eps, adv ∈ [0,1]). For a sample the search
   * managed to misclassify at any iterate of any restart, this is that misclassified point.
   */
  readonly adv: tf.Tensor4D;
  /**
   * 1 where `adv` is misclassified (argmax ≠ true label), also for targeted searches: a targeted
   * search that lands on a wrong class other than its target has still flipped the sample.
   */
  readonly flipped: Uint8Array;
  /**
   * Forward + backward passes spent, per sample: the mean over the batch (rows passed through a
   * gradient pass ÷ batch size). Searches that stop attacking flipped samples spend less than
   * meta.estimateGradientEvaluations; forward-only checks are not counted.
   */
  readonly gradientEvaluations: number;
}

/** Static description of an attack; the UI and the CLI are generated from it. */
export interface AttackMeta<O> {
  readonly id: AttackId;
  /** Short label for menus and chart legends. */
  readonly label: string;
  /** One sentence saying what the search does, with its reference. */
  readonly summary: string;
  readonly norms: readonly Norm[];
  readonly defaults: O;
  /** Gradient evaluations per sample per budget with these options (for the plan estimate). */
  estimateGradientEvaluations(options: O): number;
  /** Throw an Error naming the bad option; returns the options completed with defaults. */
  validate(options: Partial<O>): O;
}

/** An attack: metadata plus a pure run function. */
export interface AttackMethod<O> {
  readonly meta: AttackMeta<O>;
  run(problem: AttackProblem, options: O, context: AttackContext): Promise<AttackOutcome>;
}
