/**
 * Conv (2-D): plain, depthwise (group = input channels) and grouped. tfjs convolves channels-last,
 * so the filter is rearranged once at load time ([M, C/g, kH, kW] → [kH, kW, C/g, M]) and the
 * output stays channels-last for the next operator. Semantics: ONNX Conv operator docs.
 */
import * as tf from '@tensorflow/tfjs';
import { kernelResult, type OpCompiler, type OpContext } from '../context.ts';
import { knownDim, resolvePads, windowOutputSize, type SpatialWindow } from '../shapes.ts';
import { hostToTensor, Operand, type Kernel } from '../values.ts';

type Pair = [number, number];
type TfPad = 'valid' | number;

/** Uniform padding is passed to tfjs; anything else is an explicit zero pad followed by 'valid'. */
export interface PadPlan {
  readonly pad: TfPad;
  readonly explicit: [[number, number], [number, number], [number, number], [number, number]] | undefined;
}

/** How to pad a channels-last input for a window with the given begin/end pads. */
export function planPadding(w: SpatialWindow): PadPlan {
  const [t, l] = w.padsBegin as Pair;
  const [b, r] = w.padsEnd as Pair;
  if (t === 0 && l === 0 && b === 0 && r === 0) return { pad: 'valid', explicit: undefined };
  if (t === l && t === b && t === r) return { pad: t, explicit: undefined };
  return { pad: 'valid', explicit: [[0, 0], [t, b], [l, r], [0, 0]] };
}

/** The conv window of a node on a [N, C, H, W] input with a [M, C/g, kH, kW] filter. */
function convWindow(ctx: OpContext, height: number, width: number, filterShape: Pair): SpatialWindow {
  const kernel = ctx.attrs.ints('kernel_shape', filterShape);
  const strides = ctx.attrs.ints('strides', [1, 1]);
  const dilations = ctx.attrs.ints('dilations', [1, 1]);
  const pads = ctx.attrs.ints('pads', [0, 0, 0, 0]);
  if (kernel.length !== 2 || strides.length !== 2 || dilations.length !== 2 || pads.length !== 4) ctx.fail('only 2-D convolutions are supported');
  if (kernel[0] !== filterShape[0] || kernel[1] !== filterShape[1]) ctx.fail(`kernel_shape [${kernel.join(', ')}] differs from the filter's [${filterShape.join(', ')}]`);
  return resolvePads(ctx.attrs.string('auto_pad', 'NOTSET'), pads, [height, width], kernel, strides, dilations, ctx.fail);
}

/** Rearrange ONNX filters for tfjs: conv2d wants [kH, kW, C/g, M]; depthwise wants [kH, kW, C, M/C]. */
function tfFilter(weight: tf.Tensor, plan: ConvPlan): tf.Tensor4D {
  return dilateFilter(rearrangeFilter(weight, plan.depthwise, plan.channels), plan.dilations);
}

function rearrangeFilter(weight: tf.Tensor, depthwise: boolean, channels: number): tf.Tensor4D {
  if (!depthwise) return tf.transpose(weight, [2, 3, 1, 0]) as tf.Tensor4D;
  const [m, , kh, kw] = weight.shape as [number, number, number, number];
  // ONNX output channel m reads input channel floor(m / multiplier), as tfjs's c·multiplier + q does.
  return tf.transpose(weight.reshape([channels, m / channels, kh, kw]), [2, 3, 0, 1]) as tf.Tensor4D;
}

/**
 * A filter with zeros between its taps ([kH, kW, …] → [(kH − 1)·dH + 1, (kW − 1)·dW + 1, …]).
 * Why: tfjs has no gradient for dilated convolutions; convolving with the spread-out filter at
 * dilation 1 is the same function and differentiates normally.
 */
export function dilateFilter(filter: tf.Tensor4D, [dh, dw]: Pair): tf.Tensor4D {
  const spread = (t: tf.Tensor4D, axis: 0 | 1, d: number): tf.Tensor4D => {
    if (d === 1) return t;
    const shape = t.shape;
    const k = shape[axis];
    const withGaps = tf.pad(tf.expandDims(t, axis + 1), [[0, 0], [0, 0], [0, 0], [0, 0], [0, 0]].map((p, i) => (i === axis + 1 ? [0, d - 1] : p)) as [number, number][]);
    const merged = withGaps.reshape(shape.map((s, i) => (i === axis ? s * d : s)));
    return tf.slice(merged, [0, 0, 0, 0], shape.map((s, i) => (i === axis ? (k - 1) * d + 1 : s))) as tf.Tensor4D;
  };
  return spread(spread(filter, 0, dh), 1, dw);
}

