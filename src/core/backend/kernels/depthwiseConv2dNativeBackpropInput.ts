/**
 * DepthwiseConv2dNativeBackpropInput for the wasm backend, which has none (tfjs 4.22), so every
 * depthwise or separable model failed to give input gradients. dy is spread by the stride and
 * bordered as for a transposed convolution, then one stride-1 depthwise convolution with the
 * 180°-rotated filter (one filter per output channel c·mult + m) and a sum over the depth
 * multiplier give dx. Cost stays that of a depthwise conv (a block-diagonal dense filter would
 * multiply it by the channel count).
 */
import * as tf from '@tensorflow/tfjs';
import { asBackend, requireInput, runComposed, shape4 } from './composed.ts';
import { convWindowGeometry, spreadForTransposedConv } from './spatial.ts';
import type { WindowGeometry } from './spatial.ts';

/**
 * Input gradient of an NHWC depthwise conv: dy [B, outH, outW, inC·mult], filter
 * [fh, fw, inC, mult] → dx [B, inH, inW, inC]. Strides, any padding, dilations (stride 1).
 */
export function depthwiseInputGradient(dy: tf.Tensor4D, filter: tf.Tensor4D, g: WindowGeometry): tf.Tensor4D {
  const [fh, fw, inChannels, multiplier] = filter.shape;
  const spread = spreadForTransposedConv(dy, g);
  // Output channel c·mult + m of the forward conv is filter [.., c, m]: the row-major flattening.
  const rotated = tf.reshape(tf.reverse(filter, [0, 1]), [fh, fw, inChannels * multiplier, 1]) as tf.Tensor4D;
  const perOutputChannel = tf.depthwiseConv2d(spread, rotated, 1, 'valid', 'NHWC', [g.dilationHeight, g.dilationWidth]);
  if (multiplier === 1) return perOutputChannel;
  const [b, h, w] = perOutputChannel.shape;
  return tf.sum(tf.reshape(perOutputChannel, [b, h, w, inChannels, multiplier]), 4);
}

function depthwiseConv2dNativeBackpropInput({ inputs, backend, attrs }: Parameters<tf.KernelFunc>[0]): tf.TensorInfo {
  const dy = requireInput(inputs, 'dy', 'DepthwiseConv2dNativeBackpropInput');
  const filter = requireInput(inputs, 'filter', 'DepthwiseConv2dNativeBackpropInput');
  const a = (attrs ?? {}) as unknown as tf.DepthwiseConv2dNativeBackpropInputAttrs;
  const g = convWindowGeometry([...a.inputShape], shape4(filter, 'filter'), a, true);
  return runComposed(asBackend(backend), [dy, filter], (dyT, filterT) =>
    depthwiseInputGradient(dyT as tf.Tensor4D, filterT as tf.Tensor4D, g),
  );
}

export const depthwiseConv2dNativeBackpropInputConfig: tf.KernelConfig = {
  kernelName: tf.DepthwiseConv2dNativeBackpropInput,
  backendName: 'wasm',
  kernelFunc: depthwiseConv2dNativeBackpropInput as tf.KernelFunc,
};
