/**
 * Resize modes: how an image of any shape becomes the model's H×W. 'stretch' resizes the whole
 * image (its proportions change when they differ from the model's); 'crop' first cuts the largest
 * centred region with the model's aspect ratio, then resizes that, so proportions are kept and the
 * borders of the longer side are lost.
 */
import type { FloatImage } from './resize.ts';

/** 'stretch': the whole image, resized to H×W. 'crop': the centred H:W region, resized to H×W. */
export type ResizeMode = 'stretch' | 'crop';

/** Every resize mode, the default first. */
export const RESIZE_MODES: readonly ResizeMode[] = ['stretch', 'crop'];

/** The mode used when none is given: the behaviour of every Brink version before resize modes. */
export const DEFAULT_RESIZE: ResizeMode = 'stretch';

/** Whether a value is one of RESIZE_MODES. */
export function isResizeMode(value: unknown): value is ResizeMode {
  return typeof value === 'string' && (RESIZE_MODES as readonly string[]).includes(value);
}

/** A rectangle of whole pixels inside an image. */
export interface PixelBox {
  readonly top: number;
  readonly left: number;
  readonly height: number;
  readonly width: number;
}

/**
 * The largest centred region of a srcHeight × srcWidth image whose aspect ratio is height : width,
 * in whole pixels. Only the longer side (relative to the target ratio) is cut:
 * - its kept length is srcOther · ratio rounded to the nearest integer, halves up, and at least 1;
 * - the pixels left over are split with the smaller half before the region (top or left) and the
 *   larger half after it, i.e. the offset is floor(leftover / 2).
 * An image that already has the target ratio exactly is kept whole.
 */
export function centreCropBox(srcHeight: number, srcWidth: number, height: number, width: number): PixelBox {
  for (const [name, v] of [['source height', srcHeight], ['source width', srcWidth], ['height', height], ['width', width]] as const) {
    if (!(Number.isInteger(v) && v > 0)) throw new Error(`crop: ${name} must be a positive integer, got ${v}`);
  }
  // Integer comparison of srcWidth/srcHeight against width/height (no float error on equal ratios).
  if (srcWidth * height > srcHeight * width) {
    const kept = Math.max(1, roundHalfUp(srcHeight * width, height));
    return { top: 0, left: Math.floor((srcWidth - kept) / 2), height: srcHeight, width: kept };
  }
  const kept = Math.max(1, roundHalfUp(srcWidth * height, width));
  return { top: Math.floor((srcHeight - kept) / 2), left: 0, height: kept, width: srcWidth };
}

/** numerator / denominator rounded to the nearest integer, halves up (exact for positive integers). */
function roundHalfUp(numerator: number, denominator: number): number {
  return Math.floor((2 * numerator + denominator) / (2 * denominator));
}

/** The pixels of `box` (any channel count); the image itself when the box is the whole image. */
export function cropImage(image: FloatImage, box: PixelBox): FloatImage {
  const { channels: c } = image;
  if (box.top === 0 && box.left === 0 && box.height === image.height && box.width === image.width) return image;
  if (box.top < 0 || box.left < 0 || box.top + box.height > image.height || box.left + box.width > image.width) {
    throw new Error(`crop box ${box.width}×${box.height} at (${box.left}, ${box.top}) lies outside the ${image.width}×${image.height} image`);
  }
  const out = new Float32Array(box.height * box.width * c);
  const rowLength = box.width * c;
  for (let y = 0; y < box.height; y++) {
    const start = ((box.top + y) * image.width + box.left) * c;
    out.set(image.data.subarray(start, start + rowLength), y * rowLength);
  }
  return { height: box.height, width: box.width, channels: c, data: out };
}

/** The image as the resize mode wants it before resizing to height × width: whole, or centre-cropped. */
export function regionForResize(image: FloatImage, height: number, width: number, mode: ResizeMode): FloatImage {
  if (mode === 'stretch') return image;
  return cropImage(image, centreCropBox(image.height, image.width, height, width));
}
