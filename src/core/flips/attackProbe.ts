/**
 * Any registered search (one budget per call, see attacks/types.ts) as a bisection probe. Rows are
 * grouped by budget and each group is one call of the search. Registered searches choose their own
 * starting point, so the warm start enters as a candidate: a row already misclassified at its warm
 * start is flipped there without a search; the others are searched as the method always does.
 */
import * as tf from '@tensorflow/tfjs';
import type { AttackContext, AttackMethod, AttackOutcome } from '../attacks/types.ts';
import { misclassified } from '../attacks/losses.ts';
import { throwIfAborted } from '../attacks/control.ts';
import type { FlipProbe, ProbeProblem } from './probe.ts';

/** A probe running `method` with `options` (already validated by its meta.validate()). */
export function attackProbe(method: AttackMethod<unknown>, options: unknown): FlipProbe {
  return (problem, context) => runAttackProbe(method, options, problem, context);
}

async function runAttackProbe(method: AttackMethod<unknown>, options: unknown, problem: ProbeProblem, context: AttackContext): Promise<AttackOutcome> {
  const n = problem.x.shape[0];
  const dim = n === 0 ? 0 : problem.x.size / n;
  const points = new Float32Array(await problem.x.data());
  const flipped = new Uint8Array(n);
  const toSearch = await rowsToSearch(problem, points, flipped, dim);
  const groups = groupByBudget(toSearch, problem.eps);
  let gradientRows = 0;
  for (const [g, [eps, rows]] of [...groups.entries()].entries()) {
    throwIfAborted(context.signal);
    const outcome = await searchGroup(method, options, problem, rows, eps, { ...context, rng: context.rng.fork(g) });
    try {
      const adv = await outcome.adv.data();
      rows.forEach((row, i) => {
        points.set(adv.subarray(i * dim, (i + 1) * dim), row * dim);
        flipped[row] = outcome.flipped[i]!;
      });
      gradientRows += outcome.gradientEvaluations * rows.length;
    } finally {
      outcome.adv.dispose();
    }
    context.onProgress?.(g + 1, groups.size);
  }
  context.onProgress?.(groups.size, groups.size);
  return { adv: tf.tensor4d(points, problem.x.shape), flipped, gradientEvaluations: n === 0 ? 0 : gradientRows / n };
}

/** Rows whose warm start is not already misclassified; the others are recorded as flipped at their start. */
async function rowsToSearch(problem: ProbeProblem, points: Float32Array, flipped: Uint8Array, dim: number): Promise<number[]> {
  const n = flipped.length;
  const all = Array.from({ length: n }, (_, i) => i);
  if (problem.start === null) return all;
  const start = problem.start;
  const mask = tf.tidy(() => misclassified(problem.logits(start), problem.labels));
  const [mis, startPixels] = await Promise.all([mask.data(), start.data()]);
  mask.dispose();
  return all.filter((row) => {
    if (mis[row] === 0) return true;
    flipped[row] = 1;
    points.set(startPixels.subarray(row * dim, (row + 1) * dim), row * dim);
    return false;
  });
}

/** Rows grouped by their budget, in ascending budget order. */
function groupByBudget(rows: readonly number[], eps: Float32Array): Map<number, number[]> {
  const groups = new Map<number, number[]>();
  for (const row of [...rows].sort((a, b) => eps[a]! - eps[b]! || a - b)) {
    const key = eps[row]!;
    groups.set(key, [...(groups.get(key) ?? []), row]);
  }
  return groups;
}

async function searchGroup(
  method: AttackMethod<unknown>,
  options: unknown,
  problem: ProbeProblem,
  rows: readonly number[],
  eps: number,
  context: AttackContext,
): Promise<AttackOutcome> {
  const { x, labels } = tf.tidy(() => {
    const index = tf.tensor1d(rows as number[], 'int32');
    return { x: tf.gather(problem.x, index), labels: tf.gather(problem.labels, index) };
  });
  try {
    const inner: AttackContext = { rng: context.rng, ...(context.signal !== undefined ? { signal: context.signal } : {}) };
    return await method.run({ logits: problem.logits, x, labels, eps, norm: problem.norm }, options, inner);
  } finally {
    x.dispose();
    labels.dispose();
  }
}
