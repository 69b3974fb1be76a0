/**
 * DeepFool (Moosavi-Dezfooli, Fawzi & Frossard, "DeepFool: a simple and accurate method to fool deep
 * neural networks", CVPR 2016, Algorithms 2 and 3): a fast estimate of the smallest perturbation that
 * changes the class. At each step the classifier is linearised around the current point x_i; for
 * every candidate class k ≠ y, with w'_k = ∇(z_k − z_y)(x_i) and f'_k = (z_k − z_y)(x_i), the nearest
 * linearised boundary is l = argmin_k |f'_k| / ‖w'_k‖_q and the step reaching it is
 *   L2 (q = 2):            r_i = |f'_l| / ‖w'_l‖₂² · w'_l
 *   L∞ (q = 1, the dual):  r_i = |f'_l| / ‖w'_l‖₁ · sign(w'_l)
 * The total r = Σ r_i is scaled by 1 + overshoot (0.02 in the paper); the search linearises and checks
 * the class at x + (1 + overshoot)·r, clipped to [0, 1], and stops when the class has changed. For an
 * affine classifier the first step is exact. Box-aware detail (not in the paper): pixels at a bound
 * that the step would push outward are held fixed (see freeGradient).
 *
 * As an attack at budget ε the point found is projected onto ball ∩ box and the sample counts as
 * flipped when the projected point is misclassified. DeepFool uses no randomness.
 */
import * as tf from '@tensorflow/tfjs';
import type { LogitsFn, Norm } from '../types.ts';
import type { AttackContext, AttackMeta, AttackMethod, AttackOutcome, AttackProblem } from './types.ts';
import { misclassified } from './losses.ts';
import { objectiveAndInputGradient } from './objective.ts';
import { perSampleL2, projectToThreatModel } from './projections.ts';
import { makeYielder, throwIfAborted } from './control.ts';
import { tidyObject } from './tensors.ts';
import { PlanProgress } from './searchSupport.ts';
import { checkPositiveInteger, rejectUnknownOptions } from './options.ts';
import { candidateClasses, perturbationNorms } from './deepfoolSupport.ts';

export interface DeepFoolOptions {
  /** Classes linearised: the true class and the topK − 1 other classes of highest clean logit (all if fewer). */
  readonly topK: number;
  /** r is scaled by 1 + overshoot so that the point crosses the boundary (the paper: 0.02). */
  readonly overshoot: number;
  /** Linearisation steps before a sample is given up as not flipped. */
  readonly maxIterations: number;
}

const DEEPFOOL_DEFAULTS: DeepFoolOptions = { topK: 10, overshoot: 0.02, maxIterations: 50 };

/**
 * Steps a typical sample needs, for the plan estimate: the paper reports a few (from memory); on the
 * MNIST CNN test fixture digits took 3 to 6.
 */
const TYPICAL_ITERATIONS = 4;

export const deepfoolMeta: AttackMeta<DeepFoolOptions> = {
  id: 'deepfool',
  label: 'DeepFool',
  summary:
    'Fast minimal-perturbation estimate: steps to the nearest boundary of the classifier linearised over the top classes, plus a 2 % overshoot, then projected onto the budget (Moosavi-Dezfooli et al., "DeepFool: a simple and accurate method to fool deep neural networks", CVPR 2016).',
  norms: ['linf', 'l2'],
  defaults: DEEPFOOL_DEFAULTS,
  estimateGradientEvaluations: (options) => (options.topK - 1) * Math.min(options.maxIterations, TYPICAL_ITERATIONS),
  validate(options) {
    rejectUnknownOptions('deepfool', options, Object.keys(DEEPFOOL_DEFAULTS));
    const topK = checkPositiveInteger('deepfool', 'topK', options.topK ?? DEEPFOOL_DEFAULTS.topK);
    if (topK < 2) throw new Error(`deepfool: topK must be at least 2 (got ${topK})`);
    const overshoot = options.overshoot ?? DEEPFOOL_DEFAULTS.overshoot;
    if (typeof overshoot !== 'number' || !Number.isFinite(overshoot) || overshoot < 0) {
      throw new Error(`deepfool: overshoot must be a finite number ≥ 0 (got ${JSON.stringify(overshoot)})`);
    }
    return { topK, overshoot, maxIterations: checkPositiveInteger('deepfool', 'maxIterations', options.maxIterations ?? DEEPFOOL_DEFAULTS.maxIterations) };
  },
};

/** What deepfoolMinimalPerturbation needs: the attack problem without a budget. */
export interface MinimalPerturbationProblem {
  readonly logits: LogitsFn;
  /** Clean pixels, NHWC, in [0,1] (owned by the caller). */
  readonly x: tf.Tensor4D;
  /** True class per sample, int32 [N]. */
  readonly labels: tf.Tensor1D;
  readonly norm: Norm;
}

