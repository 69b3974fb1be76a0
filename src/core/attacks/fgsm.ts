/**
 * FGSM, the fast gradient sign method (Goodfellow, Shlens & Szegedy, "Explaining and Harnessing
 * Adversarial Examples", ICLR 2015): one step of full budget along the loss gradient's steepest-ascent
 * direction for the norm: x' = x + ε·sign(∇ₓL) for L∞ and x' = x + ε·∇ₓL/‖∇ₓL‖₂ for L2, then clipped
 * to the pixel box [0, 1] (which keeps x' in the ball, see projections.ts).
 */
import * as tf from '@tensorflow/tfjs';
import type { AttackContext, AttackMeta, AttackMethod, AttackOutcome, AttackProblem, LossKind, TargetMode } from './types.ts';
import { lossAndInputGradient, misclassified } from './losses.ts';
import { normalisedStep, projectToThreatModel } from './projections.ts';
import { resolveTargets } from './targets.ts';
import { throwIfAborted } from './control.ts';
import { checkLoss, checkTarget, rejectUnknownOptions } from './options.ts';

export interface FgsmOptions {
  /** Loss whose gradient gives the step; Goodfellow et al. use cross-entropy. */
  readonly loss: LossKind;
  readonly target: TargetMode;
}

const FGSM_DEFAULTS: FgsmOptions = { loss: 'ce', target: { kind: 'untargeted' } };

export const fgsmMeta: AttackMeta<FgsmOptions> = {
  id: 'fgsm',
  label: 'FGSM',
  summary:
    'One gradient step of the full budget: sign of the gradient for L∞, the normalised gradient for L2 (Goodfellow et al., "Explaining and Harnessing Adversarial Examples", ICLR 2015).',
  norms: ['linf', 'l2'],
  defaults: FGSM_DEFAULTS,
  estimateGradientEvaluations: () => 1,
  validate(options) {
    rejectUnknownOptions('fgsm', options, Object.keys(FGSM_DEFAULTS));
    return {
      loss: checkLoss('fgsm', options.loss ?? FGSM_DEFAULTS.loss),
      target: checkTarget('fgsm', options.target ?? FGSM_DEFAULTS.target),
    };
  },
};

/** Run FGSM on a batch; one gradient pass and one forward pass to tell which samples flipped. */
export async function runFgsm(problem: AttackProblem, options: FgsmOptions, context: AttackContext): Promise<AttackOutcome> {
  throwIfAborted(context.signal);
  const n = problem.x.shape[0];
  if (n === 0) return { adv: tf.clone(problem.x), flipped: new Uint8Array(0), gradientEvaluations: 0 };
  const { targets, attackable } = await resolveTargets('fgsm', problem, options.target);
  try {
    const adv = tf.tidy(() => fgsmPoint(problem, options, targets, attackable));
    try {
      const flippedMask = tf.tidy(() => misclassified(problem.logits(adv), problem.labels));
      const flipped = new Uint8Array(await flippedMask.data());
      flippedMask.dispose();
      context.onProgress?.(n, n);
      return { adv, flipped, gradientEvaluations: 1 };
    } catch (err) {
      adv.dispose();
      throw err;
    }
  } finally {
    targets?.dispose();
  }
}

function fgsmPoint(problem: AttackProblem, options: FgsmOptions, targets: tf.Tensor1D | null, attackable: Uint8Array): tf.Tensor4D {
  const { x, eps, norm } = problem;
  const { grad } = lossAndInputGradient(problem.logits, x, problem.labels, options.loss, targets);
  const stepped = projectToThreatModel(x, tf.add(x, tf.mul(eps, normalisedStep(grad, norm))), eps, norm);
  if (attackable.every((a) => a === 1)) return stepped;
  const mask = tf.reshape(tf.tensor1d(attackable, 'bool'), [x.shape[0], 1, 1, 1]);
  return tf.where(mask, stepped, x);
}

/** FGSM behind the shared attack interface. */
export const fgsm: AttackMethod<FgsmOptions> = { meta: fgsmMeta, run: runFgsm };
