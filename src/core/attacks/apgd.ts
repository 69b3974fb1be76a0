/**
 * APGD, Auto-PGD (Croce & Hein, "Reliable Evaluation of Adversarial Robustness with an Ensemble of
 * Diverse Parameter-free Attacks", ICML 2020, Algorithm 1): projected gradient ascent with momentum
 * whose step size needs no tuning. From x(0):
 *
 *   x(1)   = Π(x(0) + η·d(∇f(x(0))))
 *   z(k+1) = Π(x(k) + η·d(∇f(x(k))))
 *   x(k+1) = Π(x(k) + α·(z(k+1) − x(k)) + (1 − α)·(x(k) − x(k−1)))        α = 0.75
 *
 * with d = sign for L∞ and ·/‖·‖₂ for L2, Π the projection onto ball ∩ [0,1] and η = 2ε at first. At
 * the checkpoints of apgdSchedule.ts a sample's η is halved and its search moves back to the best
 * point of the restart (using the gradient stored there). Here the checkpoint test at w_j runs as soon
 * as f(x(w_j)) is known, and it is x(w_j) that the best point replaces. The random start (uniform in
 * the L∞ ball, uniform on the L2 sphere of radius ε) follows the paper's setup as remembered (from memory).
 *
 * Bookkeeping as in pgd.ts: every iterate is evaluated (the start and x(N) included); a sample seen
 * misclassified is flipped, its point frozen and it is no longer attacked; restarts continue only the
 * unflipped samples; a sample never flipped returns its highest-loss iterate.
 */
import * as tf from '@tensorflow/tfjs';
import type { AttackContext, AttackMeta, AttackMethod, AttackOutcome, AttackProblem, TargetMode } from './types.ts';
import { perSampleLoss } from './losses.ts';
import { dlrLoss, targetedDlrLoss } from './dlr.ts';
import type { LogitObjective } from './objective.ts';
import { normalisedStep, projectToThreatModel } from './projections.ts';
import { tidyObject } from './tensors.ts';
import { StepSizeSchedule } from './apgdSchedule.ts';
import { evaluateIterate, runIterates } from './iterateLoop.ts';
import { runRestarts, type RestartRun } from './searchSupport.ts';
import { apgdStart } from './randomPoints.ts';
import { checkBoolean, checkPositiveInteger, checkTarget, rejectUnknownOptions } from './options.ts';

/** The loss APGD maximises: cross-entropy or the Difference of Logits Ratio (dlr.ts). */
export type ApgdLoss = 'ce' | 'dlr';

export interface ApgdOptions {
  /** Iterations N per restart (gradient passes); the checkpoints scale with it. */
  readonly steps: number;
  /** Independent runs from fresh random starts; later runs attack only the samples still unflipped. */
  readonly restarts: number;
  /** Start at a random point (uniform in the L∞ ball, uniform on the L2 sphere of radius ε) instead of x. */
  readonly randomStart: boolean;
  /** Targeted runs use −CE of the target (apgd-ce) or the targeted DLR form (apgd-dlr). */
  readonly target: TargetMode;
}

/** Momentum weight α of the update (Croce & Hein 2020). */
const MOMENTUM = 0.75;
/** The first step is η = 2ε in both norms (Croce & Hein 2020). */
const FIRST_STEP_FACTOR = 2;

/** The paper's parameter-free setting: 100 iterations, one run from a random start. */
const APGD_DEFAULTS: ApgdOptions = { steps: 100, restarts: 1, randomStart: true, target: { kind: 'untargeted' } };

