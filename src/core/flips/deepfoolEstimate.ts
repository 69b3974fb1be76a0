/**
 * DeepFool's flip-budget estimate: one run of deepfoolMinimalPerturbation (attacks/deepfool.ts) per
 * batch, no bisection. A sample's flip budget is the size of the misclassified point DeepFool ends on
 * (its overshoot included), or null when DeepFool gives up or that point lies beyond maxEps.
 */
import * as tf from '@tensorflow/tfjs';
import { deepfoolMinimalPerturbation, type DeepFoolOptions } from '../attacks/deepfool.ts';
import type { BisectionRows } from './bisect.ts';
import { perturbationSizes } from './geometry.ts';
import type { EstimateInput } from './searches.ts';

/** Flip budgets of the batch by DeepFool (options validated by deepfoolMeta.validate()). */
export async function deepfoolEstimate(input: EstimateInput, options: Readonly<Record<string, unknown>>): Promise<BisectionRows> {
  const { x, labels, logits, norm } = input;
  const found = await deepfoolMinimalPerturbation({ logits, x, labels, norm }, options as unknown as DeepFoolOptions, input.signal !== undefined ? { signal: input.signal } : {});
  try {
    const sizes = await perturbationSizes(x, found.adv, norm);
    const predicted = tf.tidy(() => tf.argMax(logits(found.adv), 1));
    const pred = new Int32Array(await predicted.data());
    predicted.dispose();
    const y = await labels.data();
    const n = x.shape[0];
    const flipEps: (number | null)[] = [];
    const advPred = new Int32Array(n);
    for (let i = 0; i < n; i++) {
      // The model's own verdict at the point decides, as everywhere else in Brink.
      const within = found.flipped[i] === 1 && pred[i] !== y[i] && sizes[i]! <= input.maxEps;
      flipEps.push(within ? sizes[i]! : null);
      advPred[i] = within ? pred[i]! : y[i]!;
    }
    return { flipEps, failedEps: new Float64Array(n), advPred, probes: new Int32Array(n).fill(1) };
  } finally {
    found.adv.dispose();
  }
}
