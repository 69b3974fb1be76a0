/**
 * The Square attack (Andriushchenko, Croce, Flammarion & Hein, "Square Attack: a query-efficient
 * black-box adversarial attack via random search", ECCV 2020): a score-based random search that
 * needs no gradients, only the model's logits. From a structured start (squareUpdates.ts) it proposes
 * one random square-shaped change per iteration and keeps it when it lowers the margin
 * z_y − max_{j≠y} z_j (here maximised as its negative, the margin loss of losses.ts). The square side
 * follows the schedule p(i); every proposal stays in ball ∩ [0,1].
 *
 * It is the gradient-free cross-check: a model that looks robust to gradient searches but not to
 * this one has gradients that mislead. Bookkeeping as in pgd.ts (flipped points frozen, flipped
 * samples no longer queried). `gradientEvaluations` reports forward passes (queries) per sample,
 * the start included; each costs roughly a third of a gradient pass.
 */
import * as tf from '@tensorflow/tfjs';
import type { Norm } from '../types.ts';
import type { AttackContext, AttackMeta, AttackMethod, AttackOutcome, AttackProblem } from './types.ts';
import { misclassified, perSampleLoss } from './losses.ts';
import { makeYielder, throwIfAborted } from './control.ts';
import { tidyObject } from './tensors.ts';
import { createSearchState, recordIterate, type SearchState } from './searchState.ts';
import { allRows, PlanProgress } from './searchSupport.ts';
import { checkPositiveInteger, rejectUnknownOptions } from './options.ts';
import { l2Proposal, l2Side, l2Tiles, linfProposal, linfStripes, squareFraction, squareSide, type Geometry } from './squareUpdates.ts';
import type { Rng } from '../random/rng.ts';

export interface SquareOptions {
  /** Forward passes per sample, the start included (the paper's query budget). */
  readonly queries: number;
  /** p_init, the initial share of the image a square covers, in (0, 1]; null → the norm's default. */
  readonly pInit: number | null;
}

/**
 * p_init when the option is null. From memory, the paper tunes p_init per data set and norm (small
 * values, around 0.05 to 0.1, on ImageNet). Measured here on the MNIST CNN test fixture at 1,000
 * queries, 100 held-out digits, among {0.05, 0.1, 0.3, 0.8}: for L2 at ε = 1.5, 0.8 left the lowest
 * robust accuracy (28 % against 32 % and 34 % for 0.1 and 0.3); for L∞ at ε = 0.15, 0.3 and 0.8 tied
 * at 1 % (0.1: 7 %, 0.05: 13 %).
 */
export const SQUARE_DEFAULT_P_INIT: Readonly<Record<Norm, number>> = { linf: 0.8, l2: 0.8 };

const SQUARE_DEFAULTS: SquareOptions = { queries: 1000, pInit: null };

export const squareMeta: AttackMeta<SquareOptions> = {
  id: 'square',
  label: 'Square',
  summary:
    'Score-based random search without gradients: random square-shaped changes kept when they lower the logit margin (Andriushchenko et al., "Square Attack: a query-efficient black-box adversarial attack via random search", ECCV 2020).',
  norms: ['linf', 'l2'],
  defaults: SQUARE_DEFAULTS,
  estimateGradientEvaluations: (options) => options.queries,
  validate(options) {
    rejectUnknownOptions('square', options, Object.keys(SQUARE_DEFAULTS));
    const pInit = options.pInit === undefined ? SQUARE_DEFAULTS.pInit : options.pInit;
    if (pInit !== null && (typeof pInit !== 'number' || !(pInit > 0 && pInit <= 1))) {
      throw new Error(`square: pInit must be a number in (0, 1] or null (got ${JSON.stringify(pInit)})`);
    }
    return { queries: checkPositiveInteger('square', 'queries', options.queries ?? SQUARE_DEFAULTS.queries), pInit };
  },
};

