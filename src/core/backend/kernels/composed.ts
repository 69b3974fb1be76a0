/**
 * Plumbing for kernels written with public tfjs ops instead of backend code: wraps the kernel's
 * TensorInfo inputs as tensors, runs the computation in a tidy scope and hands the engine one
 * fresh TensorInfo, so that no tensor or data buffer is left behind.
 *
 * Why this is safe inside a kernel: the engine raises its kernel depth while a kernel runs, so the
 * nested ops are not recorded on the gradient tape; they simply run on the active (wasm) backend.
 */
import * as tf from '@tensorflow/tfjs';

/** Tensor computation of a composed kernel, given its inputs as tensors. */
export type ComposedCompute = (...inputs: tf.Tensor[]) => tf.Tensor;

/**
 * Run `compute` on tensors viewing `inputs` and return the result as a TensorInfo owned by the
 * caller (the engine). Reference counts end where they started, plus one for the returned data.
 */
export function runComposed(backend: tf.KernelBackend, inputs: readonly tf.TensorInfo[], compute: ComposedCompute): tf.TensorInfo {
  const engine = tf.engine();
  const result = tf.tidy(() => {
    const tensors = inputs.map((info) => {
      // makeTensorFromTensorInfo adds no backend reference, yet tidy will dispose the view: add one.
      backend.incRef(info.dataId);
      return engine.makeTensorFromTensorInfo(info, backend);
    });
    return compute(...tensors);
  });
  // The result tensor is disposed here; the extra reference keeps its data alive for the engine.
  backend.incRef(result.dataId);
  const info: tf.TensorInfo = { dataId: result.dataId, shape: result.shape.slice(), dtype: result.dtype };
  result.dispose();
  return info;
}

/** The kernel's `backend` argument as the engine passes it (typed `{}` by tfjs). */
export function asBackend(backend: unknown): tf.KernelBackend {
  return backend as tf.KernelBackend;
}

/** Fetch a named kernel input, failing loudly when the engine did not pass it. */
export function requireInput(inputs: tf.NamedTensorInfoMap, name: string, kernel: string): tf.TensorInfo {
  const info = inputs[name];
  if (info === undefined) throw new Error(`${kernel}: missing input '${name}'`);
  return info;
}

/** A pair attribute (strides, dilations, filter size) given as one number or two. */
export function pairOf(value: unknown, fallback: number): [number, number] {
  if (value === undefined || value === null) return [fallback, fallback];
  if (typeof value === 'number') return [value, value];
  if (Array.isArray(value) && value.length === 2 && typeof value[0] === 'number' && typeof value[1] === 'number') {
    return [value[0], value[1]];
  }
  throw new Error(`expected a number or a pair of numbers, got ${JSON.stringify(value)}`);
}

/** Shape of a rank-4 TensorInfo as a tuple. */
export function shape4(info: { shape: readonly number[] }, what: string): [number, number, number, number] {
  const s = info.shape;
  if (s.length !== 4) throw new Error(`${what} must be rank 4, got shape [${s.join(', ')}]`);
  return [s[0]!, s[1]!, s[2]!, s[3]!];
}
