/**
 * MaxPoolGrad for the wasm backend. The stock tfjs 4.22 kernel starts each window's running
 * maximum at +1.2e-38 instead of −∞, so a window whose values are all ≤ 0 sends its gradient
 * nowhere (silently wrong after batch-norm, or before a relu). This one routes each window's dy
 * to the window's arg-max; on ties the first maximum in row-major window order wins, as in the
 * tfjs cpu backend (maxPoolPositions: strict `>` while scanning rows, then columns).
 *
 * With tensors: read every window tap of the (−∞-padded) input, take the maximum, mark the first
 * tap equal to it, and scatter dy back through those marks.
 * Known difference from the cpu kernel: a window whose values are all −∞ or NaN routes its
 * gradient to its first cell (cpu: nowhere), and a NaN elsewhere in a window makes that window's
 * gradient vanish (cpu: skips the NaN).
 */
import * as tf from '@tensorflow/tfjs';
import { asBackend, requireInput, runComposed, shape4 } from './composed.ts';
import { windowGeometry } from './spatial.ts';
import type { WindowGeometry } from './spatial.ts';
import { extractTaps, scatterTaps } from './taps.ts';

/** dy routed to the first arg-max of each window: one [B, outH, outW, C] map per tap, row-major. */
function routeToFirstMaximum(x: tf.Tensor4D, dy: tf.Tensor4D, g: WindowGeometry): tf.Tensor4D[][] {
  const taps = extractTaps(x, g, -Infinity);
  const flat = taps.flat();
  const maximum = flat.slice(1).reduce<tf.Tensor4D>((m, t) => tf.maximum(m, t), flat[0]!);
  let unclaimed: tf.Tensor4D | null = null;
  return taps.map((row) =>
    row.map((tap) => {
      const isMaximum = tf.equal(tap, maximum);
      // First maximum: equal to the window maximum and no earlier tap claimed the window.
      const first = unclaimed === null ? isMaximum : tf.logicalAnd(isMaximum, unclaimed);
      unclaimed = unclaimed === null ? tf.logicalNot(isMaximum) : tf.logicalAnd(unclaimed, tf.logicalNot(isMaximum));
      return tf.where(first, dy, tf.zerosLike(dy)) as tf.Tensor4D;
    }),
  );
}

/** Gradient of an NHWC max-pool with respect to its input x, given dy [B, outH, outW, C]. */
export function maxPoolInputGradient(x: tf.Tensor4D, dy: tf.Tensor4D, g: WindowGeometry): tf.Tensor4D {
  return scatterTaps(routeToFirstMaximum(x, dy, g), g);
}

function maxPoolGrad({ inputs, backend, attrs }: Parameters<tf.KernelFunc>[0]): tf.TensorInfo {
  const dy = requireInput(inputs, 'dy', 'MaxPoolGrad');
  const input = requireInput(inputs, 'input', 'MaxPoolGrad');
  const a = (attrs ?? {}) as unknown as tf.MaxPoolGradAttrs;
  const info = tf.backend_util.computePool2DInfo(shape4(input, 'input'), a.filterSize, a.strides, 1, a.pad, a.dimRoundingMode);
  const g = windowGeometry(info);
  return runComposed(asBackend(backend), [input, dy], (xT, dyT) => maxPoolInputGradient(xT as tf.Tensor4D, dyT as tf.Tensor4D, g));
}

export const maxPoolGradConfig: tf.KernelConfig = {
  kernelName: tf.MaxPoolGrad,
  backendName: 'wasm',
  kernelFunc: maxPoolGrad as tf.KernelFunc,
};
