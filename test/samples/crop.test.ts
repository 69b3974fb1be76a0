/**
 * The 'crop' resize mode: the largest centred region with the model's aspect ratio, then bilinear
 * resizing. Checked against boxes and pixels computed by hand, and against tf.slice followed by
 * tf.image.resizeBilinear(…, alignCorners = false, halfPixelCenters = true) on the tfjs cpu backend.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { useBackend } from '../helpers/backend.ts';
import { compareArrays } from '../helpers/close.ts';
import { createRng } from '../../src/core/random/rng.ts';
import { centreCropBox, cropImage, isResizeMode } from '../../src/core/samples/crop.ts';
import { prepareImage } from '../../src/core/samples/resize.ts';
import { buildSampleSet } from '../../src/core/samples/buildSampleSet.ts';
import { decodeImageNode } from '../../src/cli/decodeImageNode.ts';
import { encodePngRgba } from './fixtures.ts';

/** RGBA bytes of a height × width image from a per-pixel [r, g, b] function (opaque). */
function rgbaOf(height: number, width: number, colour: (y: number, x: number) => readonly [number, number, number]): Uint8Array {
  const out = new Uint8Array(height * width * 4);
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) out.set([...colour(y, x), 255], (y * width + x) * 4);
  return out;
}

/** Channel k of an HWC float array with `channels` channels. */
const channel = (data: Float32Array, channels: number, k: number): number[] => Array.from(data).filter((_, i) => i % channels === k);

describe('centreCropBox: boxes computed by hand', () => {
  const cases: { src: [number, number]; model: [number, number]; box: { top: number; left: number; height: number; width: number }; why: string }[] = [
    // Wider than 1:1 by 4 columns: keep 4 (= 4·2/2), offset (8 − 4)/2 = 2.
    { src: [4, 8], model: [2, 2], box: { top: 0, left: 2, height: 4, width: 4 }, why: 'even leftover' },
    // Keep 5 of 8 columns; leftover 3 → offset floor(3/2) = 1, so the extra column is cut on the right.
    { src: [5, 8], model: [3, 3], box: { top: 0, left: 1, height: 5, width: 5 }, why: 'odd leftover' },
    // 5×5 to 3 tall × 2 wide: width 5·2/3 = 3.33 → 3; offset floor(2/2) = 1.
    { src: [5, 5], model: [3, 2], box: { top: 0, left: 1, height: 5, width: 3 }, why: 'width rounded down' },
    // 7×7 to 2 tall × 3 wide: height 7·2/3 = 4.67 → 5; offset floor(2/2) = 1.
    { src: [7, 7], model: [2, 3], box: { top: 1, left: 0, height: 5, width: 7 }, why: 'height rounded up' },
    // 3×4 to 2 tall × 1 wide: width 3·1/2 = 1.5 → 2 (halves up); offset floor(2/2) = 1.
    { src: [3, 4], model: [2, 1], box: { top: 0, left: 1, height: 3, width: 2 }, why: 'half rounded up' },
    // 1×100 to 10 tall × 1 wide: width 0.1 → 0, kept at least 1; offset floor(99/2) = 49.
    { src: [1, 100], model: [10, 1], box: { top: 0, left: 49, height: 1, width: 1 }, why: 'at least one pixel' },
    // 6×9 is exactly 2:3: nothing is cut.
    { src: [6, 9], model: [4, 6], box: { top: 0, left: 0, height: 6, width: 9 }, why: 'same aspect ratio' },
  ];
  for (const c of cases) {
    it(`${c.src[0]}×${c.src[1]} → ${c.model[0]}×${c.model[1]} (${c.why})`, () => {
      expect(centreCropBox(c.src[0], c.src[1], c.model[0], c.model[1])).toEqual(c.box);
    });
  }

  it('refuses sizes that are not positive integers', () => {
    expect(() => centreCropBox(0, 4, 2, 2)).toThrow('crop: source height must be a positive integer, got 0');
    expect(() => centreCropBox(4, 4, 2.5, 2)).toThrow('crop: height must be a positive integer, got 2.5');
  });

  it('knows its modes', () => {
    expect(['stretch', 'crop', 'fit', 1].map(isResizeMode)).toEqual([true, true, false, false]);
  });
});

