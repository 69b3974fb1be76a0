/**
 * DepthwiseConv2dNativeBackpropFilter for the wasm backend, which has none (tfjs 4.22). A fused
 * depthwise conv with a linear activation (e.g. depthwise → batch-norm in a converted graph)
 * computes it inside its gradient even when only the input gradient is wanted. The window taps of
 * the padded input (taps.ts) times dy, summed over batch and positions: one batched matrix product
 * per channel.
 */
import * as tf from '@tensorflow/tfjs';
import { asBackend, requireInput, runComposed, shape4 } from './composed.ts';
import { convWindowGeometry } from './spatial.ts';
import { extractTaps, tapCount } from './taps.ts';
import type { WindowGeometry } from './spatial.ts';

/**
 * Filter gradient of an NHWC depthwise conv: x [B, inH, inW, inC], dy [B, outH, outW, inC·mult]
 * → dW [fh, fw, inC, mult]. Strides, any padding, dilations (stride 1).
 */
export function depthwiseFilterGradient(x: tf.Tensor4D, dy: tf.Tensor4D, g: WindowGeometry, multiplier: number): tf.Tensor4D {
  const inChannels = x.shape[3];
  const taps = tapCount(g);
  const rows = g.batch * g.outHeight * g.outWidth;
  // One batched product per channel: [C, taps, rows] · [C, rows, mult] → [C, taps, mult].
  const patches = tf.transpose(tf.reshape(extractTaps(x, g, 0), [rows, inChannels, taps]), [1, 2, 0]) as tf.Tensor3D;
  const dyByChannel = tf.transpose(tf.reshape(dy, [rows, inChannels, multiplier]), [1, 0, 2]) as tf.Tensor3D;
  const product = tf.transpose(tf.matMul(patches, dyByChannel), [1, 0, 2]);
  return tf.reshape(product, [g.filterHeight, g.filterWidth, inChannels, multiplier]);
}

function depthwiseConv2dNativeBackpropFilter({ inputs, backend, attrs }: Parameters<tf.KernelFunc>[0]): tf.TensorInfo {
  const x = requireInput(inputs, 'x', 'DepthwiseConv2dNativeBackpropFilter');
  const dy = requireInput(inputs, 'dy', 'DepthwiseConv2dNativeBackpropFilter');
  const a = (attrs ?? {}) as unknown as tf.DepthwiseConv2dNativeBackpropFilterAttrs;
  const filterShape: [number, number, number, number] = [...a.filterShape];
  const g = convWindowGeometry(shape4(x, 'x'), filterShape, a, true);
  return runComposed(asBackend(backend), [x, dy], (xT, dyT) =>
    depthwiseFilterGradient(xT as tf.Tensor4D, dyT as tf.Tensor4D, g, filterShape[3]),
  );
}

export const depthwiseConv2dNativeBackpropFilterConfig: tf.KernelConfig = {
  kernelName: tf.DepthwiseConv2dNativeBackpropFilter,
  backendName: 'wasm',
  kernelFunc: depthwiseConv2dNativeBackpropFilter as tf.KernelFunc,
};
