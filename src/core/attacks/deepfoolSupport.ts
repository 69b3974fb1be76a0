/** Helpers of deepfool.ts: the candidate classes per sample and perturbation norms. */
import * as tf from '@tensorflow/tfjs';
import type { LogitsFn, Norm } from '../types.ts';
import { misclassified } from './losses.ts';

/** Candidate classes and the clean verdict of a batch. */
export interface Candidates {
  /** The topK − 1 other classes of highest clean logit per sample (fewer if the model has fewer), int32 [N, k − 1]. */
  readonly candidates: tf.Tensor2D;
  /** 1 where x itself is misclassified. */
  readonly misclassified: Uint8Array;
}

/** One forward pass at x: the classes DeepFool linearises for each sample, and which samples need no search. */
export async function candidateClasses(logits: LogitsFn, x: tf.Tensor4D, labels: tf.Tensor1D, topK: number): Promise<Candidates> {
  const out = tf.tidy(() => {
    const z = logits(x);
    const classes = z.shape[1];
    if (classes < 2) throw new Error(`deepfool: the model has ${classes} class; DeepFool needs at least 2.`);
    const isLabel = tf.cast(tf.oneHot(tf.cast(labels, 'int32'), classes), 'bool');
    const others = tf.where(isLabel, tf.fill(z.shape, -Infinity), z);
    return { candidates: tf.topk(others, Math.min(topK, classes) - 1).indices as tf.Tensor2D, mis: misclassified(z, labels) };
  });
  const mis = new Uint8Array(await out.mis.data());
  out.mis.dispose();
  return { candidates: out.candidates, misclassified: mis };
}

/** ‖adv − clean‖ per sample (row of `dim` values) in the norm, computed in double precision. */
export function perturbationNorms(adv: Float32Array, clean: Float32Array, dim: number, norm: Norm): Float64Array {
  const rows = dim === 0 ? 0 : adv.length / dim;
  const out = new Float64Array(rows);
  for (let r = 0; r < rows; r++) {
    let acc = 0;
    for (let i = r * dim; i < (r + 1) * dim; i++) {
      const d = Math.abs(adv[i]! - clean[i]!);
      acc = norm === 'linf' ? Math.max(acc, d) : acc + d * d;
    }
    out[r] = norm === 'linf' ? acc : Math.sqrt(acc);
  }
  return out;
}
