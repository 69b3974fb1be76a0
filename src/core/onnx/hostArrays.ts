/**
 * Plain-JS array routines behind the load-time versions of Gather, Slice and Concat (shape
 * arithmetic), on flat row-major data whose elements may mention the batch size.
 */
import type { Dim } from './symbolic.ts';

/** Product of the sizes in shape[from, to). */
export function sizeOf(shape: readonly number[], from = 0, to = shape.length): number {
  let n = 1;
  for (let i = from; i < to; i++) n *= shape[i]!;
  return n;
}

/** numpy.take(data, indices, axis) on a flat row-major array. */
export function gatherAxis(data: ArrayLike<Dim>, shape: readonly number[], axis: number, indices: readonly number[]): Dim[] {
  const outer = sizeOf(shape, 0, axis);
  const size = shape[axis]!;
  const inner = sizeOf(shape, axis + 1);
  const out: Dim[] = [];
  for (let o = 0; o < outer; o++) {
    for (const index of indices) {
      const base = (o * size + index) * inner;
      for (let i = 0; i < inner; i++) out.push(data[base + i]!);
    }
  }
  return out;
}

/** Concatenate flat arrays along `axis` (all shapes equal except there). */
export function concatAxis(parts: readonly { data: ArrayLike<Dim>; shape: readonly number[] }[], axis: number): Dim[] {
  const first = parts[0]!;
  const outer = sizeOf(first.shape, 0, axis);
  const out: Dim[] = [];
  for (let o = 0; o < outer; o++) {
    for (const part of parts) {
      const chunk = sizeOf(part.shape, axis);
      for (let i = 0; i < chunk; i++) out.push(part.data[o * chunk + i]!);
    }
  }
  return out;
}

/** One sliced axis: first index, step and count (already clamped). */
export interface AxisSlice {
  readonly start: number;
  readonly step: number;
  readonly count: number;
}

/**
 * Clamp an ONNX Slice range on an axis of `size` (ONNX Slice docs: negative values count from the
 * end; starts clamp to [0, size] or [0, size − 1] for negative steps; ends to [0, size] or [−1, size − 1]).
 */
export function clampSlice(start: number, end: number, step: number, size: number): AxisSlice {
  const wrap = (v: number): number => (v < 0 ? v + size : v);
  if (step > 0) {
    const s = Math.min(Math.max(wrap(start), 0), size);
    const e = Math.min(Math.max(wrap(end), 0), size);
    return { start: s, step, count: Math.max(0, Math.ceil((e - s) / step)) };
  }
  const s = Math.min(Math.max(wrap(start), 0), size - 1);
  const e = Math.min(Math.max(wrap(end), -1), size - 1);
  return { start: s, step, count: Math.max(0, Math.ceil((e - s) / step)) };
}

/** Slice a flat array with one AxisSlice per axis. */
export function sliceArray(data: ArrayLike<Dim>, shape: readonly number[], slices: readonly AxisSlice[]): Dim[] {
  const rank = shape.length;
  const strides = shape.map((_, i) => sizeOf(shape, i + 1));
  const out: Dim[] = [];
  const total = slices.reduce((n, s) => n * s.count, 1);
  const coord = new Array<number>(rank).fill(0);
  for (let k = 0; k < total; k++) {
    let rest = k;
    let offset = 0;
    for (let axis = rank - 1; axis >= 0; axis--) {
      const s = slices[axis]!;
      coord[axis] = rest % s.count;
      rest = Math.floor(rest / s.count);
      offset += (s.start + coord[axis]! * s.step) * strides[axis]!;
    }
    out.push(data[offset]!);
  }
  return out;
}
