/**
 * PGD, projected gradient descent on the negative loss (Madry, Makelov, Schmidt, Tsipras & Vladu,
 * "Towards Deep Learning Models Resistant to Adversarial Attacks", ICLR 2018): from a random point of
 * the ε-ball (or from x), repeat x ← Π(x + α·d(∇ₓL)) where d is sign(·) for L∞ and ·/‖·‖₂ for L2 and
 * Π is the projection onto ball ∩ [0,1] (projections.ts).
 *
 * Bookkeeping (see README.md): every iterate is evaluated, the start point and the last one included.
 * A sample seen misclassified at any iterate of any restart is flipped; that point is frozen and the
 * sample is no longer attacked. Restarts continue only the unflipped samples. For a sample never
 * flipped, the point returned is the one of highest loss among all its iterates. The restarts run in
 * searchSupport.ts (runRestarts) and each restart's iterates in iterateLoop.ts (runIterates), as for APGD.
 */
import * as tf from '@tensorflow/tfjs';
import type { AttackContext, AttackMeta, AttackMethod, AttackOutcome, AttackProblem, LossKind, TargetMode } from './types.ts';
import { perSampleLoss } from './losses.ts';
import { normalisedStep, projectToThreatModel, randomStart } from './projections.ts';
import { tidyObject } from './tensors.ts';
import { evaluateIterate, keptRows, runIterates } from './iterateLoop.ts';
import { runRestarts, type RestartRun } from './searchSupport.ts';
import { checkBoolean, checkLoss, checkPositiveInteger, checkPositiveOrNull, checkTarget, rejectUnknownOptions } from './options.ts';

export interface PgdOptions {
  /** Gradient steps per restart. */
  readonly steps: number;
  /** Step α in pixel units (L∞: per pixel; L2: Euclidean length); null → 2.5·ε/steps. */
  readonly stepSize: number | null;
  /** Start each restart at a uniform random point of the ε-ball (Madry et al.) instead of x. */
  readonly randomStart: boolean;
  /** Independent runs from fresh random starts; later runs attack only the samples still unflipped. */
  readonly restarts: number;
  readonly loss: LossKind;
  readonly target: TargetMode;
}

/**
 * 10 steps of 2.5·ε/steps = 0.25·ε let an iterate cross the ball (2ε wide) a bit more than once
 * (common practice; ten steps keep a browser sweep affordable; raise steps for a stronger search).
 */
const PGD_DEFAULTS: PgdOptions = {
  steps: 10,
  stepSize: null,
  randomStart: true,
  restarts: 1,
  loss: 'ce',
  target: { kind: 'untargeted' },
};

export const pgdMeta: AttackMeta<PgdOptions> = {
  id: 'pgd',
  label: 'PGD',
  summary:
    'Projected gradient ascent on the loss from a random start in the ε-ball, projecting onto the ball and the pixel box after every step (Madry et al., "Towards Deep Learning Models Resistant to Adversarial Attacks", ICLR 2018).',
  norms: ['linf', 'l2'],
  defaults: PGD_DEFAULTS,
  estimateGradientEvaluations: (options) => options.steps * options.restarts,
  validate(options) {
    rejectUnknownOptions('pgd', options, Object.keys(PGD_DEFAULTS));
    const completed: PgdOptions = {
      steps: checkPositiveInteger('pgd', 'steps', options.steps ?? PGD_DEFAULTS.steps),
      stepSize: checkPositiveOrNull('pgd', 'stepSize', options.stepSize === undefined ? PGD_DEFAULTS.stepSize : options.stepSize),
      randomStart: checkBoolean('pgd', 'randomStart', options.randomStart ?? PGD_DEFAULTS.randomStart),
      restarts: checkPositiveInteger('pgd', 'restarts', options.restarts ?? PGD_DEFAULTS.restarts),
      loss: checkLoss('pgd', options.loss ?? PGD_DEFAULTS.loss),
      target: checkTarget('pgd', options.target ?? PGD_DEFAULTS.target),
    };
    if (completed.restarts > 1 && !completed.randomStart) {
      throw new Error(`pgd: restarts must be 1 without randomStart (got ${completed.restarts}; every restart would repeat the first)`);
    }
    return completed;
  },
};

/** Everything one restart needs besides the tensors it owns. */
interface RestartEnv extends RestartRun {
  readonly problem: AttackProblem;
  readonly options: PgdOptions;
  readonly context: AttackContext;
  readonly stepSize: number;
}

/** Run PGD on a batch. */
export async function runPgd(problem: AttackProblem, options: PgdOptions, context: AttackContext): Promise<AttackOutcome> {
  const stepSize = options.stepSize ?? (2.5 * problem.eps) / options.steps;
  return runRestarts('pgd', problem, options, context, (run, samples) => runRestart({ ...run, problem, options, context, stepSize }, samples));
}

/** The tensors of the rows a restart still attacks. */
interface Rows {
  readonly clean: tf.Tensor4D;
  readonly labels: tf.Tensor1D;
  readonly targets: tf.Tensor1D | null;
  readonly current: tf.Tensor4D;
}

async function runRestart(env: RestartEnv, samples: number[]): Promise<void> {
  const { problem, options } = env;
  await runIterates(
    {
      steps: options.steps,
      signal: env.context.signal,
      pause: env.pause,
      evaluate: (rows, forwardOnly) =>
        evaluateIterate(problem.logits, rows.current, rows.labels, (z) => perSampleLoss(z, rows.labels, options.loss, rows.targets), forwardOnly),
      step: (rows, grad, keep) => stepRows(env, rows, grad, keep),
      dispose: disposeRows,
      afterStep: () => env.progress.advance(problem.x.shape[0]),
    },
    env.state,
    samples,
    gatherRows(env, samples),
  );
}

/** One ascent step for the rows in `keep` (local indices); the flipped rows are dropped. */
function stepRows(env: RestartEnv, rows: Rows, grad: tf.Tensor4D, keep: number[]): Rows {
  const { eps, norm } = env.problem;
  const pick = keptRows(keep, rows.labels.shape[0]);
  const clean = pick(rows.clean);
  const current = pick(rows.current);
  const ascent = tf.mul(env.stepSize, normalisedStep(pick(grad), norm));
  return {
    clean,
    labels: pick(rows.labels),
    targets: rows.targets === null ? null : pick(rows.targets),
    current: projectToThreatModel(clean, tf.add(current, ascent), eps, norm),
  };
}

function gatherRows(env: RestartEnv, samples: number[]): Rows {
  const { problem } = env;
  return tidyObject(() => {
    const index = tf.tensor1d(samples, 'int32');
    const clean = tf.gather(problem.x, index);
    return {
      clean,
      labels: tf.gather(problem.labels, index),
      targets: env.targets === null ? null : tf.gather(env.targets, index),
      current: env.options.randomStart ? randomStart(clean, problem.eps, problem.norm, env.context.rng) : tf.clone(clean),
    };
  });
}

function disposeRows(rows: Rows): void {
  tf.dispose([rows.clean, rows.labels, rows.current, ...(rows.targets ? [rows.targets] : [])]);
}

/** PGD behind the shared attack interface. */
export const pgd: AttackMethod<PgdOptions> = { meta: pgdMeta, run: runPgd };