describe('prepareImage with resize = crop', () => {
  // 4×8: columns 0–1 red, 6–7 blue, the middle four green with a different level per pixel.
  const green = (y: number, x: number): number => 15 * (y * 4 + (x - 2)) + 10; // 10 … 235: fits a byte
  const rgba = rgbaOf(4, 8, (y, x) => (x < 2 ? [255, 0, 0] : x >= 6 ? [0, 0, 255] : [0, green(y, x), 0]));

  it('cropped to a square input keeps only the middle: no red, no blue, green 2×2 block means', () => {
    const out = prepareImage({ width: 8, height: 4, rgba }, 2, 2, 3, 'crop');
    // Closed form: the box is columns 2–5 (see above); halving 4×4 → 2×2 with half-pixel centres
    // samples each output at the centre of a 2×2 block, i.e. its mean.
    expect(channel(out, 3, 0)).toEqual([0, 0, 0, 0]);
    expect(channel(out, 3, 2)).toEqual([0, 0, 0, 0]);
    const mean = (y0: number, x0: number): number => (green(y0, x0) + green(y0, x0 + 1) + green(y0 + 1, x0) + green(y0 + 1, x0 + 1)) / 4 / 255;
    const expected = [mean(0, 2), mean(0, 4), mean(2, 2), mean(2, 4)];
    expect(compareArrays(channel(out, 3, 1), expected).maxAbs).toBeLessThanOrEqual(1e-6);
  });

  it('stretching the same image instead mixes the red and blue quarters in (the contrast case)', () => {
    const out = prepareImage({ width: 8, height: 4, rgba }, 2, 2, 3);
    // Closed form: output column 0 samples source column (0 + 0.5)·8/2 − 0.5 = 1.5, halfway between red column 1 and green column 2.
    expect(channel(out, 3, 0)).toEqual([0.5, 0, 0.5, 0]);
    expect(channel(out, 3, 2)).toEqual([0, 0.5, 0, 0.5]);
  });

  it('an image already of the model\'s aspect ratio gives exactly the stretch result', () => {
    const values = createRng(11).uniformArray(6 * 9 * 3, 0, 255);
    const image = { width: 9, height: 6, rgba: rgbaOf(6, 9, (y, x) => [0, 1, 2].map((k) => Math.round(values[(y * 9 + x) * 3 + k]!)) as [number, number, number]) };
    for (const channels of [1, 3] as const) {
      expect(prepareImage(image, 4, 6, channels, 'crop')).toEqual(prepareImage(image, 4, 6, channels, 'stretch'));
    }
  });

  it('odd leftover: a 3×6 image to a 3×3 input keeps columns 1–3 (the extra column is cut on the right)', () => {
    // Value of pixel (y, x) is 10·x + y grey levels; the kept box is computed by hand: width 3, offset floor(3/2) = 1.
    const image = { width: 6, height: 3, rgba: rgbaOf(3, 6, (y, x) => [10 * x + y, 10 * x + y, 10 * x + y]) };
    const out = prepareImage(image, 3, 3, 3, 'crop');
    const expected = [0, 1, 2].flatMap((y) => [1, 2, 3].map((x) => (10 * x + y) / 255));
    expect(channel(out, 3, 0)).toEqual(Array.from(Float32Array.from(expected)));
  });

  it('cropImage copies the box row by row for any channel count', () => {
    const data = Float32Array.from({ length: 3 * 4 * 2 }, (_, i) => i);
    const out = cropImage({ height: 3, width: 4, channels: 2, data }, { top: 1, left: 1, height: 2, width: 2 });
    // Closed form: pixel (y, x) holds values 2·(4y + x) and 2·(4y + x) + 1.
    expect(Array.from(out.data)).toEqual([10, 11, 12, 13, 18, 19, 20, 21]);
    expect(() => cropImage({ height: 3, width: 4, channels: 2, data }, { top: 2, left: 0, height: 2, width: 4 })).toThrow(/outside the 4×3 image/);
  });
});

