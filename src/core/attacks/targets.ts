/**
 * Turns a TargetMode into per-sample target classes. A targeted search has nothing to do for a
 * sample whose true class already is its target, so such samples are marked not attackable and
 * come back unchanged (they count as not flipped unless the caller passed them misclassified).
 */
import * as tf from '@tensorflow/tfjs';
import { leastLikelyTargets } from './losses.ts';
import type { AttackProblem, TargetMode } from './types.ts';

export interface ResolvedTargets {
  /** Target class per sample, int32 [N]; null for untargeted searches. The caller disposes it. */
  readonly targets: tf.Tensor1D | null;
  /** 1 where the search may move the sample. */
  readonly attackable: Uint8Array;
}

/** Resolve the target mode for this batch (one extra forward pass for least-likely targets). */
export async function resolveTargets(attack: string, problem: AttackProblem, mode: TargetMode): Promise<ResolvedTargets> {
  const n = problem.x.shape[0];
  if (mode.kind === 'untargeted') return { targets: null, attackable: new Uint8Array(n).fill(1) };
  const targets =
    mode.kind === 'least-likely'
      ? tf.tidy(() => leastLikelyTargets(problem.logits(problem.x)))
      : fixedTarget(attack, problem, mode.classIndex);
  try {
    const [t, y] = await Promise.all([targets.data(), problem.labels.data()]);
    const attackable = new Uint8Array(n);
    for (let i = 0; i < n; i++) attackable[i] = t[i] === y[i] ? 0 : 1;
    return { targets, attackable };
  } catch (err) {
    targets.dispose();
    throw err;
  }
}

function fixedTarget(attack: string, problem: AttackProblem, classIndex: number): tf.Tensor1D {
  const classes = tf.tidy(() => problem.logits(tf.slice(problem.x, [0, 0, 0, 0], [1, -1, -1, -1])).shape[1]);
  if (classIndex >= classes) {
    throw new Error(`${attack}: target class ${classIndex} is out of range for a model with ${classes} classes`);
  }
  return tf.fill([problem.x.shape[0]], classIndex, 'int32');
}
