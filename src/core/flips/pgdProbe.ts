/**
 * PGD (Madry et al., ICLR 2018) as a bisection probe: the same ascent x ← Π(x + α·d(∇ₓL)) and the same
 * bookkeeping as attacks/pgd.ts (every iterate evaluated, a row frozen at its first misclassified
 * point, otherwise the point of highest loss kept), with one budget per row and a warm start: the
 * first restart begins at the given point, later restarts at random points of each row's ball.
 */
import * as tf from '@tensorflow/tfjs';
import type { AttackContext, AttackOutcome } from '../attacks/types.ts';
import type { PgdOptions } from '../attacks/pgd.ts';
import { perSampleLoss } from '../attacks/losses.ts';
import { normalisedStep } from '../attacks/projections.ts';
import { makeYielder, throwIfAborted } from '../attacks/control.ts';
import { tidyObject } from '../attacks/tensors.ts';
import { activeSamples, createSearchState, type SearchState } from '../attacks/searchState.ts';
import { evaluateIterate, keptRows, runIterates } from '../attacks/iterateLoop.ts';
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
  samples: number[],
  fromStart: boolean,
  pause: () => Promise<void>,
): Promise<void> {
  await runIterates(
    {
      steps: options.steps,
      signal: context.signal,
      pause,
      evaluate: (rows, forwardOnly) =>
        evaluateIterate(problem.logits, rows.current, rows.labels, (z) => perSampleLoss(z, rows.labels, options.loss, null), forwardOnly),
      step: (rows, grad, keep) => ascend(problem, rows, grad, keep),
      dispose: disposeRows,
    },
    state,
    samples,
    firstRows(problem, options, context, samples, fromStart),
  );
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

/** One ascent step for the local rows in `keep`; flipped rows are dropped. */
function ascend(problem: ProbeProblem, rows: Rows, grad: tf.Tensor4D, keep: number[]): Rows {
  const pick = keptRows(keep, rows.labels.shape[0]);
  const clean = pick(rows.clean);
  const eps = pick(rows.eps);
  const alpha = pick(rows.alpha);
  const stepped = tf.add(pick(rows.current), tf.mul(alpha, normalisedStep(pick(grad), problem.norm))) as tf.Tensor4D;
  return { clean, labels: pick(rows.labels), eps, alpha, current: projectRows(clean, stepped, eps, problem.norm) };
}

function disposeRows(rows: Rows): void {
  tf.dispose([rows.clean, rows.labels, rows.eps, rows.alpha, rows.current]);
}
