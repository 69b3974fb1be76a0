/**
 * Test harness for the replacement wasm kernels: run one named kernel on a chosen backend with
 * plain arrays in and out, so that the same inputs go to Brink's wasm kernel and to the tfjs cpu
 * backend's kernel (the reference).
 */
import * as tf from '@tensorflow/tfjs';
import { useBackend } from '../helpers/backend.ts';
import type { Rng } from '../../src/core/random/rng.ts';

/** A tensor as plain data, independent of any backend. */
export interface HostTensor {
  readonly shape: number[];
  readonly values: Float32Array;
}

/** Normal random values of a shape, from the seeded generator. */
export function randomTensor(rng: Rng, shape: number[]): HostTensor {
  return { shape, values: rng.normalArray(shape.reduce((a, b) => a * b, 1)) };
}

const started = new Set<string>();

/**
 * Make `name` the active backend: the first time through useBackend (as the CLI starts it, which
 * also registers Brink's wasm kernels), later by a plain switch, so that a test may swap kernel
 * sets (restoreStockWasmKernels) without initBackend registering Brink's again.
 */
export async function switchBackend(name: 'wasm' | 'cpu'): Promise<void> {
  if (!started.has(name)) {
    await useBackend(name);
    started.add(name);
  } else if (tf.getBackend() !== name) {
    await tf.setBackend(name);
  }
}

/** Run kernel `name` on `backend` (tf.engine().runKernel) and read the result back. */
export async function runKernelOn(
  backend: 'wasm' | 'cpu',
  name: string,
  inputs: Record<string, HostTensor>,
  attrs: Record<string, unknown>,
): Promise<HostTensor> {
  await switchBackend(backend);
  return tf.tidy(() => {
    const tensors: Record<string, tf.Tensor> = {};
    for (const [key, t] of Object.entries(inputs)) tensors[key] = tf.tensor(t.values, t.shape, 'float32');
    const out = tf.engine().runKernel(name, tensors, attrs as tf.NamedAttrMap) as tf.Tensor;
    return { shape: out.shape.slice(), values: out.dataSync() as Float32Array };
  });
}

/** Run the same kernel call on wasm (Brink's kernels) and on cpu (the tfjs reference). */
export async function runOnBoth(
  name: string,
  inputs: Record<string, HostTensor>,
  attrs: Record<string, unknown>,
): Promise<{ wasm: HostTensor; cpu: HostTensor }> {
  const wasm = await runKernelOn('wasm', name, inputs, attrs);
  const cpu = await runKernelOn('cpu', name, inputs, attrs);
  return { wasm, cpu };
}

/** Largest |a − b| over two equally long arrays. */
export function maxAbsDifference(a: ArrayLike<number>, b: ArrayLike<number>): number {
  if (a.length !== b.length) throw new Error(`length ${a.length} ≠ ${b.length}`);
  let worst = 0;
  for (let i = 0; i < a.length; i++) worst = Math.max(worst, Math.abs(a[i]! - b[i]!));
  return worst;
}
