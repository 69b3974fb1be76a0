/**
 * What the compiler knows about each value (shape with a symbolic batch, element type, and for
 * values known at load time their data), and the runtime operand that carries a tensor in
 * ONNX's own layout, in channels-last layout, or both.
 */
import * as tf from '@tensorflow/tfjs';
import type { Dim } from './symbolic.ts';

/** Element types the loader handles; int64 values run as int32 in tfjs (which has no int64). */
export type ElemType = 'float32' | 'int64' | 'int32' | 'bool';

/** Compile-time description of a value. Shapes are in ONNX's own (NCHW) semantics. */
export interface ValueMeta {
  readonly shape: readonly Dim[];
  readonly dtype: ElemType;
}

/**
 * A value known when the model loads: initializers, Constant nodes and everything computed from
 * them and from static shapes. Its shape is static; elements may still mention the batch size.
 */
export interface HostValue extends ValueMeta {
  readonly shape: readonly number[];
  readonly data: ArrayLike<Dim>;
}

/** The tfjs dtype a value runs as. */
export function tfDtype(dtype: ElemType): 'float32' | 'int32' | 'bool' {
  return dtype === 'float32' ? 'float32' : dtype === 'bool' ? 'bool' : 'int32';
}

/** True when no element of a host value depends on the batch size. */
export function isFullyKnown(value: HostValue): boolean {
  for (let i = 0; i < value.data.length; i++) if (typeof value.data[i] !== 'number') return false;
  return true;
}

/** Build a tensor from a fully known host value (caller owns it). */
export function hostToTensor(value: HostValue, batch = 1): tf.Tensor {
  const n = value.data.length;
  const dtype = tfDtype(value.dtype);
  const out = dtype === 'float32' ? new Float32Array(n) : new Int32Array(n);
  for (let i = 0; i < n; i++) {
    const d = value.data[i]!;
    out[i] = typeof d === 'number' ? d : d.coef * batch ** d.power;
  }
  return tf.tensor(out, [...value.shape], dtype);
}

const TO_CHANNELS_LAST = [0, 2, 3, 1];
const TO_CHANNELS_FIRST = [0, 3, 1, 2];

/**
 * A runtime value. Rank-4 values may be held channels-last (NHWC), the layout tfjs convolutions
 * and pools need; the ONNX (NCHW) form is made only when an operator needs ONNX axis semantics,
 * so a chain conv → batch norm → relu → conv never transposes in between.
 * Why lazily per value rather than converting the whole graph to NHWC once: every axis-bearing
 * operator (Reshape, Flatten, Concat, Softmax, Gather, Slice…) would need its axes and data order
 * rewritten, which is where such conversions go wrong; here every translator keeps ONNX semantics.
 */
export class Operand {
  private constructor(
    private onnxForm: tf.Tensor | undefined,
    private nhwcForm: tf.Tensor4D | undefined,
  ) {}

  /** Wrap a tensor that is in ONNX layout. */
  static of(tensor: tf.Tensor): Operand {
    return new Operand(tensor, undefined);
  }

  /** Wrap a rank-4 tensor that is channels-last (its ONNX form is its NCHW transpose). */
  static channelsLast(tensor: tf.Tensor4D): Operand {
    return new Operand(undefined, tensor);
  }

  get rank(): number {
    return this.onnxForm !== undefined ? this.onnxForm.rank : 4;
  }

  /** True when only the channels-last form exists (so staying channels-last avoids a transpose). */
  get prefersChannelsLast(): boolean {
    return this.onnxForm === undefined;
  }

  /** The tensor in ONNX layout. */
  canonical(): tf.Tensor {
    this.onnxForm ??= tf.transpose(this.nhwcForm!, TO_CHANNELS_FIRST);
    return this.onnxForm;
  }

  /** The channels-last form of a rank-4 value. */
  channelsLast(): tf.Tensor4D {
    if (this.nhwcForm === undefined) {
      const t = this.onnxForm!;
      if (t.rank !== 4) throw new Error(`channels-last form asked of a rank-${t.rank} value`);
      this.nhwcForm = tf.transpose(t as tf.Tensor4D, TO_CHANNELS_LAST);
    }
    return this.nhwcForm;
  }

  /** Apply a shape-preserving elementwise function to whichever form is at hand. */
  map(f: (t: tf.Tensor) => tf.Tensor): Operand {
    if (this.onnxForm === undefined) return Operand.channelsLast(f(this.nhwcForm!) as tf.Tensor4D);
    return Operand.of(f(this.onnxForm));
  }
}

/**
 * A value of rank ≤ 4 as a channels-last rank-4 tensor for broadcasting against channels-last
 * operands: ONNX right-aligns shapes, so pad to rank 4 with leading 1s, then move axis 1 last.
 */
export function asChannelsLast(value: Operand): tf.Tensor {
  if (value.rank === 4) return value.channelsLast();
  const t = value.canonical();
  if (t.size === 1) return t.reshape([]);
  const shape = [...Array<number>(4 - t.rank).fill(1), ...t.shape];
  return tf.transpose(t.reshape(shape), TO_CHANNELS_LAST);
}

/** Where a channels-last tensor keeps ONNX axis `axis` of a rank-4 NCHW value. */
export function channelsLastAxis(axis: number): number {
  return [0, 3, 1, 2][axis]!;
}

/** Runtime inputs of a kernel. */
export interface KernelArgs {
  /** The i-th node input (only those listed in the kernel's `reads`). */
  input(i: number): Operand;
  /** Batch size of this forward call. */
  readonly batch: number;
}

/** One node's runtime computation. Runs inside the caller's tf.tidy. */
export type Kernel = (args: KernelArgs) => Operand[];
