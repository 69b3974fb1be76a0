/**
 * Softmax, LogSoftmax and the reductions ReduceMean, ReduceSum, ReduceMax. Axis semantics per
 * opset (ONNX operator docs): before opset 13 (Log)Softmax flattens the input to 2-D at `axis`
 * (default 1) and normalises each row; from 13 on it normalises along the single `axis` (default −1).
 */
import * as tf from '@tensorflow/tfjs';
import { kernelResult, type OpCompiler, type OpContext } from '../context.ts';
import { normalizeAxis } from '../shapes.ts';
import { dimProduct, resolveShape, type Dim } from '../symbolic.ts';
import { channelsLastAxis, Operand } from '../values.ts';

type LastAxisOp = (t: tf.Tensor) => tf.Tensor;

function softmaxLike(op: LastAxisOp): OpCompiler {
  return (ctx) => {
    const x = ctx.meta(0);
    const rank = x.shape.length;
    if (ctx.opset < 13) {
      const axis = normalizeAxis(ctx.attrs.int('axis', 1), rank, ctx.fail);
      const rows: Dim[] = [dimProduct(x.shape.slice(0, axis)), dimProduct(x.shape.slice(axis))];
      return kernelResult([x], [0], ({ input, batch }) => {
        const t = input(0).canonical();
        return [Operand.of(op(t.reshape(resolveShape(rows, batch))).reshape(t.shape))];
      });
    }
    const axis = normalizeAxis(ctx.attrs.int('axis', -1), rank, ctx.fail);
    const perm = Array.from({ length: rank }, (_, i) => i);
    perm[axis] = rank - 1;
    perm[rank - 1] = axis;
    return kernelResult([x], [0], ({ input }) => {
      const t = input(0).canonical();
      if (axis === rank - 1) return [Operand.of(op(t))];
      return [Operand.of(tf.transpose(op(tf.transpose(t, perm)), perm))];
    });
  };
}

/**
 * Reduction axes: an attribute until the opset where they became input 1 (ReduceSum: 13, the
 * others: 18), where noop_with_empty_axes appeared too.
 */
function reductionAxes(ctx: OpContext, rank: number, axesInputSince: number): number[] {
  const asInput = ctx.opset >= axesInputSince;
  const given = !asInput ? ctx.attrs.optionalInts('axes') : ctx.has(1) ? ctx.requireInts(1, 'axes') : undefined;
  if (given === undefined || given.length === 0) {
    return asInput && ctx.attrs.int('noop_with_empty_axes', 0) === 1 ? [] : Array.from({ length: rank }, (_, i) => i);
  }
  return [...new Set(given.map((a) => normalizeAxis(a, rank, ctx.fail)))].sort((a, b) => a - b);
}

function reduction(op: (t: tf.Tensor, axes: number[], keepDims: boolean) => tf.Tensor, axesInputSince = 18): OpCompiler {
  return (ctx) => {
    const x = ctx.meta(0);
    const rank = x.shape.length;
    const axes = reductionAxes(ctx, rank, axesInputSince);
    const keep = ctx.attrs.int('keepdims', 1) === 1;
    const shape = keep ? x.shape.map((d, i) => (axes.includes(i) ? 1 : d)) : x.shape.filter((_, i) => !axes.includes(i));
    // Channels-last input: reduce there when the result's axis order is the same either way.
    const layoutFree = rank === 4 && (keep || (axes.includes(2) && axes.includes(3)));
    const nhwcAxes = axes.map(channelsLastAxis);
    return kernelResult([{ shape, dtype: x.dtype }], [0], ({ input }) => {
      const v = input(0);
      if (axes.length === 0) return [v];
      if (layoutFree && v.prefersChannelsLast) {
        const y = op(v.channelsLast(), nhwcAxes, keep);
        return [keep ? Operand.channelsLast(y as tf.Tensor4D) : Operand.of(y)];
      }
      return [Operand.of(op(v.canonical(), axes, keep))];
    });
  };
}

export const REDUCE_OPS: Record<string, OpCompiler> = {
  Softmax: softmaxLike((t) => tf.softmax(t)),
  LogSoftmax: softmaxLike((t) => tf.logSoftmax(t)),
  ReduceMean: reduction((t, axes, keep) => tf.mean(t, axes, keep)),
  ReduceSum: reduction((t, axes, keep) => tf.sum(t, axes, keep), 13),
  ReduceMax: reduction((t, axes, keep) => tf.max(t, axes, keep)),
};
