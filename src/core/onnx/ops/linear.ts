/**
 * Gemm, MatMul and inference-mode BatchNormalization. Semantics: ONNX operator docs (Gemm:
 * Y = alpha·A'·B' + beta·C; BatchNormalization: Y = (X − mean)/√(var + ε)·scale + B).
 */
import * as tf from '@tensorflow/tfjs';
import { kernelResult, type OpCompiler } from '../context.ts';
import { broadcastOrFail, knownDim } from '../shapes.ts';
import { dimEquals, formatShape, type Dim } from '../symbolic.ts';
import { Operand } from '../values.ts';

const gemm: OpCompiler = (ctx) => {
  const a = ctx.meta(0);
  const b = ctx.meta(1);
  if (a.shape.length !== 2 || b.shape.length !== 2) ctx.fail(`Gemm needs rank-2 A and B, got ${formatShape(a.shape)} and ${formatShape(b.shape)}`);
  const transA = ctx.attrs.int('transA', 0) === 1;
  const transB = ctx.attrs.int('transB', 0) === 1;
  const alpha = ctx.attrs.float('alpha', 1);
  const beta = ctx.attrs.float('beta', 1);
  const [m, k] = transA ? [a.shape[1]!, a.shape[0]!] : [a.shape[0]!, a.shape[1]!];
  const [k2, n] = transB ? [b.shape[1]!, b.shape[0]!] : [b.shape[0]!, b.shape[1]!];
  if (!dimEquals(k, k2)) ctx.fail(`inner sizes differ: A' is ${formatShape([m, k])}, B' is ${formatShape([k2, n])}`);
  const hasC = ctx.has(2) && beta !== 0;
  if (hasC) broadcastOrFail([m, n], ctx.meta(2).shape, ctx.fail);
  const reads = hasC ? [0, 1, 2] : [0, 1];
  return kernelResult([{ shape: [m, n], dtype: 'float32' }], reads, ({ input }) => {
    let y = tf.matMul(input(0).canonical() as tf.Tensor2D, input(1).canonical() as tf.Tensor2D, transA, transB);
    if (alpha !== 1) y = tf.mul(y, alpha);
    if (hasC) y = tf.add(y, beta === 1 ? input(2).canonical() : tf.mul(input(2).canonical(), beta));
    return [Operand.of(y)];
  });
};

/** numpy.matmul shape rule: 1-D operands gain (and then lose) a unit axis; batch axes broadcast. */
function matMulShape(a: readonly Dim[], b: readonly Dim[], fail: (m: string) => never): Dim[] {
  const a2 = a.length === 1 ? [1, a[0]!] : [...a];
  const b2 = b.length === 1 ? [b[0]!, 1] : [...b];
  if (a2.length < 2 || b2.length < 2) fail('MatMul operands must have rank ≥ 1');
  if (!dimEquals(a2[a2.length - 1]!, b2[b2.length - 2]!)) fail(`inner sizes differ: ${formatShape(a)} × ${formatShape(b)}`);
  const batch = broadcastOrFail(a2.slice(0, -2), b2.slice(0, -2), fail);
  const out = [...batch, a2[a2.length - 2]!, b2[b2.length - 1]!];
  if (a.length === 1) out.splice(out.length - 2, 1);
  if (b.length === 1) out.splice(out.length - 1, 1);
  return out;
}

const matMul: OpCompiler = (ctx) => {
  const a = ctx.meta(0);
  const b = ctx.meta(1);
  const shape = matMulShape(a.shape, b.shape, ctx.fail);
  const [ra, rb] = [a.shape.length, b.shape.length];
  return kernelResult([{ shape, dtype: 'float32' }], [0, 1], ({ input }) => {
    let x = input(0).canonical();
    let w = input(1).canonical();
    if (ra === 1) x = x.reshape([1, -1]);
    if (rb === 1) w = w.reshape([-1, 1]);
    let y = tf.matMul(x, w);
    if (ra === 1) y = tf.squeeze(y, [y.rank - 2]);
    if (rb === 1) y = tf.squeeze(y, [y.rank - 1]);
    return [Operand.of(y)];
  });
};

/** Inference batch norm folded at load time into one scale and one shift per channel. */
const batchNormalization: OpCompiler = (ctx) => {
  if (ctx.attrs.int('training_mode', 0) === 1) ctx.fail('BatchNormalization in training mode is not supported (export the model in eval mode)');
  if (ctx.attrs.int('spatial', 1) === 0) ctx.fail('BatchNormalization with spatial = 0 is not supported');
  const x = ctx.meta(0);
  if (x.shape.length < 2) ctx.fail('BatchNormalization needs an input of rank ≥ 2');
  const channels = knownDim(x.shape[1], 'the channel count', ctx.fail);
  const [scale, bias, mean, variance] = [1, 2, 3, 4].map((i) => ctx.requireHost(i, ['scale', 'B', 'mean', 'var'][i - 1]!));
  const epsilon = ctx.attrs.float('epsilon', 1e-5);
  const a = new Float32Array(channels);
  const b = new Float32Array(channels);
  for (let c = 0; c < channels; c++) {
    const value = (v: typeof scale, what: string): number => {
      const d = v!.data[v!.data.length === 1 ? 0 : c];
      if (typeof d !== 'number') ctx.fail(`${what} must have one number per channel`);
      return d as number;
    };
    a[c] = value(scale, 'scale') / Math.sqrt(value(variance, 'var') + epsilon);
    b[c] = value(bias, 'B') - value(mean, 'mean') * a[c]!;
  }
  const rank = x.shape.length;
  const trailing = Array<number>(rank - 2).fill(1);
  const aT = ctx.keep(tf.tensor1d(a));
  const bT = ctx.keep(tf.tensor1d(b));
  return kernelResult([x], [0], ({ input }) => {
    const v = input(0);
    if (v.prefersChannelsLast) return [Operand.channelsLast(tf.add(tf.mul(v.channelsLast(), aT), bT))];
    const shape = [channels, ...trailing];
    return [Operand.of(tf.add(tf.mul(v.canonical(), aT.reshape(shape)), bT.reshape(shape)))];
  });
};

export const LINEAR_OPS: Record<string, OpCompiler> = { Gemm: gemm, MatMul: matMul, BatchNormalization: batchNormalization };
