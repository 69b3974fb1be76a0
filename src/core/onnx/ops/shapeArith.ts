/**
 * Shape arithmetic and constants: Shape, Size, Constant, ConstantOfShape, Gather, Slice, Cast, Range.
 * With static shapes these are all evaluated at load time (the batch size stays a symbol); Gather,
 * Slice and Cast also run on image-dependent tensors. Semantics: ONNX operator docs, per opset.
 */
import * as tf from '@tensorflow/tfjs';
import { hostResult, kernelResult, type OpCompiler, type OpContext } from '../context.ts';
import { OnnxLoadError } from '../errors.ts';
import { clampSlice, gatherAxis, sliceArray, type AxisSlice } from '../hostArrays.ts';
import { normalizeAxis } from '../shapes.ts';
import { dimProduct, isKnown, resolveShape, type Dim } from '../symbolic.ts';
import { dataTypeName, decodeTensorData, elemTypeOf } from '../tensorData.ts';
import { Operand, tfDtype, type ElemType, type HostValue } from '../values.ts';

const shapeOp: OpCompiler = (ctx) => {
  const shape = ctx.meta(0).shape;
  const rank = shape.length;
  const clampAxis = (a: number): number => Math.min(Math.max(a < 0 ? a + rank : a, 0), rank);
  const start = ctx.opset >= 15 ? clampAxis(ctx.attrs.int('start', 0)) : 0;
  const end = ctx.opset >= 15 ? clampAxis(ctx.attrs.int('end', rank)) : rank;
  const data = shape.slice(start, Math.max(start, end));
  return hostResult({ shape: [data.length], dtype: 'int64', data });
};

const size: OpCompiler = (ctx) => hostResult({ shape: [], dtype: 'int64', data: [dimProduct(ctx.meta(0).shape)] });

function loadTensor(ctx: OpContext, what: string): HostValue {
  const t = ctx.attrs.tensor(what);
  if (t === undefined) ctx.fail(`attribute "${what}" is missing`);
  try {
    return decodeTensorData(t!, `Constant attribute "${what}"`);
  } catch (err) {
    if (err instanceof OnnxLoadError) ctx.fail(err.message);
    throw err;
  }
}

const constant: OpCompiler = (ctx) => {
  if (ctx.attrs.has('value')) return hostResult(loadTensor(ctx, 'value'));
  if (ctx.attrs.has('value_float')) return hostResult({ shape: [], dtype: 'float32', data: [ctx.attrs.float('value_float', 0)] });
  if (ctx.attrs.has('value_int')) return hostResult({ shape: [], dtype: 'int64', data: [ctx.attrs.int('value_int', 0)] });
  const floats = ctx.attrs.floats('value_floats');
  if (floats !== undefined) return hostResult({ shape: [floats.length], dtype: 'float32', data: Float32Array.from(floats) });
  const ints = ctx.attrs.optionalInts('value_ints');
  if (ints !== undefined) return hostResult({ shape: [ints.length], dtype: 'int64', data: ints });
  return ctx.fail('only tensor, float and int constants are supported (not sparse or string values)');
};

const constantOfShape: OpCompiler = (ctx) => {
  const shape = Array.from(ctx.requireHost(0, 'the shape').data);
  const fill = ctx.attrs.has('value') ? loadTensor(ctx, 'value') : { shape: [1], dtype: 'float32' as ElemType, data: [0] };
  const v = fill.data[0] ?? 0;
  if (shape.every(isKnown)) {
    const n = shape.reduce((a, b) => a * b, 1);
    return hostResult({ shape, dtype: fill.dtype, data: new Array<Dim>(n).fill(v) });
  }
  if (!isKnown(v)) ctx.fail('the fill value must be a number');
  return kernelResult([{ shape, dtype: fill.dtype }], [], ({ batch }) => [Operand.of(tf.fill(resolveShape(shape, batch), v as number, tfDtype(fill.dtype)))]);
};

/** Gather indices known at load time, wrapped into [0, size) (negative indices count from the end). */
function gatherIndices(ctx: OpContext, size: Dim): HostValue | undefined {
  const indices = ctx.host(1);
  if (indices === undefined) return undefined;
  const data = Array.from(indices.data, (d) => {
    if (!isKnown(d)) ctx.fail('indices must be numbers');
    if (d < 0 && !isKnown(size)) ctx.fail('negative indices into the batch axis');
    return d < 0 ? d + (size as number) : d;
  });
  return { ...indices, data };
}

