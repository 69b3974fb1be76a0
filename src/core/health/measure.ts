/**
 * Forward/backward measurements at the clean inputs for two health checks: whether each sample's
 * input gradient is finite and non-zero, and whether the model's probability outputs saturate to
 * exact float32 zeros and ones.
 */
import * as tf from '@tensorflow/tfjs';
import { lossAndInputGradient } from '../attacks/losses.ts';
import { gatherBatch } from '../sweep/evaluate.ts';
import type { LogitsFn, SampleSet } from '../types.ts';

/** Samples of `samples` in batches of `batchSize`, as index lists. */
function batches(count: number, batchSize: number): number[][] {
  const out: number[][] = [];
  for (let start = 0; start < count; start += batchSize) {
    out.push(Array.from({ length: Math.min(batchSize, count - start) }, (_, i) => start + i));
  }
  return out;
}

/**
 * Counts samples whose cross-entropy input gradient (taken from the logits, as the searches take it)
 * has a non-finite entry, and samples whose gradient is exactly zero everywhere.
 */
export async function measureGradients(logits: LogitsFn, samples: SampleSet, batchSize: number): Promise<{ samples: number; nonFinite: number; zero: number }> {
  let nonFinite = 0;
  let zero = 0;
  for (const indices of batches(samples.labels.length, batchSize)) {
    const { x, labels } = gatherBatch(samples, indices);
    try {
      const [finite, largest] = tf.tidy(() => {
        const { grad } = lossAndInputGradient(logits, x, labels, 'ce', null);
        const flat = tf.reshape(grad, [indices.length, -1]);
        const isFinite = tf.all(tf.isFinite(flat), 1);
        // Non-finite entries are replaced before the max so that a NaN cannot hide a zero gradient's verdict.
        const magnitude = tf.max(tf.abs(tf.where(tf.isFinite(flat), flat, tf.zerosLike(flat))), 1);
        return [isFinite, magnitude];
      });
      const [f, m] = await Promise.all([finite.data(), largest.data()]);
      tf.dispose([finite, largest]);
      for (let i = 0; i < indices.length; i++) {
        if (f[i] === 0) nonFinite++;
        else if (m[i] === 0) zero++;
      }
    } finally {
      tf.dispose([x, labels]);
    }
  }
  return { samples: samples.labels.length, nonFinite, zero };
}

/**
 * Rows of `probabilities` (a model's own probability output, or the softmax of its logits) at the clean
 * inputs that round to exact float32 values: `topOne` rows whose top probability is exactly 1, and
 * `saturatedRows` among them where some class's probability is exactly 0 as well. The log of a
 * saturated row is flat at 0 for the top class and a constant floor for the zero classes, so no loss
 * computed from it has a gradient there.
 */
export async function measureSaturation(probabilities: LogitsFn, samples: SampleSet, batchSize: number): Promise<{ rows: number; topOne: number; saturatedRows: number }> {
  let topOne = 0;
  let saturatedRows = 0;
  for (const indices of batches(samples.labels.length, batchSize)) {
    const { x, labels } = gatherBatch(samples, indices);
    try {
      const [one, zero] = tf.tidy(() => {
        const p = probabilities(x);
        return [tf.equal(tf.max(p, 1), 1), tf.equal(tf.min(p, 1), 0)];
      });
      const [o, z] = await Promise.all([one.data(), zero.data()]);
      tf.dispose([one, zero]);
      for (let i = 0; i < o.length; i++) {
        if (o[i] === 0) continue;
        topOne++;
        if (z[i] !== 0) saturatedRows++;
      }
    } finally {
      tf.dispose([x, labels]);
    }
  }
  return { rows: samples.labels.length, topOne, saturatedRows };
}
