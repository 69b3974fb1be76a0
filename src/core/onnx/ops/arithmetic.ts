/**
 * Broadcasting arithmetic: Add, Sub, Mul, Div, Pow, Max, Min, Sum, PRelu. Values known at load time
 * (shape arithmetic, possibly mentioning the batch size N) are computed in plain JS numbers; the
 * rest runs as tfjs ops, channels-last when an operand already is.
 */
import * as tf from '@tensorflow/tfjs';
import { hostResult, kernelResult, presentInputs, type OpCompiler, type OpContext, type OpResult } from '../context.ts';
import { broadcastOrFail } from '../shapes.ts';
import { dimAdd, dimDiv, dimMul, dimSub, formatDim, isKnown, type Dim } from '../symbolic.ts';
import { asChannelsLast, Operand, type ElemType, type HostValue, type Kernel } from '../values.ts';

type TensorOp = (a: tf.Tensor, b: tf.Tensor) => tf.Tensor;
type HostOp = (a: Dim, b: Dim, integer: boolean) => Dim | undefined;

/** Host evaluation is for shape-sized data; large constant float math is folded through tfjs instead. */
const HOST_MATH_LIMIT = 4096;

function numeric(f: (a: number, b: number) => number): HostOp {
  return (a, b) => (isKnown(a) && isKnown(b) ? f(a, b) : undefined);
}

const HOST_OPS: Record<string, HostOp> = {
  Add: (a, b) => dimAdd(a, b),
  Sub: (a, b) => dimSub(a, b),
  Mul: (a, b) => dimMul(a, b),
  Div: (a, b, integer) => {
    if (isKnown(a) && isKnown(b)) return integer ? Math.trunc(a / b) : a / b;
    return dimDiv(a, b);
  },
  Pow: numeric((a, b) => a ** b),
  Max: numeric(Math.max),
  Min: numeric(Math.min),
  Sum: (a, b) => dimAdd(a, b),
};

/** Index of element `flat` of `outShape` in an operand of shape `shape` broadcast to it. */
function broadcastIndex(flat: number, outShape: readonly number[], shape: readonly number[]): number {
  let index = 0;
  let stride = 1;
  let rest = flat;
  const offset = outShape.length - shape.length;
  for (let axis = outShape.length - 1; axis >= 0; axis--) {
    const size = outShape[axis]!;
    const coord = rest % size;
    rest = Math.floor(rest / size);
    const own = shape[axis - offset];
    if (own !== undefined) {
      if (own !== 1) index += coord * stride;
      stride *= own;
    }
  }
  return index;
}

function hostBinary(ctx: OpContext, a: HostValue, b: HostValue, op: HostOp): HostValue {
  const shape = broadcastOrFail(a.shape, b.shape, ctx.fail) as number[];
  const count = shape.reduce((x, y) => x * y, 1);
  const integer = a.dtype !== 'float32';
  const data: Dim[] = new Array<Dim>(count);
  for (let i = 0; i < count; i++) {
    const x = a.data[broadcastIndex(i, shape, a.shape)]!;
    const y = b.data[broadcastIndex(i, shape, b.shape)]!;
    const r = op(x, y, integer);
    if (r === undefined) ctx.fail(`the shape cannot be resolved when loading: ${ctx.opType}(${formatDim(x)}, ${formatDim(y)}) is not a product of the batch size`);
    data[i] = r!;
  }
  return { shape, dtype: a.dtype, data };
}

/** Channels-last when any operand already is (no transpose), ONNX layout otherwise. */
function broadcastingKernel(op: TensorOp, outRank: number, count: number): Kernel {
  return ({ input }) => {
    const operands = Array.from({ length: count }, (_, i) => input(i));
    const channelsLast = outRank === 4 && operands.some((o) => o.prefersChannelsLast) && operands.every((o) => o.rank <= 4);
    const tensors = operands.map((o) => (channelsLast ? asChannelsLast(o) : o.canonical()));
    const result = tensors.slice(1).reduce((acc, t) => op(acc, t), tensors[0]!);
    return [channelsLast ? Operand.channelsLast(result as tf.Tensor4D) : Operand.of(result)];
  };
}

function variadic(name: string, op: TensorOp): OpCompiler {
  return (ctx): OpResult => {
    const inputs = presentInputs(ctx);
    if (inputs.length === 0 || inputs.some((i, k) => i !== k)) ctx.fail('inputs must be given without gaps');
    const hosts = inputs.map((i) => ctx.host(i));
    const small = hosts.every((h) => h !== undefined && (h.dtype !== 'float32' || h.data.length <= HOST_MATH_LIMIT));
    if (small) return hostResult(hosts.slice(1).reduce((acc, h) => hostBinary(ctx, acc!, h!, HOST_OPS[name]!), hosts[0])!);
    const metas = inputs.map((i) => ctx.meta(i));
    const shape = metas.slice(1).reduce((acc, m) => broadcastOrFail(acc, m.shape, ctx.fail), [...metas[0]!.shape]);
    const dtype: ElemType = metas[0]!.dtype;
    return kernelResult([{ shape, dtype }], inputs, broadcastingKernel(op, shape.length, inputs.length));
  };
}

function divide(a: tf.Tensor, b: tf.Tensor): tf.Tensor {
  return a.dtype === 'int32' ? tf.floorDiv(a, b) : tf.div(a, b);
}

/** PRelu: x for x ≥ 0, slope·x below, slope broadcast to x (max(x,0) + slope·min(x,0)). */
const prelu: OpCompiler = (ctx) => {
  const x = ctx.meta(0);
  broadcastOrFail(x.shape, ctx.meta(1).shape, ctx.fail);
  const op: TensorOp = (a, slope) => tf.add(tf.relu(a), tf.mul(slope, tf.neg(tf.relu(tf.neg(a)))));
  return kernelResult([x], [0, 1], broadcastingKernel(op, x.shape.length, 2));
};

export const ARITHMETIC_OPS: Record<string, OpCompiler> = {
  Add: variadic('Add', (a, b) => tf.add(a, b)),
  Sub: variadic('Sub', (a, b) => tf.sub(a, b)),
  Mul: variadic('Mul', (a, b) => tf.mul(a, b)),
  Div: variadic('Div', divide),
  Pow: variadic('Pow', (a, b) => tf.pow(a, b)),
  Max: variadic('Max', (a, b) => tf.maximum(a, b)),
  Min: variadic('Min', (a, b) => tf.minimum(a, b)),
  Sum: variadic('Sum', (a, b) => tf.add(a, b)),
  PRelu: prelu,
};
