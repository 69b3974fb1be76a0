/**
 * Filter taps without strided slices: tap (ky, kx) of a window is the map of input values that
 * filter element (ky, kx) meets at every output position. The wasm backend's StridedSlice is a
 * slow generic loop, so strided views are read by reshaping a block of rows (or columns) into
 * [outer, stride, inner] and slicing one phase, which copies contiguous runs. `scatterTaps` is the
 * inverse (interleaving by concatenation), used to route gradients back to the input grid.
 */
import * as tf from '@tensorflow/tfjs';
import { padOrCrop } from './spatial.ts';
import type { WindowGeometry } from './spatial.ts';

/** Along one axis: groups of taps that share a block of rows (or columns). */
interface AxisPlan {
  /** Phase length inside a block: the stride when it is > 1, else 1. */
  readonly phases: number;
  readonly groups: readonly { readonly offset: number; readonly tapOfPhase: readonly number[] }[];
  /** Padded length the blocks need: last offset + out · phases. */
  readonly extent: number;
}

function axisPlan(filter: number, stride: number, dilation: number, out: number): AxisPlan {
  if (stride > 1 && dilation > 1) throw new Error('a window with both stride and dilation above 1 is not supported');
  const groups: { offset: number; tapOfPhase: number[] }[] = [];
  if (stride === 1) {
    for (let k = 0; k < filter; k++) groups.push({ offset: k * dilation, tapOfPhase: [k] });
  } else {
    for (let q = 0; q * stride < filter; q++) {
      const tapOfPhase = Array.from({ length: stride }, (_, r) => (q * stride + r < filter ? q * stride + r : -1));
      groups.push({ offset: q * stride, tapOfPhase });
    }
  }
  return { phases: stride, groups, extent: groups[groups.length - 1]!.offset + out * stride };
}

function plans(g: WindowGeometry): { rows: AxisPlan; cols: AxisPlan } {
  return {
    rows: axisPlan(g.filterHeight, g.strideHeight, g.dilationHeight, g.outHeight),
    cols: axisPlan(g.filterWidth, g.strideWidth, g.dilationWidth, g.outWidth),
  };
}

/** Split [outer, length·phases, inner] (after slicing at `offset`) into its `phases` phases. */
function phasesOf(x: tf.Tensor3D, offset: number, out: number, phases: number): tf.Tensor3D[] {
  const [outer, length, inner] = x.shape;
  const block = offset === 0 && length === out * phases ? x : tf.slice(x, [0, offset, 0], [outer, out * phases, inner]);
  if (phases === 1) return [block];
  const split = tf.reshape(block, [outer * out, phases, inner]);
  return Array.from({ length: phases }, (_, r) => tf.reshape(tf.slice(split, [0, r, 0], [outer * out, 1, inner]), [outer, out, inner]));
}

/**
 * All filter taps of x: taps[ky][kx] is [B, outH, outW, C]. x is the unpadded input; borders are
 * filled with `padValue` (0 for convolutions, −∞ for max-pooling).
 */
export function extractTaps(x: tf.Tensor4D, g: WindowGeometry, padValue: number): tf.Tensor4D[][] {
  const { rows, cols } = plans(g);
  const [b, , , c] = x.shape;
  const padded = padOrCrop(x, g.padTop, rows.extent - g.inHeight - g.padTop, g.padLeft, cols.extent - g.inWidth - g.padLeft, padValue);
  const taps: tf.Tensor4D[][] = Array.from({ length: g.filterHeight }, () => []);
  const byRow = tf.reshape(padded, [b, rows.extent, cols.extent * c]) as tf.Tensor3D;
  for (const rowGroup of rows.groups) {
    const rowPhases = phasesOf(byRow, rowGroup.offset, g.outHeight, rows.phases);
    rowGroup.tapOfPhase.forEach((ky, r) => {
      if (ky < 0) return;
      const byCol = tf.reshape(rowPhases[r]!, [b * g.outHeight, cols.extent, c]) as tf.Tensor3D;
      for (const colGroup of cols.groups) {
        const colPhases = phasesOf(byCol, colGroup.offset, g.outWidth, cols.phases);
        colGroup.tapOfPhase.forEach((kx, t) => {
          if (kx >= 0) taps[ky]![kx] = tf.reshape(colPhases[t]!, [b, g.outHeight, g.outWidth, c]);
        });
      }
    });
  }
  return taps;
}

/** Interleave phase maps [outer, out, inner] into [outer, out·phases, inner]. */
function interleave(parts: readonly tf.Tensor3D[]): tf.Tensor3D {
  if (parts.length === 1) return parts[0]!;
  const [outer, out, inner] = parts[0]!.shape;
  const columns = parts.map((p) => tf.reshape(p, [outer * out, 1, inner]));
  return tf.reshape(tf.concat(columns, 1), [outer, out * parts.length, inner]);
}

/**
 * Inverse of extractTaps, summing where taps overlap: maps [B, outH, outW, C] per tap (row-major,
 * as extractTaps returns them) go back to the input grid [B, inH, inW, C].
 */
export function scatterTaps(taps: readonly (readonly tf.Tensor4D[])[], g: WindowGeometry): tf.Tensor4D {
  const { rows, cols } = plans(g);
  const first = taps[0]![0]!;
  const [b, , , c] = first.shape;
  const zeros = tf.zerosLike(first);
  const placed: tf.Tensor4D[] = [];
  for (const rowGroup of rows.groups) {
    for (const colGroup of cols.groups) {
      const rowParts = rowGroup.tapOfPhase.map((ky) => {
        const colParts = colGroup.tapOfPhase.map((kx) => {
          const tap = ky >= 0 && kx >= 0 ? taps[ky]![kx]! : zeros;
          return tf.reshape(tap, [b * g.outHeight, g.outWidth, c]) as tf.Tensor3D;
        });
        return tf.reshape(interleave(colParts), [b, g.outHeight, g.outWidth * cols.phases * c]) as tf.Tensor3D;
      });
      const block = tf.reshape(interleave(rowParts), [b, g.outHeight * rows.phases, g.outWidth * cols.phases, c]) as tf.Tensor4D;
      const top = rowGroup.offset;
      const left = colGroup.offset;
      placed.push(padOrCrop(block, top, rows.extent - top - block.shape[1], left, cols.extent - left - block.shape[2]));
    }
  }
  const canvas = placed.length === 1 ? placed[0]! : (tf.addN(placed) as tf.Tensor4D);
  // The canvas starts at padded row/column 0; the input starts padTop/padLeft further in.
  return padOrCrop(canvas, -g.padTop, g.padTop + g.inHeight - rows.extent, -g.padLeft, g.padLeft + g.inWidth - cols.extent);
}
