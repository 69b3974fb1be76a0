/**
 * Helpers of the preview: which samples to show and what the model receives for them.
 */
import * as tf from '@tensorflow/tfjs';
import { makeLogitsFn, validatePreprocessing } from '../core/models/pipeline.ts';
import type { LoadedModel, Preprocessing } from '../core/types.ts';

/** Smallest and largest value (±Infinity for an empty array). */
export function extent(values: Float32Array): { min: number; max: number } {
  let min = Infinity;
  let max = -Infinity;
  for (const v of values) {
    if (v < min) min = v;
    if (v > max) max = v;
  }
  return { min, max };
}

/** Up to `count` indices spread over the classes (round-robin by class, in set order). */
export function spreadIndices(labels: Int32Array, count: number): number[] {
  const byClass = new Map<number, number[]>();
  labels.forEach((label, i) => {
    const list = byClass.get(label) ?? [];
    list.push(i);
    byClass.set(label, list);
  });
  const queues = [...byClass.entries()].sort((a, b) => a[0] - b[0]).map(([, list]) => list);
  const out: number[] = [];
  for (let round = 0; out.length < Math.min(count, labels.length); round++) {
    for (const queue of queues) {
      const index = queue[round];
      if (index !== undefined && out.length < count) out.push(index);
    }
  }
  return out;
}

/**
 * The model's input for one image, taken where the core's pipeline hands it to the model: the
 * model is wrapped so its forward() keeps a copy of what it receives. No preprocessing is redone here.
 */
export async function captureModelInput(model: LoadedModel, pre: Preprocessing, pixels: Float32Array, shape: [number, number, number, number]): Promise<Float32Array> {
  const problem = validatePreprocessing(pre, model.description);
  if (problem !== null) throw new Error(problem);
  let captured: tf.Tensor | null = null;
  const spy: LoadedModel = {
    description: model.description,
    forward: (input) => {
      captured = tf.keep(input.clone());
      return model.forward(input);
    },
    dispose: () => undefined,
  };
  const logits = makeLogitsFn(spy, pre);
  tf.tidy(() => {
    logits(tf.tensor4d(pixels, shape));
  });
  const kept = captured as tf.Tensor | null;
  if (kept === null) throw new Error('The model was not called.');
  try {
    return new Float32Array(await kept.data());
  } finally {
    kept.dispose();
  }
}
