/**
 * Spatial building blocks shared by the replacement kernels: convolution geometry, padding that
 * may also crop, and zero-insertion (dilation) of a map by a stride.
 * All tensors are NHWC.
 */
import * as tf from '@tensorflow/tfjs';
import { pairOf } from './composed.ts';

/** The numbers of a 2-D convolution or pooling window that the kernels need. */
export interface WindowGeometry {
  readonly batch: number;
  readonly inHeight: number;
  readonly inWidth: number;
  readonly outHeight: number;
  readonly outWidth: number;
  readonly filterHeight: number;
  readonly filterWidth: number;
  readonly strideHeight: number;
  readonly strideWidth: number;
  readonly dilationHeight: number;
  readonly dilationWidth: number;
  /** Filter extent including dilation holes: (filter − 1)·dilation + 1. */
  readonly effectiveHeight: number;
  readonly effectiveWidth: number;
  readonly padTop: number;
  readonly padLeft: number;
}

/** Pick the window numbers out of a tfjs Conv2DInfo (from computeConv2DInfo / computePool2DInfo). */
export function windowGeometry(info: tf.backend_util.Conv2DInfo): WindowGeometry {
  return {
    batch: info.batchSize,
    inHeight: info.inHeight,
    inWidth: info.inWidth,
    outHeight: info.outHeight,
    outWidth: info.outWidth,
    filterHeight: info.filterHeight,
    filterWidth: info.filterWidth,
    strideHeight: info.strideHeight,
    strideWidth: info.strideWidth,
    dilationHeight: info.dilationHeight,
    dilationWidth: info.dilationWidth,
    effectiveHeight: info.effectiveFilterHeight,
    effectiveWidth: info.effectiveFilterWidth,
    padTop: info.padInfo.top,
    padLeft: info.padInfo.left,
  };
}

/** The attributes of a conv2d or depthwise backprop kernel that fix the forward window (tfjs 4.22 names). */
export interface ConvWindowAttrs {
  readonly strides: [number, number] | number;
  readonly pad: tf.Conv2DBackpropInputAttrs['pad'];
  readonly dimRoundingMode?: 'floor' | 'round' | 'ceil';
  /** Absent for the conv2d kernels: tfjs passes none (its conv2d gradient requires 1); accepted if given. */
  readonly dilations?: [number, number] | number;
}

/**
 * Window geometry of the forward convolution a backprop kernel differentiates, from the forward
 * input and filter shapes and the kernel's attributes (dilations default to 1).
 */
export function convWindowGeometry(
  inShape: [number, number, number, number],
  filterShape: [number, number, number, number],
  attrs: ConvWindowAttrs,
  depthwise: boolean,
  dataFormat: 'channelsFirst' | 'channelsLast' = 'channelsLast',
): WindowGeometry {
  const info = tf.backend_util.computeConv2DInfo(inShape, filterShape, attrs.strides, pairOf(attrs.dilations, 1), attrs.pad, attrs.dimRoundingMode, depthwise, dataFormat);
  return windowGeometry(info);
}

/**
 * Grow (positive amounts) or shrink (negative amounts) the spatial borders of an NHWC tensor.
 * New cells hold `value`.
 */
export function padOrCrop(x: tf.Tensor4D, top: number, bottom: number, left: number, right: number, value = 0): tf.Tensor4D {
  let out = x;
  if (top > 0 || bottom > 0 || left > 0 || right > 0) {
    const grow = (n: number): number => Math.max(0, n);
    out = tf.pad(out, [[0, 0], [grow(top), grow(bottom)], [grow(left), grow(right)], [0, 0]], value);
  }
  if (top < 0 || bottom < 0 || left < 0 || right < 0) {
    const cut = (n: number): number => Math.max(0, -n);
    const [, h, w] = out.shape;
    out = tf.slice(out, [0, cut(top), cut(left), 0], [-1, h - cut(top) - cut(bottom), w - cut(left) - cut(right), -1]);
  }
  return out;
}

/**
 * Insert stride − 1 zeros after every row and column: [B, H, W, C] → [B, H·sh, W·sw, C].
 * The trailing sh − 1 rows and sw − 1 columns are zeros too; callers crop them with padOrCrop.
 */
export function insertZeros(x: tf.Tensor4D, strideHeight: number, strideWidth: number): tf.Tensor4D {
  if (strideHeight === 1 && strideWidth === 1) return x;
  const [b, h, w, c] = x.shape;
  const spread = tf.reshape(x, [b, h, 1, w, 1, c]);
  const padded = tf.pad(spread, [[0, 0], [0, 0], [0, strideHeight - 1], [0, 0], [0, strideWidth - 1], [0, 0]]);
  return tf.reshape(padded, [b, h * strideHeight, w * strideWidth, c]);
}

/**
 * Map dy [B, outH, outW, C] onto the grid of a stride-1 "full" convolution that yields the input
 * gradient: zeros between the strided positions and a border of effective filter − 1 − pad, so a
 * valid, stride-1 convolution with the 180°-rotated filter (with the forward dilation) gives
 * exactly [B, inH, inW, ·].
 */
export function spreadForTransposedConv(dy: tf.Tensor4D, g: WindowGeometry): tf.Tensor4D {
  const spread = insertZeros(dy, g.strideHeight, g.strideWidth);
  const usedHeight = (g.outHeight - 1) * g.strideHeight + 1;
  const usedWidth = (g.outWidth - 1) * g.strideWidth + 1;
  const top = g.effectiveHeight - 1 - g.padTop;
  const left = g.effectiveWidth - 1 - g.padLeft;
  const bottom = g.inHeight + g.effectiveHeight - 1 - usedHeight - top;
  const right = g.inWidth + g.effectiveWidth - 1 - usedWidth - left;
  // insertZeros leaves stride − 1 trailing zero rows/columns beyond the used extent.
  const extraRows = spread.shape[1] - usedHeight;
  const extraCols = spread.shape[2] - usedWidth;
  return padOrCrop(spread, top, bottom - extraRows, left, right - extraCols);
}

/** NCHW → NHWC for a rank-4 tensor. */
export function toChannelsLast(x: tf.Tensor4D): tf.Tensor4D {
  return tf.transpose(x, [0, 2, 3, 1]);
}

/** NHWC → NCHW for a rank-4 tensor. */
export function toChannelsFirst(x: tf.Tensor4D): tf.Tensor4D {
  return tf.transpose(x, [0, 3, 1, 2]);
}
