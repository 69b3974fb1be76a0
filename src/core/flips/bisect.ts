/**
 * Bisection over ε for a batch of clean-correct samples, each with its own bracket.
 *
 * 1. Probe every row at maxEps from the search's own start; rows it cannot flip get null.
 * 2. For a flipped row, hi is the size of the flipping point found and lo the largest failed budget
 *    (0 at first). While hi − lo > tol, probe at mid = (lo + hi)/2 starting from the best point so far
 *    projected into the mid-ball (the warm start): a flip there sets hi to the new point's size
 *    (≤ mid), a failure sets lo = mid.
 *
 * "The best point so far" is whichever of two candidates has the higher margin max_{j≠y} z_j − z_y
 * after projection: the smallest flipping point, or the point the last failed probe ended on. Why
 * both: a flipping point found from a random start keeps much of its random direction, and shrinking
 * it radially (L2) keeps that direction; a failed probe's end point has already turned towards the
 * boundary, and it lies inside every later, larger mid-ball.
 *
 * hi is always the size of a point the model misclassifies, so a flip budget is never below the
 * true minimal budget; the bisection assumes a search that fails at lo fails at every smaller budget.
 */
import * as tf from '@tensorflow/tfjs';
import type { AttackContext } from '../attacks/types.ts';
import { throwIfAborted } from '../attacks/control.ts';
import { perSampleLoss } from '../attacks/losses.ts';
import type { Rng } from '../random/rng.ts';
import type { LogitsFn, Norm } from '../types.ts';
import { budgetTensor, perturbationSizes, projectRows } from './geometry.ts';
import type { FlipProbe } from './probe.ts';

export interface BisectionInput {
  readonly logits: LogitsFn;
  /** Clean-correct rows (NHWC) and their labels; owned by the caller. */
  readonly x: tf.Tensor4D;
  readonly labels: tf.Tensor1D;
  readonly norm: Norm;
  readonly maxEps: number;
  readonly tol: number;
  readonly probe: FlipProbe;
  readonly rng: Rng;
  readonly signal?: AbortSignal;
  /** Called after every probe. */
  readonly onProbe?: () => void;
}

export interface BisectionRows {
  /** Size of the smallest flipping point per row; null when the probe at maxEps failed. */
  readonly flipEps: (number | null)[];
  readonly failedEps: Float64Array;
  /** Prediction at each row's kept point. */
  readonly advPred: Int32Array;
  readonly probes: Int32Array;
}

/** Per-row bracket and best point. */
interface Brackets {
  readonly lo: Float64Array;
  readonly hi: Float64Array;
  readonly found: Uint8Array;
  /** N·D pixels: the best flipping point per row (the probe's point for rows never flipped). */
  readonly best: Float32Array;
  /** N·D pixels: where the last failed probe of each row ended (meaningful where `failed` is 1). */
  readonly lastFailed: Float32Array;
  readonly failed: Uint8Array;
  readonly probes: Int32Array;
}

/** Run the bisection for every row of the batch. */
export async function bisectBatch(input: BisectionInput): Promise<BisectionRows> {
  const n = input.x.shape[0];
  const brackets = await firstProbe(input, n);
  // Each probe halves a bracket at least, so this bounds the loop even for a search that misbehaves.
  const maxRounds = Math.ceil(Math.log2(Math.max(2, input.maxEps / input.tol))) + 4;
  for (let round = 1; round <= maxRounds; round++) {
    const active = openRows(brackets, input.tol);
    if (active.length === 0) break;
    await refine(input, brackets, active, input.rng.fork(round));
  }
  const advPred = await predictions(input, brackets.best);
  return {
    flipEps: Array.from(brackets.hi, (hi, i) => (brackets.found[i] === 1 ? hi : null)),
    // A weak search can fail at lo and then flip a smaller point; the bracket is then (min, hi].
    failedEps: Float64Array.from(brackets.lo, (lo, i) => Math.min(lo, brackets.hi[i]!)),
    advPred,
    probes: brackets.probes,
  };
}

