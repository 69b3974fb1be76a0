/**
 * Test fixtures for sample sets: image files encoded with the reference encoders pngjs and
 * jpeg-js, and small helpers to assemble NamedBytes lists.
 */
import { PNG, type ColorType } from 'pngjs';
import jpeg from 'jpeg-js';
import type { NamedBytes } from '../../src/core/types.ts';

/** Encodes RGBA bytes as an 8-bit RGBA PNG (pngjs). */
export function encodePngRgba(width: number, height: number, rgba: Uint8Array): Uint8Array {
  return encodePng(width, height, rgba, 6, 6);
}

/** Encodes one byte per pixel as an 8-bit grayscale PNG (colour type 0, pngjs). */
export function encodePngGray(width: number, height: number, gray: Uint8Array): Uint8Array {
  return encodePng(width, height, gray, 0, 0);
}

/** Encodes 3 bytes per pixel as an 8-bit RGB PNG (colour type 2, pngjs). */
export function encodePngRgb(width: number, height: number, rgb: Uint8Array): Uint8Array {
  return encodePng(width, height, rgb, 2, 2);
}

/** Encodes 16-bit RGB samples (3 per pixel) as a 16-bit RGB PNG (pngjs). */
export function encodePng16Rgb(width: number, height: number, rgb16: Uint16Array): Uint8Array {
  const buffer = PNG.sync.write(
    { width, height, data: Buffer.from(rgb16.buffer, rgb16.byteOffset, rgb16.byteLength) } as PNG,
    { colorType: 2, inputColorType: 2, inputHasAlpha: false, bitDepth: 16 },
  );
  return new Uint8Array(buffer);
}

function encodePng(width: number, height: number, data: Uint8Array, colorType: ColorType, inputColorType: ColorType): Uint8Array {
  const buffer = PNG.sync.write({ width, height, data: Buffer.from(data) } as PNG, {
    colorType,
    inputColorType,
    inputHasAlpha: inputColorType === 6,
  });
  return new Uint8Array(buffer);
}

/** Encodes RGBA bytes as a baseline JPEG with jpeg-js at the given quality (alpha is ignored). */
export function encodeJpeg(width: number, height: number, rgba: Uint8Array, quality: number): Uint8Array {
  return new Uint8Array(jpeg.encode({ width, height, data: rgba }, quality).data);
}

/** A solid-colour w×h RGBA PNG. */
export function solidPng(width: number, height: number, rgba: readonly [number, number, number, number]): Uint8Array {
  const data = new Uint8Array(width * height * 4);
  for (let p = 0; p < width * height; p++) data.set(rgba, p * 4);
  return encodePngRgba(width, height, data);
}

/** A 2×2 gray PNG whose every pixel has value `level` (0–255): its class can be read back from the pixels. */
export function levelPng(level: number): Uint8Array {
  return encodePngGray(2, 2, new Uint8Array(4).fill(level));
}

/** NamedBytes from a UTF-8 string. */
export function textFile(name: string, text: string): NamedBytes {
  return { name, bytes: new TextEncoder().encode(text) };
}
