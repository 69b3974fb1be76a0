/**
 * PGD, projected gradient descent on the negative loss (Madry, Makelov, Schmidt, Tsipras & Vladu,
 * "Towards Deep Learning Models Resistant to Adversarial Attacks", ICLR 2018): from a random point of
 * the ε-ball (or from x), repeat x ← Π(x + α·d(∇ₓL)) where d is sign(·) for L∞ and ·/‖·‖₂ for L2 and
 * Π is the projection onto ball ∩ [0,1] (projections.ts).
 *
 * Bookkeeping (see README.md): every iterate is evaluated, the start point and the last one included.
 * A sample seen misclassified at any iterate of any restart is flipped; that point is frozen and the
 * sample is no longer attacked. Restarts continue only the unflipped samples. For a sample never
 * flipped, the point returned is the one of highest loss among all its iterates.
 */
import * as tf from '@tensorflow/tfjs';
import type { AttackContext, AttackMeta, AttackMethod, AttackOutcome, AttackProblem, LossKind, TargetMode } from './types.ts';
import { lossAndInputGradient, lossAndLogits, misclassified } from './losses.ts';
import { normalisedStep, projectToThreatModel, randomStart } from './projections.ts';
import { resolveTargets } from './targets.ts';
import { makeYielder, throwIfAborted } from './control.ts';
import { tidyObject } from './tensors.ts';
import { activeSamples, createSearchState, recordIterate, type SearchState } from './searchState.ts';
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
interface RestartEnv {
  readonly problem: AttackProblem;
  readonly options: PgdOptions;
  readonly context: AttackContext;
  readonly targets: tf.Tensor1D | null;
  readonly state: SearchState;
  readonly stepSize: number;
  readonly progress: PlanProgress;
  readonly pause: () => Promise<void>;
}

/** Run PGD on a batch. */
export async function runPgd(problem: AttackProblem, options: PgdOptions, context: AttackContext): Promise<AttackOutcome> {
  throwIfAborted(context.signal);
  const n = problem.x.shape[0];
  if (n === 0) return { adv: tf.clone(problem.x), flipped: new Uint8Array(0), gradientEvaluations: 0 };
  const { targets, attackable } = await resolveTargets('pgd', problem, options.target);
  try {
    const state = createSearchState(new Float32Array(await problem.x.data()), n);
    const progress = new PlanProgress(n * options.steps * options.restarts, context);
    const env: RestartEnv = {
      problem,
      options,
      context,
      targets,
      state,
      stepSize: options.stepSize ?? (2.5 * problem.eps) / options.steps,
      progress,
      pause: makeYielder(),
    };
    for (let r = 0; r < options.restarts; r++) {
      throwIfAborted(context.signal);
      const samples = activeSamples(state, attackable);
      if (samples.length === 0) break;
      await runRestart(env, samples);
      progress.reach(n * options.steps * (r + 1));
    }
    await flagUnattackable(problem, attackable, state);
    progress.reach(progress.total);
    return { adv: tf.tensor4d(state.points, problem.x.shape), flipped: state.flipped, gradientEvaluations: state.gradientRows / n };
  } finally {
    targets?.dispose();
  }
}

/** The tensors of the rows a restart still attacks. */
interface Rows {
  readonly clean: tf.Tensor4D;
  readonly labels: tf.Tensor1D;
  readonly targets: tf.Tensor1D | null;
  readonly current: tf.Tensor4D;
}

async function runRestart(env: RestartEnv, firstSamples: number[]): Promise<void> {
  const { problem, options, state } = env;
  let samples = firstSamples;
  let rows = gatherRows(env, samples);
  try {
    for (let step = 0; ; step++) {
      const last = step === options.steps;
      const evaluated = tidyObject(() => evaluate(env, rows, last));
      let stillActive: number[];
      try {
        const [iterate, loss, mis] = await Promise.all([rows.current.data(), evaluated.loss.data(), evaluated.mis.data()]);
        stillActive = recordIterate(state, samples, iterate as Float32Array, loss, mis);
        if (!last) state.gradientRows += samples.length;
        if (last || stillActive.length === 0) break;
        const next = tidyObject(() => stepRows(env, rows, evaluated.grad!, stillActive));
        disposeRows(rows);
        rows = next;
      } finally {
        tf.dispose([evaluated.loss, evaluated.mis, ...(evaluated.grad ? [evaluated.grad] : [])]);
      }
      samples = stillActive.map((i) => samples[i]!);
      env.progress.advance(problem.x.shape[0]);
      throwIfAborted(env.context.signal);
      await env.pause();
    }
  } finally {
    disposeRows(rows);
  }
}

interface Evaluation {
  readonly loss: tf.Tensor1D;
  readonly mis: tf.Tensor1D;
  /** Absent for the final, forward-only evaluation. */
  readonly grad?: tf.Tensor4D;
}

function evaluate(env: RestartEnv, rows: Rows, forwardOnly: boolean): Evaluation {
  const { problem, options } = env;
  if (forwardOnly) {
    const { loss, logits } = lossAndLogits(problem.logits, rows.current, rows.labels, options.loss, rows.targets);
    return { loss, mis: misclassified(logits, rows.labels) };
  }
  const { loss, logits, grad } = lossAndInputGradient(problem.logits, rows.current, rows.labels, options.loss, rows.targets);
  return { loss, mis: misclassified(logits, rows.labels), grad };
}

/** One ascent step for the rows in `keep` (local indices); the flipped rows are dropped. */
function stepRows(env: RestartEnv, rows: Rows, grad: tf.Tensor4D, keep: number[]): Rows {
  const { eps, norm } = env.problem;
  const sub = keep.length === rows.labels.shape[0] ? null : tf.tensor1d(keep, 'int32');
  const pick = <T extends tf.Tensor>(t: T): T => (sub === null ? tf.clone(t) : tf.gather(t, sub));
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

/** Samples a targeted search skipped keep x; flag them by the model's own verdict at x. */
async function flagUnattackable(problem: AttackProblem, attackable: Uint8Array, state: SearchState): Promise<void> {
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
    state.flipped[sample] = values[i] === 0 ? 0 : 1;
  });
}

/**
 * Progress in planned gradient evaluations (samples × steps × restarts): steps saved because
 * samples were already flipped count as done, so the fraction moves evenly and ends at 1.
 */
class PlanProgress {
  private done = 0;
  constructor(
    readonly total: number,
    private readonly context: AttackContext,
  ) {}
  advance(amount: number): void {
    this.reach(this.done + amount);
  }
  reach(value: number): void {
    const next = Math.min(this.total, value);
    if (next <= this.done) return;
    this.done = next;
    this.context.onProgress?.(this.done, this.total);
  }
}

/** PGD behind the shared attack interface. */
export const pgd: AttackMethod<PgdOptions> = { meta: pgdMeta, run: runPgd };
