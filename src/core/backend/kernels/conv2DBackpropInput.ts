/**
 * Conv2DBackpropInput for the wasm backend through one forward convolution: the stock kernel is a
 * plain loop several times slower than the forward conv. dy is spread by the stride (zeros in
 * between), bordered, and convolved (stride 1, valid) with the filter rotated by 180° and its
 * in/out channels swapped — the transposed convolution written as a direct one, which the wasm
 * backend runs through XNNPACK.
 */
import * as tf from '@tensorflow/tfjs';
import { asBackend, requireInput, runComposed, shape4 } from './composed.ts';
import { convWindowGeometry, spreadForTransposedConv, toChannelsFirst, toChannelsLast, type ConvWindowAttrs } from './spatial.ts';
import type { WindowGeometry } from './spatial.ts';

/**
 * Input gradient of an NHWC conv2d: dy [B, outH, outW, outC], filter [fh, fw, inC, outC]
 * → dx [B, inH, inW, inC]. Honours strides, any padding and (when set) dilations.
 */
export function conv2dInputGradient(dy: tf.Tensor4D, filter: tf.Tensor4D, g: WindowGeometry): tf.Tensor4D {
  const spread = spreadForTransposedConv(dy, g);
  const rotated = tf.transpose(tf.reverse(filter, [0, 1]), [0, 1, 3, 2]) as tf.Tensor4D;
  return tf.conv2d(spread, rotated, 1, 'valid', 'NHWC', [g.dilationHeight, g.dilationWidth]);
}

function conv2DBackpropInput({ inputs, backend, attrs }: Parameters<tf.KernelFunc>[0]): tf.TensorInfo {
  const dy = requireInput(inputs, 'dy', 'Conv2DBackpropInput');
  const filter = requireInput(inputs, 'filter', 'Conv2DBackpropInput');
  const a = (attrs ?? {}) as unknown as tf.Conv2DBackpropInputAttrs & ConvWindowAttrs;
  const dataFormat = tf.backend_util.convertConv2DDataFormat(a.dataFormat ?? 'NHWC');
  const g = convWindowGeometry([...a.inputShape], shape4(filter, 'filter'), a, false, dataFormat);
  return runComposed(asBackend(backend), [dy, filter], (dyT, filterT) => {
    const channelsFirst = dataFormat === 'channelsFirst';
    const dy4 = channelsFirst ? toChannelsLast(dyT as tf.Tensor4D) : (dyT as tf.Tensor4D);
    const dx = conv2dInputGradient(dy4, filterT as tf.Tensor4D, g);
    return channelsFirst ? toChannelsFirst(dx) : dx;
  });
}

export const conv2DBackpropInputConfig: tf.KernelConfig = {
  kernelName: tf.Conv2DBackpropInput,
  backendName: 'wasm',
  kernelFunc: conv2DBackpropInput as tf.KernelFunc,
};
