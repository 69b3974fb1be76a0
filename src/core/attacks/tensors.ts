/** Small tensor helpers shared by the searches. */
import * as tf from '@tensorflow/tfjs';

/**
 * tf.tidy for a function returning a plain object of tensors (fields may be null or absent).
 * tf.tidy keeps every tensor reachable from its result; its TypeScript type only lacks room for
 * interfaces without an index signature and for null fields, which it handles at run time.
 */
export function tidyObject<T extends object>(fn: () => T): T {
  return tf.tidy(fn as unknown as () => tf.TensorContainer) as unknown as T;
}
