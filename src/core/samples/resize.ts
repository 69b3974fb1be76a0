/**
 * Image preparation in plain TypeScript on arrays (no tensors, no canvas), so a sample set has
 * the same pixels on every platform: RGBA bytes → floats in [0,1], channel conversion, an
 * optional centre crop (crop.ts) and bilinear resizing with half-pixel centres.
 */
import type { DecodedImage } from '../types.ts';
import { DEFAULT_RESIZE, regionForResize, type ResizeMode } from './crop.ts';

/** An image as floats, row-major, channels interleaved (HWC). */
export interface FloatImage {
  readonly width: number;
  readonly height: number;
  readonly channels: number;
  readonly data: Float32Array;
}

/** ITU-R BT.601 luma weights for R, G, B. */
export const LUMA_WEIGHTS = [0.299, 0.587, 0.114] as const;

/**
 * RGBA bytes → RGB floats in [0,1] (value / 255). The alpha channel is dropped without
 * compositing: a transparent pixel keeps whatever RGB the file stores for it.
 */
export function rgbaToRgb(image: DecodedImage): FloatImage {
  const { width, height, rgba } = image;
  const count = width * height;
  if (!(width > 0 && height > 0) || rgba.length !== count * 4) {
    throw new Error(`decoded image has ${rgba.length} bytes, expected ${width}×${height}×4`);
  }
  const data = new Float32Array(count * 3);
  for (let p = 0; p < count; p++) {
    data[p * 3] = rgba[p * 4]! / 255;
    data[p * 3 + 1] = rgba[p * 4 + 1]! / 255;
    data[p * 3 + 2] = rgba[p * 4 + 2]! / 255;
  }
  return { width, height, channels: 3, data };
}

/**
 * Converts between 1 and 3 channels (a 4-channel input loses its alpha first, as in rgbaToRgb):
 * gray → RGB replicates the value, RGB → gray takes the BT.601 luma 0.299 R + 0.587 G + 0.114 B.
 * Returns the input itself when it already has the wanted channel count.
 */
export function convertChannels(image: FloatImage, channels: 1 | 3): FloatImage {
  if (image.channels === channels) return image;
  const { width, height, data } = image;
  const count = width * height;
  const out = new Float32Array(count * channels);
  const src = image.channels;
  if (src === 1) {
    for (let p = 0; p < count; p++) out.fill(data[p]!, p * 3, p * 3 + 3);
  } else if (src === 3 || src === 4) {
    for (let p = 0; p < count; p++) {
      const r = data[p * src]!;
      const g = data[p * src + 1]!;
      const b = data[p * src + 2]!;
      if (channels === 1) out[p] = clamp01(LUMA_WEIGHTS[0] * r + LUMA_WEIGHTS[1] * g + LUMA_WEIGHTS[2] * b);
      else out.set([r, g, b], p * 3);
    }
  } else {
    throw new Error(`cannot convert a ${src}-channel image to ${channels} channels`);
  }
  return { width, height, channels, data: out };
}

/** Source sample positions for one axis: the two neighbours and the weight of the second. */
interface AxisTaps {
  readonly lo: Int32Array;
  readonly hi: Int32Array;
  readonly frac: Float64Array;
}

/**
 * Half-pixel centres: output pixel d covers source coordinate (d + 0.5)·in/out − 0.5, clamped
 * to the outermost source pixels (tf.image.resizeBilinear with halfPixelCenters = true).
 */
function axisTaps(inSize: number, outSize: number): AxisTaps {
  const lo = new Int32Array(outSize);
  const hi = new Int32Array(outSize);
  const frac = new Float64Array(outSize);
  const scale = inSize / outSize;
  for (let d = 0; d < outSize; d++) {
    const src = Math.min(Math.max(scale * (d + 0.5) - 0.5, 0), inSize - 1);
    const i0 = Math.floor(src);
    lo[d] = i0;
    hi[d] = Math.min(i0 + 1, inSize - 1);
    frac[d] = src - i0;
  }
  return { lo, hi, frac };
}

/**
 * Bilinear resize to height × width with half-pixel centres and no antialiasing, any channel
 * count; the same convention as tf.image.resizeBilinear(x, size, false, true) and PIL's
 * bilinear filter without its downscaling support widening.
 */
export function resizeBilinear(image: FloatImage, height: number, width: number): FloatImage {
  if (!(Number.isInteger(height) && Number.isInteger(width) && height > 0 && width > 0)) {
    throw new Error(`resize target must be positive integers, got ${height}×${width}`);
  }
  const { channels: c, data } = image;
  if (image.height === height && image.width === width) return { ...image, data: data.slice() };
  const rows = axisTaps(image.height, height);
  const cols = axisTaps(image.width, width);
  const out = new Float32Array(height * width * c);
  const stride = image.width * c;
  let o = 0;
  for (let y = 0; y < height; y++) {
    const top = rows.lo[y]! * stride;
    const bottom = rows.hi[y]! * stride;
    const fy = rows.frac[y]!;
    for (let x = 0; x < width; x++) {
      const left = cols.lo[x]! * c;
      const right = cols.hi[x]! * c;
      const fx = cols.frac[x]!;
      for (let k = 0; k < c; k++) {
        const t = data[top + left + k]! + (data[top + right + k]! - data[top + left + k]!) * fx;
        const b = data[bottom + left + k]! + (data[bottom + right + k]! - data[bottom + left + k]!) * fx;
        out[o++] = t + (b - t) * fy;
      }
    }
  }
  return { width, height, channels: c, data: out };
}

/**
 * A decoded file → the model's input pixels: H·W·C floats in [0,1], alpha dropped. `resize`
 * 'stretch' (the default) resizes the whole image; 'crop' resizes only its largest centred region
 * with the model's aspect ratio (crop.ts centreCropBox). For one channel the luma is taken before
 * resizing (both steps are linear, so the order only changes float rounding, and resizing one
 * channel is cheaper than three).
 */
export function prepareImage(decoded: DecodedImage, height: number, width: number, channels: 1 | 3, resize: ResizeMode = DEFAULT_RESIZE): Float32Array {
  const rgb = regionForResize(rgbaToRgb(decoded), height, width, resize);
  const image = channels === 1 ? resizeBilinear(convertChannels(rgb, 1), height, width) : resizeBilinear(rgb, height, width);
  return image.data;
}

function clamp01(v: number): number {
  return v < 0 ? 0 : v > 1 ? 1 : v;
}
