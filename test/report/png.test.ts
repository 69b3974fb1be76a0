/**
 * The core's PNG encoder and base64 writer against general-purpose reference implementations:
 * pngjs decodes what we write, Node's Buffer writes the same base64, and the CRC-32 gives the
 * standard check value.
 */
import { describe, expect, it } from 'vitest';
import { PNG } from 'pngjs';
import { crc32, encodePng, shrinkImage, toByte } from '../../src/core/savedRun/png.ts';
import { fromBase64, toBase64 } from '../../src/core/savedRun/base64.ts';
import { createRng } from '../../src/core/random/rng.ts';

function randomPixels(n: number, seed: number): Float32Array {
  const rng = createRng(seed);
  // Some values outside [0,1] too: the encoder must clip them.
  return Float32Array.from({ length: n }, () => rng.next() * 1.2 - 0.1);
}

describe('encodePng', () => {
  for (const [channels, colorType] of [[1, 0], [3, 2]] as const) {
    it(`writes ${channels === 1 ? 'greyscale' : 'RGB'} images that pngjs decodes to the same 8-bit values`, () => {
      const size = { height: 7, width: 11, channels };
      const pixels = randomPixels(7 * 11 * channels, channels);
      const png = PNG.sync.read(Buffer.from(encodePng(pixels, size)));
      // Reference: pngjs (general-purpose PNG library) reads back width, height, colour type and every sample.
      expect([png.width, png.height]).toEqual([11, 7]);
      expect((png as unknown as { colorType: number }).colorType).toBe(colorType);
      for (let p = 0; p < 7 * 11; p++) {
        for (let c = 0; c < 3; c++) expect(png.data[p * 4 + c]).toBe(toByte(pixels[p * channels + (channels === 1 ? 0 : c)]!));
        expect(png.data[p * 4 + 3]).toBe(255);
      }
    });
  }

  it('rejects other channel counts and wrong lengths', () => {
    expect(() => encodePng(new Float32Array(8), { height: 2, width: 2, channels: 2 })).toThrow(/1 or 3 channels/);
    expect(() => encodePng(new Float32Array(5), { height: 2, width: 2, channels: 1 })).toThrow(/Expected/);
  });
});

describe('crc32', () => {
  it('gives the standard check value for "123456789"', () => {
    // CRC-32 (ISO 3309 / ITU-T V.42, as used by PNG and zlib) check value 0xCBF43926 (from memory; the CRC catalogue lists it).
    expect(crc32(new TextEncoder().encode('123456789'))).toBe(0xcbf43926);
  });
});

describe('base64', () => {
  it('equals Node Buffer base64 for every length remainder and reads back', () => {
    for (let n = 0; n < 40; n++) {
      const bytes = Uint8Array.from({ length: n }, (_, i) => (i * 37 + n * 11) & 255);
      // Reference: Node's Buffer base64 encoder (RFC 4648).
      expect(toBase64(bytes)).toBe(Buffer.from(bytes).toString('base64'));
      expect(Array.from(fromBase64(toBase64(bytes)))).toEqual(Array.from(bytes));
    }
  });
});

describe('shrinkImage', () => {
  it('box-averages by an integer factor', () => {
    // 4×4 greyscale, factor 2: each output is the mean of a 2×2 block (closed form).
    const pixels = Float32Array.from([0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15].map((v) => v / 16));
    const small = shrinkImage(pixels, { height: 4, width: 4, channels: 1 }, 2);
    expect(small.size).toEqual({ height: 2, width: 2, channels: 1 });
    expect(Array.from(small.pixels).map((v) => v * 16)).toEqual([(0 + 1 + 4 + 5) / 4, (2 + 3 + 6 + 7) / 4, (8 + 9 + 12 + 13) / 4, (10 + 11 + 14 + 15) / 4]);
    expect(shrinkImage(pixels, { height: 4, width: 4, channels: 1 }, 4).pixels).toBe(pixels);
  });
});
