/** Shape rules shared by the operator translators (numpy broadcasting, axes, pooling windows). */
import { dimEquals, formatShape, isKnown, type Dim } from './symbolic.ts';

/** Numpy-style broadcast of two shapes; undefined when they do not broadcast. */
export function broadcastShapes(a: readonly Dim[], b: readonly Dim[]): Dim[] | undefined {
  const rank = Math.max(a.length, b.length);
  const out: Dim[] = [];
  for (let i = 0; i < rank; i++) {
    const da = a[a.length - rank + i] ?? 1;
    const db = b[b.length - rank + i] ?? 1;
    if (dimEquals(da, db) || db === 1) out.push(da);
    else if (da === 1) out.push(db);
    else return undefined;
  }
  return out;
}

/** Broadcast shapes or fail with both shapes in the message. */
export function broadcastOrFail(a: readonly Dim[], b: readonly Dim[], fail: (m: string) => never): Dim[] {
  const out = broadcastShapes(a, b);
  if (out === undefined) fail(`shapes ${formatShape(a)} and ${formatShape(b)} do not broadcast`);
  return out;
}

/** Map a possibly negative axis into [0, rank). */
export function normalizeAxis(axis: number, rank: number, fail: (m: string) => never): number {
  const a = axis < 0 ? axis + rank : axis;
  if (!Number.isInteger(a) || a < 0 || a >= rank) fail(`axis ${axis} is out of range for rank ${rank}`);
  return a;
}

/** A dimension that must be a plain number (spatial sizes, channel counts). */
export function knownDim(d: Dim | undefined, what: string, fail: (m: string) => never): number {
  if (d === undefined || !isKnown(d)) fail(`${what} must be a fixed size, got ${d === undefined ? 'nothing' : formatShape([d])}`);
  return d;
}

/** Explicit begin/end padding per spatial axis, in ONNX order [b1, b2, …, e1, e2, …]. */
export interface SpatialWindow {
  readonly kernel: readonly number[];
  readonly strides: readonly number[];
  readonly dilations: readonly number[];
  readonly padsBegin: number[];
  readonly padsEnd: number[];
}

/**
 * Resolve a conv/pool node's padding: explicit `pads`, or auto_pad SAME_UPPER / SAME_LOWER / VALID
 * (ONNX operator docs: total = max((ceil(in/s) − 1)·s + (k − 1)·d + 1 − in, 0); SAME_UPPER puts the
 * odd pixel at the end, SAME_LOWER at the beginning).
 */
export function resolvePads(
  autoPad: string,
  pads: readonly number[],
  spatial: readonly number[],
  kernel: readonly number[],
  strides: readonly number[],
  dilations: readonly number[],
  fail: (m: string) => never,
): SpatialWindow {
  const n = spatial.length;
  const padsBegin: number[] = [];
  const padsEnd: number[] = [];
  for (let i = 0; i < n; i++) {
    const k = kernel[i]!;
    const s = strides[i]!;
    const d = dilations[i]!;
    if (autoPad === 'NOTSET') {
      padsBegin.push(pads[i] ?? 0);
      padsEnd.push(pads[i + n] ?? 0);
    } else if (autoPad === 'VALID') {
      padsBegin.push(0);
      padsEnd.push(0);
    } else if (autoPad === 'SAME_UPPER' || autoPad === 'SAME_LOWER') {
      const size = spatial[i]!;
      const total = Math.max((Math.ceil(size / s) - 1) * s + (k - 1) * d + 1 - size, 0);
      const small = Math.floor(total / 2);
      padsBegin.push(autoPad === 'SAME_UPPER' ? small : total - small);
      padsEnd.push(autoPad === 'SAME_UPPER' ? total - small : small);
    } else fail(`auto_pad "${autoPad}" is not one of NOTSET, SAME_UPPER, SAME_LOWER, VALID`);
  }
  if ([...padsBegin, ...padsEnd].some((p) => p < 0)) fail(`negative pads [${[...padsBegin, ...padsEnd].join(', ')}] are not supported`);
  return { kernel, strides, dilations, padsBegin, padsEnd };
}

/** Output size of a sliding window (floor, or ceil with ceil_mode). */
export function windowOutputSize(size: number, w: SpatialWindow, axis: number, ceil = false): number {
  const k = (w.kernel[axis]! - 1) * w.dilations[axis]! + 1;
  const span = size + w.padsBegin[axis]! + w.padsEnd[axis]! - k;
  const out = (ceil ? Math.ceil(span / w.strides[axis]!) : Math.floor(span / w.strides[axis]!)) + 1;
  return out;
}
