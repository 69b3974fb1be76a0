/**
 * Pooling: MaxPool, AveragePool (count_include_pad both ways), GlobalAveragePool, GlobalMaxPool.
 * Inputs and outputs are channels-last, like the convolutions around them. Semantics: ONNX
 * operator docs; ceil_mode follows PyTorch (a last window that would start in the end padding is
 * dropped), which is what PyTorch-exported graphs mean by it.
 */
import * as tf from '@tensorflow/tfjs';
import { kernelResult, type OpCompiler, type OpContext } from '../context.ts';
import { knownDim, resolvePads, windowOutputSize, type SpatialWindow } from '../shapes.ts';
import { Operand } from '../values.ts';
import { planPadding } from './conv.ts';

type Pair = [number, number];

interface PoolGeometry {
  readonly window: SpatialWindow;
  readonly input: Pair;
  readonly output: Pair;
}

/** Window, output size and (for ceil_mode) the extra end padding that makes the last window fit. */
function poolGeometry(ctx: OpContext): PoolGeometry {
  const x = ctx.meta(0);
  if (x.shape.length !== 4) ctx.fail(`only 2-D pooling (rank-4 input) is supported, got rank ${x.shape.length}`);
  const input: Pair = [knownDim(x.shape[2], 'the input height', ctx.fail), knownDim(x.shape[3], 'the input width', ctx.fail)];
  const kernel = ctx.attrs.ints('kernel_shape', []);
  const strides = ctx.attrs.ints('strides', [1, 1]);
  const dilations = ctx.attrs.ints('dilations', [1, 1]);
  if (kernel.length !== 2) ctx.fail('kernel_shape must give two sizes (2-D pooling)');
  if (dilations.some((d) => d !== 1)) ctx.fail('dilated pooling is not supported');
  const window = resolvePads(ctx.attrs.string('auto_pad', 'NOTSET'), ctx.attrs.ints('pads', [0, 0, 0, 0]), input, kernel, strides, dilations, ctx.fail);
  const ceil = ctx.attrs.int('ceil_mode', 0) === 1;
  const output = [0, 1].map((axis) => {
    let out = windowOutputSize(input[axis]!, window, axis, ceil);
    if (ceil && (out - 1) * window.strides[axis]! >= input[axis]! + window.padsBegin[axis]!) out -= 1;
    const needed = (out - 1) * window.strides[axis]! + window.kernel[axis]! - (input[axis]! + window.padsBegin[axis]! + window.padsEnd[axis]!);
    if (needed > 0) window.padsEnd[axis] = window.padsEnd[axis]! + needed;
    return out;
  }) as Pair;
  if (output[0] < 1 || output[1] < 1) ctx.fail(`the output would be empty (${output[0]}×${output[1]})`);
  return { window, input, output };
}

function explicitPads(w: SpatialWindow): [[number, number], [number, number], [number, number], [number, number]] {
  return [[0, 0], [w.padsBegin[0]!, w.padsEnd[0]!], [w.padsBegin[1]!, w.padsEnd[1]!], [0, 0]];
}

const maxPool: OpCompiler = (ctx) => {
  const { window, output } = poolGeometry(ctx);
  const x = ctx.meta(0);
  const padding = planPadding(window);
  const size = window.kernel as Pair;
  const strides = window.strides as Pair;
  return kernelResult([{ shape: [x.shape[0]!, x.shape[1]!, ...output], dtype: 'float32' }], [0], ({ input }) => {
    let t = input(0).channelsLast();
    // tfjs max pooling skips padded cells (as if −∞); explicit padding must not win either.
    if (padding.explicit !== undefined) t = tf.pad(t, padding.explicit, -3.4e38);
    return [Operand.channelsLast(tf.maxPool(t, size, strides, padding.pad))];
  });
};

/** Per output cell, how many of its window's cells are real pixels (not padding). */
function validCounts(g: PoolGeometry): Float32Array {
  const [oh, ow] = g.output;
  const counts = new Float32Array(oh * ow);
  const span = (o: number, axis: number): number => {
    const start = o * g.window.strides[axis]! - g.window.padsBegin[axis]!;
    const end = start + g.window.kernel[axis]!;
    return Math.min(end, g.input[axis]!) - Math.max(start, 0);
  };
  for (let i = 0; i < oh; i++) for (let j = 0; j < ow; j++) counts[i * ow + j] = span(i, 0) * span(j, 1);
  return counts;
}

const averagePool: OpCompiler = (ctx) => {
  const g = poolGeometry(ctx);
  const x = ctx.meta(0);
  const includePad = ctx.attrs.int('count_include_pad', 0) === 1;
  if (includePad && ctx.attrs.int('ceil_mode', 0) === 1) ctx.fail('ceil_mode with count_include_pad is not supported');
  const padded = [...g.window.padsBegin, ...g.window.padsEnd].some((p) => p > 0);
  const size = g.window.kernel as Pair;
  const strides = g.window.strides as Pair;
  const pads = explicitPads(g.window);
  // Zero padding + 'valid' pooling divides by the full window (count_include_pad = 1); for 0 the
  // result is rescaled by window size / real pixels per cell, a constant computed here.
  const rescale = padded && !includePad
    ? ctx.keep(tf.tensor(validCounts(g).map((c) => (size[0] * size[1]) / c), [1, g.output[0], g.output[1], 1]))
    : undefined;
  return kernelResult([{ shape: [x.shape[0]!, x.shape[1]!, ...g.output], dtype: 'float32' }], [0], ({ input }) => {
    const t = input(0).channelsLast();
    let y = tf.avgPool(padded ? tf.pad(t, pads) : t, size, strides, 'valid');
    if (rescale !== undefined) y = tf.mul(y, rescale);
    return [Operand.channelsLast(y)];
  });
};

function globalPool(reduce: (t: tf.Tensor, axes: number[]) => tf.Tensor): OpCompiler {
  return (ctx) => {
    const x = ctx.meta(0);
    if (x.shape.length < 3) ctx.fail(`global pooling needs a rank ≥ 3 input, got rank ${x.shape.length}`);
    const shape = x.shape.map((d, i) => (i < 2 ? d : 1));
    return kernelResult([{ shape, dtype: 'float32' }], [0], ({ input }) => {
      const v = input(0);
      if (v.rank === 4) return [Operand.channelsLast(reduce(v.channelsLast(), [1, 2]) as tf.Tensor4D)];
      const t = v.canonical();
      return [Operand.of(reduce(t, Array.from({ length: t.rank - 2 }, (_, k) => k + 2)))];
    });
  };
}

export const POOL_OPS: Record<string, OpCompiler> = {
  MaxPool: maxPool,
  AveragePool: averagePool,
  GlobalAveragePool: globalPool((t, axes) => tf.mean(t, axes, true)),
  GlobalMaxPool: globalPool((t, axes) => tf.max(t, axes, true)),
};