async function firstProbe(input: BisectionInput, n: number): Promise<Brackets> {
  const eps = new Float32Array(n).fill(input.maxEps);
  const outcome = await input.probe({ logits: input.logits, x: input.x, labels: input.labels, eps, norm: input.norm, start: null }, context(input, input.rng.fork(0)));
  try {
    const sizes = await perturbationSizes(input.x, outcome.adv, input.norm);
    input.onProbe?.();
    return {
      lo: new Float64Array(n),
      hi: Float64Array.from(sizes),
      found: Uint8Array.from(outcome.flipped),
      best: new Float32Array(await outcome.adv.data()),
      lastFailed: new Float32Array(input.x.size),
      failed: new Uint8Array(n),
      probes: new Int32Array(n).fill(1),
    };
  } finally {
    outcome.adv.dispose();
  }
}

function openRows(b: Brackets, tol: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < b.found.length; i++) if (b.found[i] === 1 && b.hi[i]! - b.lo[i]! > tol) out.push(i);
  return out;
}

/** One probe at the midpoints of the open rows, warm-started from their best points. */
async function refine(input: BisectionInput, b: Brackets, rows: readonly number[], rng: Rng): Promise<void> {
  throwIfAborted(input.signal);
  const dim = input.x.size / input.x.shape[0];
  const mid = Float32Array.from(rows, (r) => (b.lo[r]! + b.hi[r]!) / 2);
  const { x, labels } = tf.tidy(() => {
    const index = tf.tensor1d(rows as number[], 'int32');
    return { x: tf.gather(input.x, index), labels: tf.gather(input.labels, index) };
  });
  const start = warmStart(input, b, rows, x, labels, mid, dim);
  try {
    const outcome = await input.probe({ logits: input.logits, x, labels, eps: mid, norm: input.norm, start }, context(input, rng));
    try {
      const sizes = await perturbationSizes(x, outcome.adv, input.norm);
      const adv = await outcome.adv.data();
      rows.forEach((r, i) => {
        b.probes[r]! += 1;
        const point = adv.subarray(i * dim, (i + 1) * dim);
        if (outcome.flipped[i] === 1) {
          b.hi[r] = Math.min(b.hi[r]!, sizes[i]!);
          b.best.set(point, r * dim);
        } else {
          b.lo[r] = mid[i]!;
          b.lastFailed.set(point, r * dim);
          b.failed[r] = 1;
        }
      });
      input.onProbe?.();
    } finally {
      outcome.adv.dispose();
    }
  } finally {
    tf.dispose([x, labels, start]);
  }
}

/** Per row, the candidate (projected best flipping point or last failed end point) with the higher margin. */
function warmStart(input: BisectionInput, b: Brackets, rows: readonly number[], x: tf.Tensor4D, labels: tf.Tensor1D, mid: Float32Array, dim: number): tf.Tensor4D {
  const shape = [rows.length, ...input.x.shape.slice(1)] as [number, number, number, number];
  const flipping = new Float32Array(rows.length * dim);
  const failed = new Float32Array(rows.length * dim);
  const useFailed = new Uint8Array(rows.length);
  rows.forEach((r, i) => {
    flipping.set(b.best.subarray(r * dim, (r + 1) * dim), i * dim);
    failed.set((b.failed[r] === 1 ? b.lastFailed : b.best).subarray(r * dim, (r + 1) * dim), i * dim);
    useFailed[i] = b.failed[r]!;
  });
  return tf.tidy(() => {
    const eps = budgetTensor(mid);
    const a = projectRows(x, tf.tensor4d(flipping, shape), eps, input.norm);
    if (useFailed.every((u) => u === 0)) return a;
    const c = projectRows(x, tf.tensor4d(failed, shape), eps, input.norm);
    const marginA = perSampleLoss(input.logits(a), labels, 'margin', null);
    const marginC = perSampleLoss(input.logits(c), labels, 'margin', null);
    const pickC = tf.logicalAnd(tf.greater(marginC, marginA), tf.tensor1d(useFailed, 'bool'));
    return tf.where(tf.reshape(pickC, [rows.length, 1, 1, 1]), c, a) as tf.Tensor4D;
  });
}

async function predictions(input: BisectionInput, pixels: Float32Array): Promise<Int32Array> {
  const pred = tf.tidy(() => tf.argMax(input.logits(tf.tensor4d(pixels, input.x.shape)), 1));
  try {
    return new Int32Array(await pred.data());
  } finally {
    pred.dispose();
  }
}

function context(input: BisectionInput, rng: Rng): AttackContext {
  return { rng, ...(input.signal !== undefined ? { signal: input.signal } : {}) };
}
