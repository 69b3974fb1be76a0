/**
 * Turning float pixel buffers into displayable RGBA: images as they are, model inputs stretched to
 * their own range, and perturbations on a diverging colour scale.
 */

export interface ImageSize {
  readonly height: number;
  readonly width: number;
  readonly channels: number;
}

/** The diverging scale: negative end, middle, positive end (sRGB 0–255). Our own choice of colours. */
export const DIVERGING = {
  negative: [38, 98, 160],
  middle: [247, 245, 240],
  positive: [196, 84, 32],
} as const;

function clampByte(v: number): number {
  return Math.max(0, Math.min(255, Math.round(v)));
}

/** RGBA bytes of an NHWC image x ∈ [0,1] with 1 or 3 channels. */
export function pixelsToRgba(pixels: Float32Array, size: ImageSize): Uint8ClampedArray<ArrayBuffer> {
  const { height, width, channels } = size;
  const out = new Uint8ClampedArray(height * width * 4);
  for (let p = 0; p < height * width; p++) {
    for (let c = 0; c < 3; c++) out[p * 4 + c] = clampByte(pixels[p * channels + (channels === 1 ? 0 : c)]! * 255);
    out[p * 4 + 3] = 255;
  }
  return out;
}

/**
 * RGBA of a model input, linearly stretched from [min, max] to [0, 255] so that any range
 * (0–255, −1–1, normalised) can be looked at. NCHW inputs are read channel-first.
 */
export function modelInputToRgba(values: Float32Array, size: ImageSize, layout: 'nhwc' | 'nchw', min: number, max: number): Uint8ClampedArray<ArrayBuffer> {
  const { height, width, channels } = size;
  const span = max - min || 1;
  const out = new Uint8ClampedArray(height * width * 4);
  for (let p = 0; p < height * width; p++) {
    for (let c = 0; c < 3; c++) {
      const ch = channels === 1 ? 0 : c;
      const v = layout === 'nhwc' ? values[p * channels + ch]! : values[ch * height * width + p]!;
      out[p * 4 + c] = clampByte(((v - min) / span) * 255);
    }
    out[p * 4 + 3] = 255;
  }
  return out;
}

/** Colour of t ∈ [−1, 1] on the diverging scale (0 is the middle colour). */
export function divergingColour(t: number): [number, number, number] {
  const u = Math.max(-1, Math.min(1, t));
  const end = u < 0 ? DIVERGING.negative : DIVERGING.positive;
  const a = Math.abs(u);
  return [0, 1, 2].map((i) => clampByte(DIVERGING.middle[i]! + (end[i]! - DIVERGING.middle[i]!) * a)) as [number, number, number];
}

/**
 * The perturbation δ = adversarial − original, averaged over colour channels, on the diverging
 * scale with ±scale at the two ends. `scale` is the largest |mean δ| of the image (so faint
 * perturbations stay visible); it is returned so the screen can print it.
 */
export function perturbationToRgba(original: Float32Array, adversarial: Float32Array, size: ImageSize): { rgba: Uint8ClampedArray<ArrayBuffer>; scale: number } {
  const { height, width, channels } = size;
  const mean = new Float32Array(height * width);
  let scale = 0;
  for (let p = 0; p < height * width; p++) {
    let sum = 0;
    for (let c = 0; c < channels; c++) sum += adversarial[p * channels + c]! - original[p * channels + c]!;
    mean[p] = sum / channels;
    scale = Math.max(scale, Math.abs(mean[p]!));
  }
  const rgba = new Uint8ClampedArray(height * width * 4);
  for (let p = 0; p < height * width; p++) {
    const [r, g, b] = divergingColour(scale > 0 ? mean[p]! / scale : 0);
    rgba.set([r, g, b, 255], p * 4);
  }
  return { rgba, scale };
}
