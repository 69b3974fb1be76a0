/**
 * Window taps through convolutions. Tap (ky, kx) of a window is the map of input values that
 * filter element (ky, kx) meets at every output position. On the wasm backend, Slice and
 * StridedSlice copy the whole input out of the heap on every call, so reading K² strided views
 * that way is slow; instead one depthwise convolution with a one-hot filter (XNNPACK) reads them
 * all at once.
 *
 * Exact for finite inputs: each output is 1·x plus zeros. A non-finite input (±∞, NaN) turns the
 * taps of every window containing it into NaN (0·∞ is NaN).
 */
import * as tf from '@tensorflow/tfjs';
import { padOrCrop } from './spatial.ts';
import type { WindowGeometry } from './spatial.ts';

/** Taps per window: filterHeight · filterWidth. */
export function tapCount(g: WindowGeometry): number {
  return g.filterHeight * g.filterWidth;
}

/** One-hot depthwise filter [fh, fw, C, taps]: output channel c·taps + t reads tap t (row-major) of channel c. */
function oneHotTapFilter(g: WindowGeometry, channels: number): tf.Tensor4D {
  const taps = tapCount(g);
  const eye = tf.reshape(tf.eye(taps), [g.filterHeight, g.filterWidth, 1, taps]);
  return tf.mul(eye, tf.ones([1, 1, channels, 1])) as tf.Tensor4D;
}

/**
 * Every window tap of x: [B, outH, outW, C·taps], channel c·taps + (ky·fw + kx). Borders are
 * filled with `padValue` (finite; 0 for convolutions).
 */
export function extractTaps(x: tf.Tensor4D, g: WindowGeometry, padValue: number): tf.Tensor4D {
  const neededHeight = (g.outHeight - 1) * g.strideHeight + g.effectiveHeight;
  const neededWidth = (g.outWidth - 1) * g.strideWidth + g.effectiveWidth;
  const padded = padOrCrop(x, g.padTop, neededHeight - g.inHeight - g.padTop, g.padLeft, neededWidth - g.inWidth - g.padLeft, padValue);
  const filter = oneHotTapFilter(g, x.shape[3]);
  return tf.depthwiseConv2d(padded, filter, [g.strideHeight, g.strideWidth], 'valid', 'NHWC', [g.dilationHeight, g.dilationWidth]);
}