const gather: OpCompiler = (ctx) => {
  const x = ctx.meta(0);
  const axis = normalizeAxis(ctx.attrs.int('axis', 0), x.shape.length, ctx.fail);
  const indices = gatherIndices(ctx, x.shape[axis]!);
  const indexShape = indices?.shape ?? ctx.meta(1).shape;
  const shape = [...x.shape.slice(0, axis), ...indexShape, ...x.shape.slice(axis + 1)];
  const data = ctx.host(0);
  if (data !== undefined && indices !== undefined && shape.every(isKnown)) {
    return hostResult({ shape: shape as number[], dtype: data.dtype, data: gatherAxis(data.data, data.shape, axis, indices.data as number[]) });
  }
  const fixed = indices !== undefined ? ctx.keep(tf.tensor(indices.data as number[], [...indices.shape], 'int32')) : undefined;
  return kernelResult([{ shape, dtype: x.dtype }], fixed ? [0] : [0, 1], ({ input }) => {
    return [Operand.of(tf.gather(input(0).canonical(), fixed ?? input(1).canonical(), axis))];
  });
};

/** starts/ends/axes/steps from attributes (opset < 10) or inputs 1–4. */
function sliceParams(ctx: OpContext, rank: number): { starts: number[]; ends: number[]; axes: number[]; steps: number[] } {
  if (ctx.opset < 10) {
    const starts = ctx.attrs.ints('starts', []);
    const axes = ctx.attrs.ints('axes', starts.map((_, i) => i));
    return { starts, ends: ctx.attrs.ints('ends', []), axes, steps: starts.map(() => 1) };
  }
  const starts = ctx.requireInts(1, 'starts');
  const ends = ctx.requireInts(2, 'ends');
  const axes = ctx.has(3) ? ctx.requireInts(3, 'axes') : starts.map((_, i) => i);
  const steps = ctx.has(4) ? ctx.requireInts(4, 'steps') : starts.map(() => 1);
  if (ends.length !== starts.length || axes.length !== starts.length || steps.length !== starts.length) ctx.fail('starts, ends, axes and steps differ in length');
  return { starts, ends, axes: axes.map((a) => normalizeAxis(a, rank, ctx.fail)), steps };
}

const slice: OpCompiler = (ctx) => {
  const x = ctx.meta(0);
  const p = sliceParams(ctx, x.shape.length);
  const slices: (AxisSlice | 'all')[] = x.shape.map(() => 'all');
  p.axes.forEach((axis, k) => {
    const [start, end, step] = [p.starts[k]!, p.ends[k]!, p.steps[k]!];
    if (step === 0) ctx.fail('a step of 0');
    const d = x.shape[axis]!;
    if (!isKnown(d)) {
      if (!(step === 1 && start === 0 && end >= 2 ** 31 - 1)) ctx.fail('the shape cannot be resolved when loading: a partial slice of the batch axis');
      return;
    }
    slices[axis] = clampSlice(start, end, step, d);
  });
  const shape = x.shape.map((d, i) => (slices[i] === 'all' ? d : (slices[i] as AxisSlice).count));
  const data = ctx.host(0);
  if (data !== undefined) {
    const full = slices.map((s, i) => (s === 'all' ? { start: 0, step: 1, count: data.shape[i]! } : s));
    return hostResult({ shape: shape as number[], dtype: data.dtype, data: sliceArray(data.data, data.shape, full) });
  }
  if (slices.some((s) => s !== 'all' && s.step !== 1)) ctx.fail('slices with a step other than 1 are only supported on values known at load time');
  const begin = slices.map((s) => (s === 'all' ? 0 : s.start));
  return kernelResult([{ shape, dtype: x.dtype }], [0], ({ input, batch }) => [Operand.of(tf.slice(input(0).canonical(), begin, resolveShape(shape, batch)))]);
};

function castValue(d: Dim, to: ElemType): Dim {
  if (!isKnown(d)) return d;
  if (to === 'float32') return Math.fround(d);
  if (to === 'bool') return d !== 0 ? 1 : 0;
  return Math.trunc(d);
}

const cast: OpCompiler = (ctx) => {
  const code = ctx.attrs.int('to', 1);
  const to = elemTypeOf(code) ?? ctx.fail(`casting to ${dataTypeName(code)} is not supported`);
  const host = ctx.host(0);
  if (host !== undefined) return hostResult({ shape: host.shape, dtype: to, data: Array.from(host.data, (d) => castValue(d, to)) });
  return kernelResult([{ shape: ctx.meta(0).shape, dtype: to }], [0], ({ input }) => [input(0).map((t) => tf.cast(t, tfDtype(to)))]);
};

const range: OpCompiler = (ctx) => {
  const [start, limit, delta] = [0, 1, 2].map((i) => ctx.requireInts(i, ['start', 'limit', 'delta'][i]!)[0]!) as [number, number, number];
  const count = Math.max(Math.ceil((limit - start) / delta), 0);
  return hostResult({ shape: [count], dtype: ctx.meta(0).dtype, data: Array.from({ length: count }, (_, i) => start + i * delta) });
};

export const SHAPE_ARITH_OPS: Record<string, OpCompiler> = {
  Shape: shapeOp, Size: size, Constant: constant, ConstantOfShape: constantOfShape, Gather: gather, Slice: slice, Cast: cast, Range: range,
};