/** Per-sample result of DeepFool's search. */
export interface MinimalPerturbation {
  /** x + δ as found (in [0, 1], not limited to any budget); the caller disposes it. */
  readonly adv: tf.Tensor4D;
  /** ‖δ‖ in the problem's norm where the search flipped the sample, 0 where x is already misclassified, Infinity otherwise. */
  readonly norms: Float64Array;
  /** 1 where `adv` is misclassified. */
  readonly flipped: Uint8Array;
  /** Linearisation steps taken per sample. */
  readonly iterations: Int32Array;
  /** Gradient passes per sample (mean over the batch). */
  readonly gradientEvaluations: number;
}

/** The rows DeepFool still works on. */
interface Rows {
  readonly clean: tf.Tensor4D;
  readonly labels: tf.Tensor1D;
  /** Candidate classes [m, k − 1], int32. */
  readonly candidates: tf.Tensor2D;
  /** Σ r_i so far. */
  readonly total: tf.Tensor4D;
  /** clip(x + (1 + overshoot)·total, 0, 1). */
  readonly current: tf.Tensor4D;
}

/**
 * DeepFool's perturbation per sample, for minimal flip budgets: runs the search to the first point
 * whose class differs from the label and reports its norm (overshoot included). Cancellable through
 * `context.signal`; progress counts planned sample-iterations.
 */
export async function deepfoolMinimalPerturbation(
  problem: MinimalPerturbationProblem,
  options: DeepFoolOptions,
  context: Pick<AttackContext, 'signal' | 'onProgress'> = {},
): Promise<MinimalPerturbation> {
  throwIfAborted(context.signal);
  const [n, h, w, c] = problem.x.shape;
  const dim = h * w * c;
  const points = new Float32Array(await problem.x.data());
  const result = { norms: new Float64Array(n).fill(Infinity), flipped: new Uint8Array(n), iterations: new Int32Array(n) };
  if (n === 0) return { adv: tf.clone(problem.x), ...result, gradientEvaluations: 0 };
  const start = await candidateClasses(problem.logits, problem.x, problem.labels, options.topK);
  let samples: number[] = [];
  start.misclassified.forEach((m, i) => {
    if (m === 0) samples.push(i);
    else [result.norms[i], result.flipped[i]] = [0, 1];
  });
  const progress = new PlanProgress(n * options.maxIterations, context);
  const pause = makeYielder();
  let gradientRows = 0;
  let rows = startRows(problem, start.candidates, samples);
  start.candidates.dispose();
  try {
    for (let it = 0; samples.length > 0; it++) {
      if (it > 0) {
        const keep = await recordFlips(problem, rows, samples, it, points, result, dim);
        const next = tidyObject(() => gatherRows(rows, keep));
        disposeRows(rows);
        rows = next;
        samples = keep.map((i) => samples[i]!);
      }
      if (samples.length === 0 || it === options.maxIterations) break;
      const step = await linearStep(problem, rows, context, pause);
      gradientRows += samples.length * rows.candidates.shape[1];
      const next = tidyObject(() => advance(rows, step, options.overshoot));
      step.dispose();
      disposeRows(rows);
      rows = next;
      progress.advance(n);
      throwIfAborted(context.signal);
      await pause();
    }
    if (samples.length > 0) {
      // Given up: keep the last point (not flipped, so its norm stays Infinity).
      const last = new Float32Array(await rows.current.data());
      samples.forEach((sample, row) => points.set(last.subarray(row * dim, (row + 1) * dim), sample * dim));
    }
  } finally {
    disposeRows(rows);
  }
  progress.finish();
  return { adv: tf.tensor4d(points, problem.x.shape), ...result, gradientEvaluations: gradientRows / n };
}

function startRows(problem: MinimalPerturbationProblem, candidates: tf.Tensor2D, samples: number[]): Rows {
  return tidyObject(() => {
    const index = tf.tensor1d(samples, 'int32');
    const clean = tf.gather(problem.x, index);
    return { clean, labels: tf.gather(problem.labels, index), candidates: tf.gather(candidates, index), total: tf.zerosLike(clean), current: tf.clone(clean) };
  });
}

function gatherRows(rows: Rows, keep: number[]): Rows {
  const index = tf.tensor1d(keep, 'int32');
  return {
    clean: tf.gather(rows.clean, index),
    labels: tf.gather(rows.labels, index),
    candidates: tf.gather(rows.candidates, index),
    total: tf.gather(rows.total, index),
    current: tf.gather(rows.current, index),
  };
}

function disposeRows(rows: Rows): void {
  tf.dispose([rows.clean, rows.labels, rows.candidates, rows.total, rows.current]);
}

/** Checks the class at the current points; records the flipped ones and returns the other local rows. */
async function recordFlips(
  problem: MinimalPerturbationProblem,
  rows: Rows,
  samples: readonly number[],
  iteration: number,
  points: Float32Array,
  result: { norms: Float64Array; flipped: Uint8Array; iterations: Int32Array },
  dim: number,
): Promise<number[]> {
  const mis = tf.tidy(() => misclassified(problem.logits(rows.current), rows.labels));
  const [flags, current, clean] = await Promise.all([mis.data(), rows.current.data(), rows.clean.data()]);
  mis.dispose();
  const sizes = perturbationNorms(current as Float32Array, clean as Float32Array, dim, problem.norm);
  const keep: number[] = [];
  samples.forEach((sample, row) => {
    result.iterations[sample] = iteration;
    if (flags[row] === 0) {
      keep.push(row);
      return;
    }
    points.set((current as Float32Array).subarray(row * dim, (row + 1) * dim), sample * dim);
    result.norms[sample] = sizes[row]!;
    result.flipped[sample] = 1;
  });
  return keep;
}