interface SquareRun {
  readonly problem: AttackProblem;
  readonly clean: Float32Array;
  readonly geometry: Geometry;
  readonly dim: number;
  readonly state: SearchState;
  readonly rng: Rng;
}

/** Run the Square attack on a batch. */
export async function runSquare(problem: AttackProblem, options: SquareOptions, context: AttackContext): Promise<AttackOutcome> {
  throwIfAborted(context.signal);
  const [n, height, width, channels] = problem.x.shape;
  if (n === 0) return { adv: tf.clone(problem.x), flipped: new Uint8Array(0), gradientEvaluations: 0 };
  const clean = new Float32Array(await problem.x.data());
  const geometry: Geometry = { height, width, channels };
  const dim = height * width * channels;
  const run: SquareRun = { problem, clean, geometry, dim, state: createSearchState(clean, n), rng: context.rng };
  const progress = new PlanProgress(n * options.queries, context);
  const pause = makeYielder();
  const pInit = options.pInit ?? SQUARE_DEFAULT_P_INIT[problem.norm];
  const iterations = options.queries - 1;
  let samples = await query(run, allRows(n), (s) => start(run, s));
  progress.advance(n);
  for (let i = 1; i <= iterations && samples.length > 0; i++) {
    throwIfAborted(context.signal);
    const side = squareSide(squareFraction(pInit, i, iterations), geometry);
    const sideForNorm = problem.norm === 'linf' ? side : l2Side(side, geometry);
    samples = await query(run, samples, (s) => propose(run, s, sideForNorm));
    progress.advance(n);
    await pause();
  }
  progress.finish();
  const { state } = run;
  return { adv: tf.tensor4d(state.points, problem.x.shape), flipped: state.flipped, gradientEvaluations: state.gradientRows / n };
}

function rowOf(data: Float32Array, sample: number, dim: number): Float32Array {
  return data.subarray(sample * dim, (sample + 1) * dim);
}

function start(run: SquareRun, sample: number): Float32Array {
  const x = rowOf(run.clean, sample, run.dim);
  return run.problem.norm === 'linf' ? linfStripes(x, run.problem.eps, run.geometry, run.rng) : l2Tiles(x, run.problem.eps, run.geometry, run.rng);
}

function propose(run: SquareRun, sample: number, side: number): Float32Array {
  const x = rowOf(run.clean, sample, run.dim);
  const best = rowOf(run.state.points, sample, run.dim);
  const { eps } = run.problem;
  return run.problem.norm === 'linf' ? linfProposal(x, best, eps, side, run.geometry, run.rng) : l2Proposal(x, best, eps, side, run.geometry, run.rng);
}

/**
 * One query for each sample: evaluates the candidates, keeps those that raise the margin loss (or
 * flip the sample) as the samples' points, and returns the samples still unflipped.
 */
async function query(run: SquareRun, samples: number[], candidate: (sample: number) => Float32Array): Promise<number[]> {
  const { problem, dim, state } = run;
  const candidates = new Float32Array(samples.length * dim);
  samples.forEach((sample, row) => candidates.set(candidate(sample), row * dim));
  const out = tidyObject(() => {
    const labels = tf.gather(problem.labels, tf.tensor1d(samples, 'int32'));
    const z = problem.logits(tf.tensor4d(candidates, [samples.length, ...problem.x.shape.slice(1)] as [number, number, number, number]));
    return { loss: perSampleLoss(z, labels, 'margin', null), mis: misclassified(z, labels) };
  });
  try {
    const [loss, mis] = await Promise.all([out.loss.data(), out.mis.data()]);
    state.gradientRows += samples.length;
    return recordIterate(state, samples, candidates, loss, mis).map((i) => samples[i]!);
  } finally {
    tf.dispose([out.loss, out.mis]);
  }
}

/** The Square attack behind the shared attack interface. */
export const square: AttackMethod<SquareOptions> = { meta: squareMeta, run: runSquare };
