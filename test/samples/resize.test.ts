/**
 * Bilinear resizing (half-pixel centres) and channel conversion, against closed forms and against
 * tf.image.resizeBilinear(…, alignCorners = false, halfPixelCenters = true) on the tfjs cpu backend.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { useBackend } from '../helpers/backend.ts';
import { compareArrays, expectClose } from '../helpers/close.ts';
import { createRng } from '../../src/core/random/rng.ts';
import { convertChannels, prepareImage, resizeBilinear, rgbaToRgb, type FloatImage } from '../../src/core/samples/resize.ts';

function image(height: number, width: number, channels: number, values: ArrayLike<number>): FloatImage {
  return { height, width, channels, data: Float32Array.from(values) };
}

describe('bilinear resize: closed forms', () => {
  it('2×2 → 4×4 gives the hand-computed half-pixel values', () => {
    // Closed form: output d samples source (d + 0.5)·2/4 − 0.5 = −0.25, 0.25, 0.75, 1.25, clamped to [0, 1],
    // so each axis weighs the second pixel by 0, 0.25, 0.75, 1. For v(r, c) = 2r + c the result is 2R + C.
    const out = resizeBilinear(image(2, 2, 1, [0, 1, 2, 3]), 4, 4);
    expect(Array.from(out.data)).toEqual([
      0, 0.25, 0.75, 1, //
      0.5, 0.75, 1.25, 1.5, //
      1.5, 1.75, 2.25, 2.5, //
      2, 2.25, 2.75, 3,
    ]);
  });

  it('a linear ramp stays a linear ramp in the interior and clamps at the edges', () => {
    // Closed form: bilinear interpolation of v(x) = x is exact, so output d is (d + 0.5)·10/25 − 0.5
    // wherever that lies in [0, 9]; outside it the edge pixel repeats.
    const ramp = image(1, 10, 1, Array.from({ length: 10 }, (_, x) => x));
    const out = resizeBilinear(ramp, 3, 25);
    const expected = Array.from({ length: 25 }, (_, d) => Math.min(Math.max(((d + 0.5) * 10) / 25 - 0.5, 0), 9));
    for (let row = 0; row < 3; row++) expectClose(out.data.subarray(row * 25, row * 25 + 25), expected, 1e-6, 0, `row ${row}`);
  });

  it('halving the size is a 2×2 mean', () => {
    // Closed form: output d samples source 2d + 0.5, halfway between pixels 2d and 2d + 1 on both axes.
    const values = createRng(1).uniformArray(6 * 8 * 2, 0, 1);
    const out = resizeBilinear(image(6, 8, 2, values), 3, 4);
    const expected: number[] = [];
    for (let y = 0; y < 3; y++)
      for (let x = 0; x < 4; x++)
        for (let k = 0; k < 2; k++) {
          const at = (yy: number, xx: number): number => values[(yy * 8 + xx) * 2 + k]!;
          expected.push((at(2 * y, 2 * x) + at(2 * y, 2 * x + 1) + at(2 * y + 1, 2 * x) + at(2 * y + 1, 2 * x + 1)) / 4);
        }
    expectClose(out.data, expected, 1e-6, 0, '2×2 mean');
  });

  it('the same size returns the same values in a new array', () => {
    const source = image(2, 3, 1, [1, 2, 3, 4, 5, 6]);
    const out = resizeBilinear(source, 2, 3);
    expect(Array.from(out.data)).toEqual([1, 2, 3, 4, 5, 6]);
    expect(out.data).not.toBe(source.data);
  });
});

describe('bilinear resize against tf.image.resizeBilinear (cpu backend, halfPixelCenters)', () => {
  beforeAll(async () => {
    await useBackend('cpu');
  });
  const shapes: [number, number, number, number, number][] = [
    [5, 7, 3, 13, 4],
    [28, 28, 1, 32, 32],
    [32, 32, 3, 28, 28],
    [1, 1, 3, 3, 2],
    [17, 3, 2, 5, 11],
    [30, 40, 3, 224, 224],
    [224, 200, 3, 28, 28],
  ];
  for (const [h, w, c, outH, outW] of shapes) {
    it(`${h}×${w}×${c} → ${outH}×${outW}`, () => {
      const values = createRng(h * 1000 + w).uniformArray(h * w * c, 0, 1);
      const ours = resizeBilinear(image(h, w, c, values), outH, outW);
      // Reference library: tfjs 4.22 cpu kernel ResizeBilinear with alignCorners = false, halfPixelCenters = true.
      const reference = tf.tidy(() => tf.image.resizeBilinear(tf.tensor4d(values, [1, h, w, c]), [outH, outW], false, true).dataSync());
      expect(ours.data.length).toBe(outH * outW * c);
      expect(compareArrays(ours.data, reference).maxAbs).toBeLessThanOrEqual(1e-5);
    });
  }
});

describe('channel conversion', () => {
  it('gray → RGB replicates the value', () => {
    // Closed form: replication, R = G = B = gray.
    const out = convertChannels(image(1, 2, 1, [0.25, 0.75]), 3);
    expect(Array.from(out.data)).toEqual([0.25, 0.25, 0.25, 0.75, 0.75, 0.75]);
  });

  it('RGB → gray is the ITU-R BT.601 luma', () => {
    // Source: ITU-R BT.601 luma Y = 0.299 R + 0.587 G + 0.114 B (primaries alone give the weights; white gives 1).
    const rgb = [1, 0, 0, 0, 1, 0, 0, 0, 1, 1, 1, 1, 0.2, 0.4, 0.6];
    const out = convertChannels(image(1, 5, 3, rgb), 1);
    expectClose(out.data, [0.299, 0.587, 0.114, 1, 0.299 * 0.2 + 0.587 * 0.4 + 0.114 * 0.6], 1e-7, 0, 'luma');
  });

  it('RGBA bytes → RGB floats drops alpha and keeps the RGB of transparent pixels', () => {
    // Closed form: value / 255, alpha ignored.
    const out = rgbaToRgb({ width: 2, height: 1, rgba: new Uint8Array([255, 0, 51, 255, 10, 20, 30, 0]) });
    expectClose(out.data, [1, 0, 0.2, 10 / 255, 20 / 255, 30 / 255], 1e-7, 0, 'rgb');
  });

  it('prepareImage: a gray-replicated colour image resized to one channel equals the resized gray values', () => {
    // Closed form: for R = G = B = v the luma is v (weights sum to 1), and resizing commutes with it.
    const gray = createRng(7).uniformArray(4 * 6, 0, 1);
    const bytes = Array.from(gray, (v) => Math.round(v * 255));
    const rgba = new Uint8Array(bytes.flatMap((v) => [v, v, v, 255]));
    const ours = prepareImage({ width: 6, height: 4, rgba }, 3, 5, 1);
    const expected = resizeBilinear(image(4, 6, 1, bytes.map((v) => v / 255)), 3, 5).data;
    expectClose(ours, expected, 1e-6, 0, 'gray path');
    const asRgb = prepareImage({ width: 6, height: 4, rgba }, 3, 5, 3);
    expectClose(asRgb.filter((_, i) => i % 3 === 1), expected, 1e-6, 0, 'rgb path, green channel');
  });
});
