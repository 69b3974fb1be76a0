/**
 * The contract between the graph compiler (compile.ts) and the operator translators (ops/*).
 * An operator's translator runs once per node when the model loads: it reads attributes and
 * load-time inputs, checks shapes, and returns either values computed on the spot (shape
 * arithmetic, constants) or a kernel that runs tfjs ops on every forward call.
 */
import type * as tf from '@tensorflow/tfjs';
import type { Attributes } from './attributes.ts';
import type { HostValue, Kernel, ValueMeta } from './values.ts';

export interface OpContext {
  readonly opType: string;
  /** The model's default-domain opset. */
  readonly opset: number;
  readonly attrs: Attributes;
  /** Number of inputs listed, empty (omitted optional) ones included. */
  readonly inputCount: number;
  /** Whether input i is given (listed and not the empty name). */
  has(i: number): boolean;
  /** Compile-time shape and type of input i (fails when the input is omitted). */
  meta(i: number): ValueMeta;
  /** Input i's data when it is known at load time. */
  host(i: number): HostValue | undefined;
  /** Input i's data, or a "cannot be resolved" error when it is only known at run time. */
  requireHost(i: number, what: string): HostValue;
  /** Input i as plain integers (no batch-dependent element), e.g. axes or pads. */
  requireInts(i: number, what: string): number[];
  /** Throw an error naming this node, its op type and the opset. */
  fail(message: string): never;
  /** Register a tensor made at load time; it lives until the model is disposed. */
  keep<T extends tf.Tensor>(tensor: T): T;
}

/** What a translator produces for one node. */
export type OpResult =
  | { readonly kind: 'host'; readonly values: readonly HostValue[] }
  | {
      readonly kind: 'kernel';
      readonly outputs: readonly ValueMeta[];
      /** Indices of the inputs the kernel reads at run time (others were consumed at load). */
      readonly reads: readonly number[];
      readonly kernel: Kernel;
    };

export type OpCompiler = (ctx: OpContext) => OpResult;

/** A kernel result. */
export function kernelResult(outputs: readonly ValueMeta[], reads: readonly number[], kernel: Kernel): OpResult {
  return { kind: 'kernel', outputs, reads, kernel };
}

/** A load-time result. */
export function hostResult(...values: HostValue[]): OpResult {
  return { kind: 'host', values };
}

/** Indices 0..n−1 of the inputs that are given. */
export function presentInputs(ctx: OpContext): number[] {
  const out: number[] = [];
  for (let i = 0; i < ctx.inputCount; i++) if (ctx.has(i)) out.push(i);
  return out;
}