/** r_i for every row: the step to the nearest linearised boundary among the candidate classes. */
async function linearStep(problem: MinimalPerturbationProblem, rows: Rows, context: Pick<AttackContext, 'signal'>, pause: () => Promise<void>): Promise<tf.Tensor4D> {
  const m = rows.labels.shape[0];
  let bestRatio: tf.Tensor1D = tf.fill([m], Infinity);
  let bestStep: tf.Tensor4D = tf.zerosLike(rows.current);
  try {
    for (let rank = 0; rank < rows.candidates.shape[1]; rank++) {
      const next = tidyObject(() => {
        const k = tf.reshape(tf.slice(rows.candidates, [0, rank], [m, 1]), [m]) as tf.Tensor1D;
        const pick = (z: tf.Tensor2D, cls: tf.Tensor1D): tf.Tensor1D => tf.sum(tf.mul(z, tf.oneHot(cls, z.shape[1])), 1);
        const value = objectiveAndInputGradient(problem.logits, rows.current, (z) => tf.sub(pick(z, k), pick(z, rows.labels)));
        const { loss } = value;
        const grad = freeGradient(value.grad, rows.current);
        const gap = tf.abs(loss);
        const dual = problem.norm === 'l2' ? tf.reshape(perSampleL2(grad), [m]) : tf.sum(tf.abs(grad), [1, 2, 3]);
        const safe = tf.maximum(dual, 1e-30);
        const ratio = tf.div(gap, safe) as tf.Tensor1D;
        const direction = problem.norm === 'l2' ? tf.div(grad, tf.reshape(safe, [m, 1, 1, 1])) : tf.sign(grad);
        const step = tf.mul(tf.reshape(ratio, [m, 1, 1, 1]), direction) as tf.Tensor4D;
        const better = tf.less(ratio, bestRatio);
        return { ratio: tf.where(better, ratio, bestRatio), step: tf.where(tf.reshape(better, [m, 1, 1, 1]), step, bestStep) };
      });
      tf.dispose([bestRatio, bestStep]);
      bestRatio = next.ratio;
      bestStep = next.step;
      throwIfAborted(context.signal);
      await pause();
    }
    bestRatio.dispose();
    return bestStep;
  } catch (err) {
    tf.dispose([bestRatio, bestStep]);
    throw err;
  }
}

/**
 * x + (1 + overshoot)·(r + r_i), clipped to the box; r is then reset to the clipped point's own
 * perturbation ÷ (1 + overshoot), so later steps start from where the search really is.
 */
function advance(rows: Rows, step: tf.Tensor4D, overshoot: number): Rows {
  const current: tf.Tensor4D = tf.clipByValue(tf.add(rows.clean, tf.mul(1 + overshoot, tf.add(rows.total, step))), 0, 1);
  const total: tf.Tensor4D = tf.div(tf.sub(current, rows.clean), 1 + overshoot);
  return { clean: tf.clone(rows.clean), labels: tf.clone(rows.labels), candidates: tf.clone(rows.candidates), total, current };
}

/**
 * Drops the gradient components of pixels that sit at a bound of [0, 1] and would be pushed out of it:
 * those pixels cannot move, so the linearised problem is solved over the free pixels only. (Without
 * this, on MNIST, whose background sits at 0, most of each step was clipped away: the search needed
 * about 20 steps per digit and gave up on about a third of them within 50.)
 */
function freeGradient(grad: tf.Tensor4D, point: tf.Tensor4D): tf.Tensor4D {
  const blocked = tf.logicalOr(tf.logicalAnd(tf.lessEqual(point, 0), tf.less(grad, 0)), tf.logicalAnd(tf.greaterEqual(point, 1), tf.greater(grad, 0)));
  return tf.where(blocked, tf.zerosLike(grad), grad);
}

/** DeepFool at a budget: the point found, projected onto ball ∩ box; flipped if that point is misclassified. */
export async function runDeepFool(problem: AttackProblem, options: DeepFoolOptions, context: AttackContext): Promise<AttackOutcome> {
  const found = await deepfoolMinimalPerturbation(problem, options, context);
  const adv = tf.tidy(() => projectToThreatModel(problem.x, found.adv, problem.eps, problem.norm));
  found.adv.dispose();
  try {
    const mis = tf.tidy(() => misclassified(problem.logits(adv), problem.labels));
    const flipped = new Uint8Array(await mis.data());
    mis.dispose();
    return { adv, flipped, gradientEvaluations: found.gradientEvaluations };
  } catch (err) {
    adv.dispose();
    throw err;
  }
}

/** DeepFool behind the shared attack interface. */
export const deepfool: AttackMethod<DeepFoolOptions> = { meta: deepfoolMeta, run: runDeepFool };
