/**
 * Conv2DBackpropFilter for the wasm backend, which has none (tfjs 4.22): any fused conv2d with a
 * linear activation (e.g. conv → batch-norm) computes it inside its gradient, even when only the
 * input gradient is wanted. Written as im2col: the window taps of the padded input form a patch
 * matrix (taps.ts), and one matrix product with dy gives the filter gradient.
 */
import * as tf from '@tensorflow/tfjs';
import { asBackend, requireInput, runComposed, shape4 } from './composed.ts';
import { convWindowGeometry, toChannelsLast, type ConvWindowAttrs } from './spatial.ts';
import { extractTaps, tapCount } from './taps.ts';
import type { WindowGeometry } from './spatial.ts';

/**
 * Filter gradient of an NHWC conv2d: x [B, inH, inW, inC], dy [B, outH, outW, outC]
 * → dW [fh, fw, inC, outC]. Honours strides, any padding and (when set) dilations.
 */
export function conv2dFilterGradient(x: tf.Tensor4D, dy: tf.Tensor4D, g: WindowGeometry): tf.Tensor4D {
  const inChannels = x.shape[3];
  const outChannels = dy.shape[3];
  const rows = g.batch * g.outHeight * g.outWidth;
  // Patch matrix [rows, C·taps] (column c·taps + t), then [C·taps, outC] = patchesᵀ · dy.
  const patches = tf.reshape(extractTaps(x, g, 0), [rows, inChannels * tapCount(g)]);
  const product = tf.matMul(patches, tf.reshape(dy, [rows, outChannels]), true, false);
  const byChannel = tf.reshape(product, [inChannels, g.filterHeight, g.filterWidth, outChannels]);
  return tf.transpose(byChannel, [1, 2, 0, 3]) as tf.Tensor4D;
}

function conv2DBackpropFilter({ inputs, backend, attrs }: Parameters<tf.KernelFunc>[0]): tf.TensorInfo {
  const x = requireInput(inputs, 'x', 'Conv2DBackpropFilter');
  const dy = requireInput(inputs, 'dy', 'Conv2DBackpropFilter');
  const a = (attrs ?? {}) as unknown as tf.Conv2DBackpropFilterAttrs & ConvWindowAttrs;
  const dataFormat = tf.backend_util.convertConv2DDataFormat(a.dataFormat ?? 'NHWC');
  const g = convWindowGeometry(shape4(x, 'x'), [...a.filterShape], a, false, dataFormat);
  return runComposed(asBackend(backend), [x, dy], (xT, dyT) => {
    const channelsFirst = dataFormat === 'channelsFirst';
    const x4 = channelsFirst ? toChannelsLast(xT as tf.Tensor4D) : (xT as tf.Tensor4D);
    const dy4 = channelsFirst ? toChannelsLast(dyT as tf.Tensor4D) : (dyT as tf.Tensor4D);
    return conv2dFilterGradient(x4, dy4, g);
  });
}

export const conv2DBackpropFilterConfig: tf.KernelConfig = {
  kernelName: tf.Conv2DBackpropFilter,
  backendName: 'wasm',
  kernelFunc: conv2DBackpropFilter as tf.KernelFunc,
};
