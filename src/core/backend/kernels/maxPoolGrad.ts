/**
 * MaxPoolGrad for the wasm backend. The stock tfjs 4.22 kernel starts each window's running
 * maximum at +1.2e-38 instead of −∞, so a window whose values are all ≤ 0 sends its gradient
 * nowhere (silently wrong after batch-norm, or before a relu). This one routes each window's dy
 * to the window's arg-max, scanning like the tfjs cpu backend (maxPoolPositions): running maximum
 * from −∞, strict `>`, rows then columns, so ties go to the first maximum in row-major order,
 * NaNs are skipped and a window with no value above −∞ passes nothing.
 *
 * A direct loop over the data rather than composed ops: on wasm, Slice copies its whole input and
 * broadcasting comparisons are slow, so every composed version measured 2–3× slower than the
 * stock kernel, while this loop is one pass over the windows.
 */
import * as tf from '@tensorflow/tfjs';
import { asBackend, requireInput, shape4 } from './composed.ts';
import { windowGeometry } from './spatial.ts';
import type { WindowGeometry } from './spatial.ts';

/**
 * dx for an NHWC max-pool: x and dy flat (NHWC), channels C, dy laid out [B, outH, outW, C].
 * Overlapping windows add up in float32 (the cpu kernel sums in float64: equal to rounding).
 */
export function maxPoolInputGradientValues(x: Float32Array, dy: Float32Array, g: WindowGeometry, channels: number): Float32Array {
  const dx = new Float32Array(x.length);
  const best = new Float32Array(channels);
  const where = new Int32Array(channels);
  const { batch, inHeight, inWidth, outHeight, outWidth, filterHeight, filterWidth } = g;
  const { strideHeight, strideWidth, dilationHeight, dilationWidth, padTop, padLeft } = g;
  const rowStride = inWidth * channels;
  let outBase = 0;
  for (let b = 0; b < batch; b++) {
    const batchBase = b * inHeight * rowStride;
    for (let oy = 0; oy < outHeight; oy++) {
      const rowCorner = oy * strideHeight - padTop;
      for (let ox = 0; ox < outWidth; ox++, outBase += channels) {
        const colCorner = ox * strideWidth - padLeft;
        let fresh = true;
        for (let ky = 0; ky < filterHeight; ky++) {
          const row = rowCorner + ky * dilationHeight;
          if (row < 0 || row >= inHeight) continue;
          for (let kx = 0; kx < filterWidth; kx++) {
            const col = colCorner + kx * dilationWidth;
            if (col < 0 || col >= inWidth) continue;
            const base = batchBase + row * rowStride + col * channels;
            // Running maximum from −∞ with strict `>`: the first maximum wins, NaN never does.
            for (let c = 0; c < channels; c++) {
              const v = x[base + c]!;
              const wins = fresh ? v > -Infinity : v > best[c]!;
              best[c] = wins ? v : fresh ? -Infinity : best[c]!;
              where[c] = wins ? base + c : fresh ? -1 : where[c]!;
            }
            fresh = false;
          }
        }
        if (fresh) continue;
        for (let c = 0; c < channels; c++) {
          const at = where[c]!;
          if (at >= 0) dx[at] = dx[at]! + dy[outBase + c]!;
        }
      }
    }
  }
  return dx;
}

/** A copy of a float32 TensorInfo's values (no reference is taken). */
function readFloats(backend: tf.KernelBackend, info: tf.TensorInfo, what: string): Float32Array {
  if (info.dtype !== 'float32') throw new Error(`MaxPoolGrad: ${what} must be float32, got ${info.dtype}`);
  return backend.readSync(info.dataId) as Float32Array;
}

function maxPoolGrad({ inputs, backend, attrs }: Parameters<tf.KernelFunc>[0]): tf.TensorInfo {
  const dy = requireInput(inputs, 'dy', 'MaxPoolGrad');
  const input = requireInput(inputs, 'input', 'MaxPoolGrad');
  const a = (attrs ?? {}) as unknown as tf.MaxPoolGradAttrs;
  const inShape = shape4(input, 'input');
  const g = windowGeometry(tf.backend_util.computePool2DInfo(inShape, a.filterSize, a.strides, 1, a.pad, a.dimRoundingMode));
  const kernelBackend = asBackend(backend);
  if (dy.shape.join() !== [g.batch, g.outHeight, g.outWidth, inShape[3]].join()) {
    throw new Error(`MaxPoolGrad: dy has shape [${dy.shape.join(', ')}], the window geometry gives [${[g.batch, g.outHeight, g.outWidth, inShape[3]].join(', ')}]`);
  }
  const dx = maxPoolInputGradientValues(readFloats(kernelBackend, input, 'input'), readFloats(kernelBackend, dy, 'dy'), g, inShape[3]);
  // write() stores a copy with one reference, which the engine takes over.
  return { dataId: kernelBackend.write(dx, inShape, 'float32'), shape: inShape, dtype: 'float32' };
}

export const maxPoolGradConfig: tf.KernelConfig = {
  kernelName: tf.MaxPoolGrad,
  backendName: 'wasm',
  kernelFunc: maxPoolGrad as tf.KernelFunc,
};
