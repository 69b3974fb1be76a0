/**
 * PGD (Madry et al., ICLR 2018) as a bisection probe: the same ascent x ← Π(x + α·d(∇ₓL)) and the same
 * bookkeeping as attacks/pgd.ts (every iterate evaluated, a row frozen at its first misclassified
 * point, otherwise the point of highest loss kept), with one budget per row and a warm start: the
 * first restart begins at the given point, later restarts at random points of each row's ball.
 */
import * as tf from '@tensorflow/tfjs';
import type { AttackContext, AttackOutcome } from '../attacks/types.ts';
import type { PgdOptions } from '../attacks/pgd.ts';
import { lossAndInputGradient, lossAndLogits, misclassified } from '../attacks/losses.ts';
import { normalisedStep } from '../attacks/projections.ts';
import { makeYielder, throwIfAborted } from '../attacks/control.ts';
import { tidyObject } from '../attacks/tensors.ts';
import { activeSamples, createSearchState, recordIterate, type SearchState } from '../attacks/searchState.ts';
import { budgetTensor, projectRows, randomStartRows } from './geometry.ts';
import type { FlipProbe, ProbeProblem } from './probe.ts';

/** The rows one restart still attacks. */
interface Rows {
  readonly clean: tf.Tensor4D;
  readonly labels: tf.Tensor1D;
  readonly eps: tf.Tensor4D;
  /** Step length per row, [n,1,1,1]. */
  readonly alpha: tf.Tensor4D;
  readonly current: tf.Tensor4D;
}

/** A PGD probe with these (validated, untargeted) options. */
export function pgdProbe(options: PgdOptions): FlipProbe {
  if (options.target.kind !== 'untargeted') throw new Error('Flip budgets use untargeted searches; pgd target must be untargeted.');
  return (problem, context) => runPgdProbe(problem, options, context);
}

async function runPgdProbe(problem: ProbeProblem, options: PgdOptions, context: AttackContext): Promise<AttackOutcome> {
  throwIfAborted(context.signal);
  const n = problem.x.shape[0];
  const state = createSearchState(new Float32Array(await problem.x.data()), n);
  const attackable = new Uint8Array(n).fill(1);
  const pause = makeYielder();
  const total = n * options.steps * options.restarts;
  for (let r = 0; r < options.restarts; r++) {
    const samples = activeSamples(state, attackable);
    if (samples.length === 0) break;
    const fromStart = r === 0 && problem.start !== null;
    await runRestart(problem, options, context, state, samples, fromStart, pause);
    context.onProgress?.(n * options.steps * (r + 1), total);
  }
  context.onProgress?.(total, total);
  return { adv: tf.tensor4d(state.points, problem.x.shape), flipped: state.flipped, gradientEvaluations: state.gradientRows / n };
}

async function runRestart(
  problem: ProbeProblem,
  options: PgdOptions,
  context: AttackContext,
  state: SearchState,
  firstSamples: number[],
  fromStart: boolean,
  pause: () => Promise<void>,
): Promise<void> {
  let samples = firstSamples;
  let rows = firstRows(problem, options, context, samples, fromStart);
  try {
    for (let step = 0; ; step++) {
      const last = step === options.steps;
      const evaluated = tidyObject(() => evaluate(problem, options, rows, last));
      let stillActive: number[];
      try {
        const [iterate, loss, mis] = await Promise.all([rows.current.data(), evaluated.loss.data(), evaluated.mis.data()]);
        stillActive = recordIterate(state, samples, iterate as Float32Array, loss, mis);
        if (!last) state.gradientRows += samples.length;
        if (last || stillActive.length === 0) break;
        const next = tidyObject(() => ascend(problem, rows, evaluated.grad!, stillActive));
        disposeRows(rows);
        rows = next;
      } finally {
        tf.dispose([evaluated.loss, evaluated.mis, ...(evaluated.grad ? [evaluated.grad] : [])]);
      }
      samples = stillActive.map((i) => samples[i]!);
      throwIfAborted(context.signal);
      await pause();
    }
  } finally {
    disposeRows(rows);
  }
}

function firstRows(problem: ProbeProblem, options: PgdOptions, context: AttackContext, samples: number[], fromStart: boolean): Rows {
  const eps = Float32Array.from(samples, (s) => problem.eps[s]!);
  const alpha = Float32Array.from(eps, (e) => options.stepSize ?? (2.5 * e) / options.steps);
  return tidyObject(() => {
    const index = tf.tensor1d(samples, 'int32');
    const clean = tf.gather(problem.x, index);
    let current: tf.Tensor4D;
    if (fromStart) current = tf.gather(problem.start!, index);
    else if (options.randomStart) current = randomStartRows(clean, eps, problem.norm, context.rng);
    else current = tf.clone(clean);
    return { clean, labels: tf.gather(problem.labels, index), eps: budgetTensor(eps), alpha: budgetTensor(alpha), current };
  });
}

interface Evaluation {
  readonly loss: tf.Tensor1D;
  readonly mis: tf.Tensor1D;
  readonly grad?: tf.Tensor4D;
}

function evaluate(problem: ProbeProblem, options: PgdOptions, rows: Rows, forwardOnly: boolean): Evaluation {
  if (forwardOnly) {
    const { loss, logits } = lossAndLogits(problem.logits, rows.current, rows.labels, options.loss, null);
    return { loss, mis: misclassified(logits, rows.labels) };
  }
  const { loss, logits, grad } = lossAndInputGradient(problem.logits, rows.current, rows.labels, options.loss, null);
  return { loss, mis: misclassified(logits, rows.labels), grad };
}

/** One ascent step for the local rows in `keep`; flipped rows are dropped. */
function ascend(problem: ProbeProblem, rows: Rows, grad: tf.Tensor4D, keep: number[]): Rows {
  const sub = keep.length === rows.labels.shape[0] ? null : tf.tensor1d(keep, 'int32');
  const pick = <T extends tf.Tensor>(t: T): T => (sub === null ? tf.clone(t) : tf.gather(t, sub));
  const clean = pick(rows.clean);
  const eps = pick(rows.eps);
  const alpha = pick(rows.alpha);
  const stepped = tf.add(pick(rows.current), tf.mul(alpha, normalisedStep(pick(grad), problem.norm))) as tf.Tensor4D;
  return { clean, labels: pick(rows.labels), eps, alpha, current: projectRows(clean, stepped, eps, problem.norm) };
}

function disposeRows(rows: Rows): void {
  tf.dispose([rows.clean, rows.labels, rows.eps, rows.alpha, rows.current]);
}