interface ConvPlan {
  readonly strides: Pair;
  readonly dilations: Pair;
  readonly padding: PadPlan;
  readonly group: number;
  readonly depthwise: boolean;
  readonly channels: number;
}

function convolve(x: tf.Tensor4D, filter: tf.Tensor4D, plan: ConvPlan): tf.Tensor4D {
  const input: tf.Tensor4D = plan.padding.explicit !== undefined ? tf.pad(x, plan.padding.explicit) : x;
  const { pad } = plan.padding;
  // The filter is already dilated (dilateFilter), so tfjs convolves at dilation 1.
  if (plan.depthwise) return tf.depthwiseConv2d(input, filter, plan.strides, pad, 'NHWC') as tf.Tensor4D;
  if (plan.group === 1) return tf.conv2d(input, filter, plan.strides, pad, 'NHWC');
  const inputs = tf.split(input, plan.group, 3) as tf.Tensor4D[];
  const filters = tf.split(filter, plan.group, 3) as tf.Tensor4D[];
  const outputs = inputs.map((part, g) => tf.conv2d(part, filters[g]!, plan.strides, pad, 'NHWC'));
  return tf.concat(outputs, 3);
}

const conv: OpCompiler = (ctx) => {
  const x = ctx.meta(0);
  const w = ctx.meta(1);
  if (x.shape.length !== 4 || w.shape.length !== 4) ctx.fail(`only 2-D convolutions (rank-4 input and filter) are supported, got ranks ${x.shape.length} and ${w.shape.length}`);
  const channels = knownDim(x.shape[1], 'the input channel count', ctx.fail);
  const [height, width] = [knownDim(x.shape[2], 'the input height', ctx.fail), knownDim(x.shape[3], 'the input width', ctx.fail)];
  const [m, perGroup, kh, kw] = w.shape.map((d, i) => knownDim(d, `filter dimension ${i}`, ctx.fail)) as [number, number, number, number];
  const group = ctx.attrs.int('group', 1);
  if (group < 1 || channels % group !== 0 || m % group !== 0 || perGroup !== channels / group) {
    ctx.fail(`group ${group} does not fit ${channels} input channels and a [${m}, ${perGroup}, ${kh}, ${kw}] filter`);
  }
  const window = convWindow(ctx, height, width, [kh, kw]);
  const plan: ConvPlan = {
    strides: window.strides as Pair, dilations: window.dilations as Pair, padding: planPadding(window),
    group, depthwise: group === channels && group > 1, channels,
  };
  const [oh, ow] = [windowOutputSize(height, window, 0), windowOutputSize(width, window, 1)];
  if (oh < 1 || ow < 1) ctx.fail(`the output would be empty (${oh}×${ow})`);
  const outShape = [x.shape[0]!, m, oh, ow];
  return kernelResult([{ shape: outShape, dtype: 'float32' }], readsOf(ctx), convKernel(ctx, plan));
};

function readsOf(ctx: OpContext): number[] {
  return [0, 1, 2].filter((i) => ctx.has(i) && (i === 0 || ctx.host(i) === undefined));
}

/** Constant filters and bias are prepared once; inputs computed at run time are rearranged per call. */
function convKernel(ctx: OpContext, plan: ConvPlan): Kernel {
  const weightHost = ctx.host(1);
  const biasHost = ctx.has(2) ? ctx.host(2) : undefined;
  const fixedFilter = weightHost && ctx.keep(tf.tidy(() => tfFilter(hostToTensor(weightHost), plan)));
  const fixedBias = biasHost && ctx.keep(hostToTensor(biasHost));
  const hasBias = ctx.has(2);
  return ({ input }) => {
    const filter = fixedFilter ?? tfFilter(input(1).canonical(), plan);
    let y = convolve(input(0).channelsLast(), filter, plan);
    if (hasBias) y = tf.add(y, fixedBias ?? input(2).canonical());
    return [Operand.channelsLast(y)];
  };
}

export const CONV_OPS: Record<string, OpCompiler> = { Conv: conv };
