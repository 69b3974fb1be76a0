/**
 * Operators that move data without arithmetic: Reshape (0 and −1), Flatten, Squeeze, Unsqueeze,
 * Transpose, Concat, Pad (constant mode), Expand. Their shape parameters must be known at load time;
 * load-time inputs give load-time outputs. Semantics: ONNX operator docs, per opset as noted.
 */
import * as tf from '@tensorflow/tfjs';
import { hostResult, kernelResult, presentInputs, type OpCompiler, type OpContext } from '../context.ts';
import { concatAxis } from '../hostArrays.ts';
import { broadcastOrFail, normalizeAxis } from '../shapes.ts';
import { dimDiv, dimEquals, dimProduct, formatShape, isKnown, resolveShape, type Dim } from '../symbolic.ts';
import { channelsLastAxis, Operand, type HostValue } from '../values.ts';

/** Output as a pure reshape: load-time data stays load-time, tensors are reshaped per call. */
function reshapeTo(ctx: OpContext, shape: Dim[]): ReturnType<OpCompiler> {
  const host = ctx.host(0);
  if (host !== undefined) {
    if (!shape.every(isKnown)) ctx.fail(`the shape cannot be resolved when loading: a load-time value reshaped to ${formatShape(shape)}`);
    return hostResult({ shape: shape as number[], dtype: host.dtype, data: host.data });
  }
  return kernelResult([{ shape, dtype: ctx.meta(0).dtype }], [0], ({ input, batch }) => [Operand.of(input(0).canonical().reshape(resolveShape(shape, batch)))]);
}

/** Reshape's target: 0 copies the input's size (unless allowzero), one −1 takes what is left. */
function reshapeTarget(ctx: OpContext, input: readonly Dim[], target: readonly Dim[]): Dim[] {
  const allowZero = ctx.attrs.int('allowzero', 0) === 1;
  const out = target.map((d, i) => (d === 0 && !allowZero ? (input[i] ?? ctx.fail(`0 at position ${i} has no input dimension to copy`)) : d));
  const free = out.findIndex((d) => d === -1);
  if (out.filter((d) => d === -1).length > 1) ctx.fail('more than one −1 in the target shape');
  const total = dimProduct(input);
  if (free >= 0) {
    const rest = dimProduct(out.filter((_, i) => i !== free));
    const inferred = dimDiv(total, rest);
    if (inferred === undefined) ctx.fail(`the shape cannot be resolved when loading: ${formatShape(input)} does not divide into ${formatShape(target)}`);
    out[free] = inferred!;
  } else if (!dimEquals(dimProduct(out), total)) {
    ctx.fail(`cannot reshape ${formatShape(input)} to ${formatShape(out)} (element counts differ${total !== dimProduct(out) && !isKnown(total) ? '; the graph may have been exported for a fixed batch size' : ''})`);
  }
  return out;
}

const reshape: OpCompiler = (ctx) => {
  const target = ctx.opset < 5 ? ctx.attrs.ints('shape', []) : Array.from(ctx.requireHost(1, 'the target shape').data);
  return reshapeTo(ctx, reshapeTarget(ctx, ctx.meta(0).shape, Array.from(target)));
};

const flatten: OpCompiler = (ctx) => {
  const shape = ctx.meta(0).shape;
  const axis = ctx.attrs.int('axis', 1);
  const a = axis < 0 ? axis + shape.length : axis;
  if (a < 0 || a > shape.length) ctx.fail(`axis ${axis} is out of range for rank ${shape.length}`);
  return reshapeTo(ctx, [dimProduct(shape.slice(0, a)), dimProduct(shape.slice(a))]);
};

/** Axes from the attribute (before opset 13) or from input 1 (13 on). */
function axesOf(ctx: OpContext): number[] | undefined {
  if (ctx.opset < 13) return ctx.attrs.optionalInts('axes');
  return ctx.has(1) ? ctx.requireInts(1, 'axes') : undefined;
}

const squeeze: OpCompiler = (ctx) => {
  const shape = ctx.meta(0).shape;
  const given = axesOf(ctx);
  const axes = given === undefined ? shape.flatMap((d, i) => (d === 1 ? [i] : [])) : given.map((a) => normalizeAxis(a, shape.length, ctx.fail));
  axes.forEach((a) => shape[a] !== 1 && ctx.fail(`axis ${a} has size ${formatShape([shape[a]!])}, not 1`));
  return reshapeTo(ctx, shape.filter((_, i) => !axes.includes(i)));
};

const unsqueeze: OpCompiler = (ctx) => {
  const shape = ctx.meta(0).shape;
  const given = axesOf(ctx) ?? ctx.fail('axes are required');
  const rank = shape.length + given.length;
  const axes = given.map((a) => normalizeAxis(a, rank, ctx.fail));
  const out: Dim[] = [];
  let k = 0;
  for (let i = 0; i < rank; i++) out.push(axes.includes(i) ? 1 : shape[k++]!);
  return reshapeTo(ctx, out);
};

