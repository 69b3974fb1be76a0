/**
 * Reference gradients for dilated convolutions, which the tfjs cpu backend's backprop kernels do
 * not handle (Conv2DBackprop* fix dilation to 1; DepthwiseConv2dNativeBackprop* take it but their
 * loops ignore it). A gradient is the adjoint of the forward map, so it follows from the tfjs cpu
 * backend's forward conv2d / depthwiseConv2d (which do support dilations) applied to basis inputs
 * and basis filters: every element is checked, not a random projection.
 */
import * as tf from '@tensorflow/tfjs';
import { switchBackend, type HostTensor } from './harness.ts';
import type { WindowCase } from './cases.ts';

export type ConvKind = 'conv' | 'depthwise';

function forwardCpu(kind: ConvKind, x: tf.Tensor4D, filter: tf.Tensor4D, c: WindowCase): tf.Tensor4D {
  return kind === 'conv'
    ? tf.conv2d(x, filter, c.strides, c.pad, 'NHWC', c.dilations, c.dimRoundingMode)
    : tf.depthwiseConv2d(x, filter, c.strides, c.pad, 'NHWC', c.dilations, c.dimRoundingMode);
}

/** dx = Aᵀ·dy, with column i of A = forward(e_i) for every basis image e_i (tfjs cpu). */
export async function inputGradientByAdjoint(kind: ConvKind, c: WindowCase, dy: HostTensor, filter: HostTensor): Promise<HostTensor> {
  await switchBackend('cpu');
  return tf.tidy(() => {
    const [batch, h, w, ch] = c.inShape;
    const n = h * w * ch;
    const basis = tf.reshape(tf.eye(n), [n, h, w, ch]) as tf.Tensor4D;
    const columns = tf.reshape(forwardCpu(kind, basis, tf.tensor4d(filter.values, c.filterShape), c), [n, -1]);
    const dyFlat = tf.reshape(tf.tensor(dy.values, dy.shape), [batch, -1]);
    const dx = tf.matMul(dyFlat, columns, false, true);
    return { shape: [batch, h, w, ch], values: dx.dataSync() as Float32Array };
  });
}

/** dW_j = ⟨dy, forward(x, e_j)⟩ for every basis filter e_j (tfjs cpu). */
export async function filterGradientByAdjoint(kind: ConvKind, c: WindowCase, x: HostTensor, dy: HostTensor): Promise<HostTensor> {
  await switchBackend('cpu');
  const size = c.filterShape.reduce((a, b) => a * b, 1);
  const values = new Float32Array(size);
  tf.tidy(() => {
    const input = tf.tensor4d(x.values, c.inShape);
    const dyT = tf.tensor(dy.values, dy.shape);
    for (let j = 0; j < size; j++) {
      values[j] = tf.tidy(() => {
        const basis = tf.reshape(tf.oneHot(tf.tensor1d([j], 'int32'), size), c.filterShape) as tf.Tensor4D;
        return tf.sum(tf.mul(forwardCpu(kind, input, tf.cast(basis, 'float32'), c), dyT)).dataSync()[0]!;
      });
    }
  });
  return { shape: [...c.filterShape], values };
}
