/**
 * Health checks of an evaluation: signs that a robustness number is too good because the search was
 * weak or the gradients were masked (Carlini et al., "On Evaluating Adversarial Robustness", 2019;
 * Athalye, Carlini & Wagner, "Obfuscated Gradients Give a False Sense of Security", ICML 2018).
 * Plain data: the evidence the extra searches gathered, and the verdicts computed from it.
 */
import type { AttackId } from '../attacks/types.ts';
import type { Norm, OutputKind } from '../types.ts';

export type HealthStatus = 'pass' | 'warn' | 'skip';

export type HealthCheckId =
  | 'monotone'
  | 'large-budget'
  | 'iterative-vs-single-step'
  | 'gradient-free-vs-gradient'
  | 'convergence'
  | 'gradients'
  | 'noise'
  | 'saturation';

export interface HealthCheck {
  readonly id: HealthCheckId;
  /** What the check asks, in a few words (for a panel heading). */
  readonly title: string;
  readonly status: HealthStatus;
  /** One line: the verdict with the numbers behind it. */
  readonly detail: string;
  /** The numbers behind the verdict, by name. */
  readonly numbers: Readonly<Record<string, number>>;
}

/** Robust counts of two searches on the same samples at one budget. */
export interface PairedCount {
  readonly eps: number;
  readonly samples: number;
  /** Robust under the reference search (the strongest gradient-based iterative search). */
  readonly referenceRobust: number;
  /** Robust under the other search. */
  readonly otherRobust: number;
  /** Samples the other search flipped and the reference did not. */
  readonly otherOnly: number;
}

/** Everything the checks are computed from. */
export interface HealthEvidence {
  readonly norm: Norm;
  readonly samples: number;
  /** Share of the most frequent label: the best accuracy a constant prediction (e.g. on flat grey) can have. */
  readonly constantShare: number;
  /** The gradient-based iterative search the checks probe (from the sweep, or PGD added for them). */
  readonly reference: AttackId | null;
  /** Samples the reference flipped at a smaller budget, re-searched fresh at the largest budget. */
  readonly monotone: { readonly eps: number; readonly flippedBefore: number; readonly resisted: number } | null;
  readonly largeBudget: { readonly eps: number; readonly robust: number } | null;
  /** Per budget, each iterative search against FGSM (other = FGSM). */
  readonly singleStep: readonly (PairedCount & { readonly attack: AttackId })[];
  readonly gradientFree: PairedCount | null;
  /** New flips among the reference's robust samples at `eps` with doubled steps / added restarts (null: not applicable). */
  readonly convergence: {
    readonly eps: number;
    readonly referenceRobust: number;
    readonly doubledSteps: number | null;
    readonly addedRestarts: number | null;
  } | null;
  readonly gradients: { readonly samples: number; readonly nonFinite: number; readonly zero: number };
  /** Per budget, random noise against the reference (other = noise). */
  readonly noise: readonly PairedCount[];
  /**
   * Clean rows of the model's probabilities (for a logits model: of the softmax the cross-entropy
   * takes) whose top value is exactly 1 in float32, and those with an exact 0 as well; null when a
   * probability model's raw outputs were not available.
   */
  readonly saturation: { readonly outputKind: OutputKind; readonly rows: number; readonly topOne: number; readonly saturatedRows: number } | null;
}