const transpose: OpCompiler = (ctx) => {
  const shape = ctx.meta(0).shape;
  const perm = ctx.attrs.ints('perm', shape.map((_, i) => shape.length - 1 - i));
  if (perm.length !== shape.length || [...perm].sort((a, b) => a - b).some((p, i) => p !== i)) ctx.fail(`perm [${perm.join(', ')}] is not a permutation of rank ${shape.length}`);
  const toChannelsLast = perm.join() === '0,2,3,1';
  const toChannelsFirst = perm.join() === '0,3,1,2';
  return kernelResult([{ shape: perm.map((p) => shape[p]!), dtype: ctx.meta(0).dtype }], [0], ({ input }) => {
    const x = input(0);
    // An NCHW → NHWC transpose of a value held channels-last is that tensor itself; an NHWC → NCHW
    // transpose (how channels-last exports begin) has its input as its channels-last form.
    if (toChannelsLast && x.prefersChannelsLast) return [Operand.of(x.channelsLast())];
    if (toChannelsFirst && !x.prefersChannelsLast) return [Operand.channelsLast(x.canonical() as tf.Tensor4D)];
    return [Operand.of(tf.transpose(x.canonical(), perm))];
  });
};

const concat: OpCompiler = (ctx) => {
  const inputs = presentInputs(ctx);
  const metas = inputs.map((i) => ctx.meta(i));
  const rank = metas[0]!.shape.length;
  const axis = normalizeAxis(ctx.attrs.int('axis', 0), rank, ctx.fail);
  const shape = [...metas[0]!.shape];
  for (const m of metas.slice(1)) {
    if (m.shape.length !== rank || m.shape.some((d, i) => i !== axis && !dimEquals(d, shape[i]!))) ctx.fail(`shapes ${formatShape(metas[0]!.shape)} and ${formatShape(m.shape)} do not concatenate on axis ${axis}`);
    const sum = isKnown(shape[axis]!) && isKnown(m.shape[axis]!) ? (shape[axis] as number) + (m.shape[axis] as number) : undefined;
    shape[axis] = sum ?? ctx.fail('the shape cannot be resolved when loading: concatenation along the batch axis');
  }
  const hosts = inputs.map((i) => ctx.host(i));
  if (hosts.every((h) => h !== undefined)) {
    return hostResult({ shape: shape as number[], dtype: metas[0]!.dtype, data: concatAxis(hosts as HostValue[], axis) });
  }
  return kernelResult([{ shape, dtype: metas[0]!.dtype }], inputs, ({ input }) => {
    const values = inputs.map((i) => input(i));
    if (rank === 4 && values.some((v) => v.prefersChannelsLast)) {
      return [Operand.channelsLast(tf.concat(values.map((v) => v.channelsLast()), channelsLastAxis(axis)))];
    }
    return [Operand.of(tf.concat(values.map((v) => v.canonical()), axis))];
  });
};

const pad: OpCompiler = (ctx) => {
  const mode = ctx.attrs.string('mode', 'constant');
  if (mode !== 'constant') ctx.fail(`Pad mode "${mode}" is not supported (only constant)`);
  const x = ctx.meta(0);
  const rank = x.shape.length;
  const pads = ctx.opset < 11 ? ctx.attrs.ints('pads', []) : ctx.requireInts(1, 'pads');
  let value = ctx.opset < 11 ? ctx.attrs.float('value', 0) : 0;
  if (ctx.opset >= 11 && ctx.has(2)) {
    const given = ctx.requireHost(2, 'constant_value').data[0];
    value = typeof given === 'number' ? given : ctx.fail('constant_value must be a number');
  }
  if (ctx.opset >= 18 && ctx.has(3)) ctx.fail('the axes input of Pad is not supported');
  if (pads.length !== 2 * rank) ctx.fail(`pads has ${pads.length} entries for rank ${rank}`);
  if (pads.some((p) => p < 0)) ctx.fail('negative pads (cropping) are not supported');
  const pairs = x.shape.map((_, i) => [pads[i]!, pads[i + rank]!] as [number, number]);
  const shape = x.shape.map((d, i) => (pairs[i]![0] + pairs[i]![1] === 0 ? d : isKnown(d) ? d + pairs[i]![0] + pairs[i]![1] : ctx.fail('cannot pad the batch axis')));
  const nhwcPairs = rank === 4 ? [0, 2, 3, 1].map((a) => pairs[a]!) : pairs;
  return kernelResult([{ shape, dtype: x.dtype }], [0], ({ input }) => {
    const v = input(0);
    if (rank === 4 && v.prefersChannelsLast) return [Operand.channelsLast(tf.pad(v.channelsLast(), nhwcPairs, value))];
    return [Operand.of(tf.pad(v.canonical(), pairs, value))];
  });
};

const expand: OpCompiler = (ctx) => {
  const x = ctx.meta(0);
  const target = Array.from(ctx.requireHost(1, 'the target shape').data);
  const shape = broadcastOrFail(x.shape, target, ctx.fail);
  return kernelResult([{ shape, dtype: x.dtype }], [0], ({ input, batch }) => {
    const t = input(0).canonical();
    const full = t.rank < shape.length ? t.reshape([...Array<number>(shape.length - t.rank).fill(1), ...t.shape]) : t;
    return [Operand.of(tf.broadcastTo(full, resolveShape(shape, batch)))];
  });
};

export const TENSOR_SHAPE_OPS: Record<string, OpCompiler> = {
  Reshape: reshape, Flatten: flatten, Squeeze: squeeze, Unsqueeze: unsqueeze, Transpose: transpose, Concat: concat, Pad: pad, Expand: expand,
};
