/**
 * Random-noise baseline: how far chance gets at the same budget. Each draw perturbs every sample by a
 * random corner of the L∞ ball (every pixel ±ε) or a random direction on the L2 sphere (radius ε),
 * then clips to [0, 1]. A sample is flipped when any draw is misclassified, and that draw is kept;
 * otherwise the draw with the highest margin loss (max_{j≠y} z_j − z_y) is returned. Evaluation
 * guides recommend reporting such a baseline next to the worst-case search (Carlini et al., "On
 * Evaluating Adversarial Robustness", arXiv 2019): a search that does no better than noise is broken.
 *
 * Forward passes only; `gradientEvaluations` reports forward passes per sample (draws), as the
 * Square attack does.
 */
import * as tf from '@tensorflow/tfjs';
import type { AttackContext, AttackMeta, AttackMethod, AttackOutcome, AttackProblem } from './types.ts';
import { misclassified, perSampleLoss } from './losses.ts';
import { l2Sphere, linfCorners } from './randomPoints.ts';
import { perturbInBox } from './projections.ts';
import { makeYielder, throwIfAborted } from './control.ts';
import { tidyObject } from './tensors.ts';
import { createSearchState, recordIterate } from './searchState.ts';
import { allRows, PlanProgress } from './searchSupport.ts';
import { checkPositiveInteger, rejectUnknownOptions } from './options.ts';

export interface NoiseOptions {
  /** Random perturbations tried per sample (forward passes). */
  readonly draws: number;
}

/** Ten draws: enough to show chance, a hundredth of a typical query-based search (common practice). */
const NOISE_DEFAULTS: NoiseOptions = { draws: 10 };

export const noiseMeta: AttackMeta<NoiseOptions> = {
  id: 'noise',
  label: 'Random noise',
  summary:
    'Baseline, not a search: random corners of the L∞ ball or random directions on the L2 sphere at the full budget, flipped if any draw is misclassified (the chance check recommended by Carlini et al., "On Evaluating Adversarial Robustness", arXiv 2019).',
  norms: ['linf', 'l2'],
  defaults: NOISE_DEFAULTS,
  estimateGradientEvaluations: (options) => options.draws,
  validate(options) {
    rejectUnknownOptions('noise', options, Object.keys(NOISE_DEFAULTS));
    return { draws: checkPositiveInteger('noise', 'draws', options.draws ?? NOISE_DEFAULTS.draws) };
  },
};

/** Run the noise baseline on a batch. */
export async function runNoise(problem: AttackProblem, options: NoiseOptions, context: AttackContext): Promise<AttackOutcome> {
  throwIfAborted(context.signal);
  const [n, h, w, c] = problem.x.shape;
  if (n === 0) return { adv: tf.clone(problem.x), flipped: new Uint8Array(0), gradientEvaluations: 0 };
  const dim = h * w * c;
  const state = createSearchState(new Float32Array(await problem.x.data()), n);
  const progress = new PlanProgress(n * options.draws, context);
  const pause = makeYielder();
  let samples = allRows(n);
  for (let draw = 0; draw < options.draws && samples.length > 0; draw++) {
    const rows = samples;
    const delta = problem.norm === 'linf' ? linfCorners(rows.length, dim, problem.eps, context.rng) : l2Sphere(rows.length, dim, problem.eps, context.rng);
    const out = tidyObject(() => {
      const index = tf.tensor1d(rows, 'int32');
      const labels = tf.gather(problem.labels, index);
      const point = perturbInBox(tf.gather(problem.x, index), delta);
      const z = problem.logits(point);
      return { point, loss: perSampleLoss(z, labels, 'margin', null), mis: misclassified(z, labels) };
    });
    try {
      const [point, loss, mis] = await Promise.all([out.point.data(), out.loss.data(), out.mis.data()]);
      samples = recordIterate(state, rows, point as Float32Array, loss, mis).map((i) => rows[i]!);
    } finally {
      tf.dispose([out.point, out.loss, out.mis]);
    }
    state.gradientRows += rows.length;
    progress.advance(n);
    throwIfAborted(context.signal);
    await pause();
  }
  progress.finish();
  return { adv: tf.tensor4d(state.points, problem.x.shape), flipped: state.flipped, gradientEvaluations: state.gradientRows / n };
}

/** The random-noise baseline behind the shared attack interface. */
export const noise: AttackMethod<NoiseOptions> = { meta: noiseMeta, run: runNoise };