function apgdMeta(loss: ApgdLoss): AttackMeta<ApgdOptions> {
  const id = loss === 'ce' ? 'apgd-ce' : 'apgd-dlr';
  const lossName = loss === 'ce' ? 'cross-entropy' : 'Difference of Logits Ratio';
  return {
    id,
    label: loss === 'ce' ? 'APGD-CE' : 'APGD-DLR',
    summary: `Auto-PGD on the ${lossName} loss: momentum steps whose size starts at 2ε and halves when progress stalls, restarting from the best point (Croce & Hein, "Reliable Evaluation of Adversarial Robustness with an Ensemble of Diverse Parameter-free Attacks", ICML 2020).`,
    norms: ['linf', 'l2'],
    defaults: APGD_DEFAULTS,
    estimateGradientEvaluations: (options) => options.steps * options.restarts,
    validate(options) {
      rejectUnknownOptions(id, options, Object.keys(APGD_DEFAULTS));
      const completed: ApgdOptions = {
        steps: checkPositiveInteger(id, 'steps', options.steps ?? APGD_DEFAULTS.steps),
        restarts: checkPositiveInteger(id, 'restarts', options.restarts ?? APGD_DEFAULTS.restarts),
        randomStart: checkBoolean(id, 'randomStart', options.randomStart ?? APGD_DEFAULTS.randomStart),
        target: checkTarget(id, options.target ?? APGD_DEFAULTS.target),
      };
      if (completed.restarts > 1 && !completed.randomStart) {
        throw new Error(`${id}: restarts must be 1 without randomStart (got ${completed.restarts}; every restart would repeat the first)`);
      }
      return completed;
    },
  };
}

interface RestartEnv extends RestartRun {
  readonly loss: ApgdLoss;
  readonly problem: AttackProblem;
  readonly options: ApgdOptions;
  readonly context: AttackContext;
}

function runApgd(loss: ApgdLoss, problem: AttackProblem, options: ApgdOptions, context: AttackContext): Promise<AttackOutcome> {
  return runRestarts(loss === 'ce' ? 'apgd-ce' : 'apgd-dlr', problem, options, context, (run, samples) => runRestart({ ...run, loss, problem, options, context }, samples));
}

/** The tensors of the rows a restart still attacks. */
interface Rows {
  readonly clean: tf.Tensor4D;
  readonly labels: tf.Tensor1D;
  readonly targets: tf.Tensor1D | null;
  /** x(k). */
  readonly current: tf.Tensor4D;
  /** x(k−1) (equal to x(0) before the first step). */
  readonly previous: tf.Tensor4D;
  /** Best point of this restart and the gradient there. */
  readonly best: tf.Tensor4D;
  readonly bestGrad: tf.Tensor4D;
}

/** Per kept row: whether x(k) is the restart's best, whether η was halved, and η. */
interface StepPlan {
  readonly improved: Uint8Array;
  readonly halved: Uint8Array;
  readonly eta: Float32Array;
}

async function runRestart(env: RestartEnv, samples: number[]): Promise<void> {
  const { problem, options } = env;
  const schedule = new StepSizeSchedule(problem.x.shape[0], options.steps);
  await runIterates(
    {
      steps: options.steps,
      signal: env.context.signal,
      pause: env.pause,
      evaluate: (rows, forwardOnly) => evaluateIterate(problem.logits, rows.current, rows.labels, objectiveFor(env.loss, rows), forwardOnly),
      step: (rows, grad, keep, { k, samples: rowSamples, loss }) =>
        stepRows(env, rows, grad, keep, planStep(schedule, k, problem.eps, rowSamples, loss, keep), k === 0),
      dispose: disposeRows,
      afterStep: () => env.progress.advance(problem.x.shape[0]),
    },
    env.state,
    samples,
    startRows(env, samples),
  );
}