describe('crop then resize against tf.slice + tf.image.resizeBilinear (cpu backend, halfPixelCenters)', () => {
  beforeAll(async () => {
    await useBackend('cpu');
  });
  const shapes: { src: [number, number]; model: [number, number]; begin: [number, number]; size: [number, number] }[] = [
    // Boxes by hand: 7×11 at 1:1 keeps 7 columns from floor(4/2) = 2; 13×5 at 3:4 keeps round(5·3/4 = 3.75) = 4 rows from floor(9/2) = 4.
    { src: [7, 11], model: [4, 4], begin: [0, 2], size: [7, 7] },
    { src: [13, 5], model: [30, 40], begin: [4, 0], size: [4, 5] },
  ];
  for (const { src, model, begin, size } of shapes) {
    it(`${src[0]}×${src[1]} → ${model[0]}×${model[1]}`, () => {
      const [h, w] = src;
      const bytes = Array.from(createRng(h * 100 + w).uniformArray(h * w * 3, 0, 255), Math.round);
      const rgba = rgbaOf(h, w, (y, x) => [bytes[(y * w + x) * 3]!, bytes[(y * w + x) * 3 + 1]!, bytes[(y * w + x) * 3 + 2]!]);
      const ours = prepareImage({ width: w, height: h, rgba }, model[0], model[1], 3, 'crop');
      // Reference library: tfjs 4.22 cpu kernels Slice and ResizeBilinear (alignCorners = false, halfPixelCenters = true).
      const reference = tf.tidy(() => {
        const x = tf.tensor4d(bytes.map((v) => v / 255), [1, h, w, 3]);
        const box = tf.slice(x, [0, begin[0], begin[1], 0], [1, size[0], size[1], 3]);
        return tf.image.resizeBilinear(box, model, false, true).dataSync();
      });
      expect(ours.length).toBe(model[0] * model[1] * 3);
      expect(compareArrays(ours, reference).maxAbs).toBeLessThanOrEqual(1e-5);
    });
  }
});

describe('buildSampleSet resize option', () => {
  const rgba = rgbaOf(4, 8, (y, x) => (x < 2 ? [255, 0, 0] : x >= 6 ? [0, 0, 255] : [0, 30 * y + 10 * x, 0]));
  const files = [{ name: 'set/a/one.png', bytes: encodePngRgba(8, 4, rgba) }];
  const base = { height: 2, width: 2, channels: 3 as const, decoder: decodeImageNode };

  it('crop reads each image as prepareImage does; no option is stretch', async () => {
    const cropped = await buildSampleSet(files, { ...base, resize: 'crop' });
    expect(cropped.set.pixels).toEqual(prepareImage({ width: 8, height: 4, rgba }, 2, 2, 3, 'crop'));
    // The middle only: the red channel is zero everywhere (see the closed form above).
    expect(channel(cropped.set.pixels, 3, 0)).toEqual([0, 0, 0, 0]);
    const plain = await buildSampleSet(files, base);
    expect(plain.set.pixels).toEqual((await buildSampleSet(files, { ...base, resize: 'stretch' })).set.pixels);
    expect(plain.set.pixels).toEqual(prepareImage({ width: 8, height: 4, rgba }, 2, 2, 3));
  });

  it('refuses an unknown mode with one line', async () => {
    await expect(buildSampleSet(files, { ...base, resize: 'squash' as never })).rejects.toThrow(/^resize must be stretch or crop, got squash$/);
  });
});