/** Runs the schedule for the kept rows after f(x(k)) is known. */
function planStep(schedule: StepSizeSchedule, k: number, eps: number, samples: readonly number[], loss: ArrayLike<number>, keep: readonly number[]): StepPlan {
  const improved = new Uint8Array(keep.length);
  const halved = new Uint8Array(keep.length);
  const eta = new Float32Array(keep.length);
  const interval = k === 0 ? null : schedule.intervalEndingAt(k);
  keep.forEach((row, i) => {
    const sample = samples[row]!;
    if (k === 0) {
      schedule.start(sample, FIRST_STEP_FACTOR * eps, loss[row]!);
      improved[i] = 1;
    } else {
      improved[i] = schedule.observe(sample, loss[row]!) ? 1 : 0;
      if (interval !== null) halved[i] = schedule.decide(sample, interval) ? 1 : 0;
    }
    eta[i] = schedule.eta[sample]!;
  });
  return { improved, halved, eta };
}

function objectiveFor(loss: ApgdLoss, rows: Rows): LogitObjective {
  const { labels, targets } = rows;
  if (loss === 'ce') return (z) => perSampleLoss(z, labels, 'ce', targets);
  return targets === null ? (z) => dlrLoss(z, labels) : (z) => targetedDlrLoss(z, labels, targets);
}

function rowMask(values: Uint8Array): tf.Tensor4D {
  return tf.reshape(tf.tensor1d(values, 'bool'), [values.length, 1, 1, 1]);
}

/** One APGD update for the rows in `keep` (local indices); the flipped rows are dropped. */
function stepRows(env: RestartEnv, rows: Rows, grad: tf.Tensor4D, keep: number[], plan: StepPlan, first: boolean): Rows {
  const { eps, norm } = env.problem;
  const sub = tf.tensor1d(keep, 'int32');
  const pick = <T extends tf.Tensor>(t: T): T => tf.gather(t, sub);
  const clean = pick(rows.clean);
  const current = pick(rows.current);
  const g = pick(grad);
  const improved = rowMask(plan.improved);
  const best = tf.where(improved, current, pick(rows.best));
  const bestGrad = tf.where(improved, g, pick(rows.bestGrad));
  const halved = rowMask(plan.halved);
  const from = tf.where(halved, best, current);
  const direction = tf.where(halved, bestGrad, g);
  const eta = tf.tensor4d(plan.eta, [keep.length, 1, 1, 1]);
  const z = projectToThreatModel(clean, tf.add(from, tf.mul(eta, normalisedStep(direction, norm))), eps, norm);
  const next = first
    ? z
    : projectToThreatModel(clean, tf.add(tf.add(from, tf.mul(MOMENTUM, tf.sub(z, from))), tf.mul(1 - MOMENTUM, tf.sub(from, pick(rows.previous)))), eps, norm);
  return {
    clean,
    labels: pick(rows.labels),
    targets: rows.targets === null ? null : pick(rows.targets),
    current: next,
    previous: from,
    best,
    bestGrad,
  };
}

function startRows(env: RestartEnv, samples: number[]): Rows {
  const { problem } = env;
  return tidyObject(() => {
    const index = tf.tensor1d(samples, 'int32');
    const clean = tf.gather(problem.x, index);
    const current = env.options.randomStart ? apgdStart(clean, problem.eps, problem.norm, env.context.rng) : tf.clone(clean);
    return {
      clean,
      labels: tf.gather(problem.labels, index),
      targets: env.targets === null ? null : tf.gather(env.targets, index),
      current,
      previous: tf.clone(current),
      best: tf.clone(current),
      bestGrad: tf.zerosLike(current),
    };
  });
}

function disposeRows(rows: Rows): void {
  tf.dispose([rows.clean, rows.labels, rows.current, rows.previous, rows.best, rows.bestGrad, ...(rows.targets ? [rows.targets] : [])]);
}

/** APGD with the cross-entropy loss behind the shared attack interface. */
export const apgdCe: AttackMethod<ApgdOptions> = { meta: apgdMeta('ce'), run: (p, o, c) => runApgd('ce', p, o, c) };

/** APGD with the DLR loss behind the shared attack interface. */
export const apgdDlr: AttackMethod<ApgdOptions> = { meta: apgdMeta('dlr'), run: (p, o, c) => runApgd('dlr', p, o, c) };
