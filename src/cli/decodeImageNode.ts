/**
 * Pure-JS image decoding for Node (CLI and tests): PNG through pngjs, JPEG through jpeg-js.
 * The format is told by the file's first bytes, not by its extension.
 */
import { PNG } from 'pngjs';
import jpeg from 'jpeg-js';
import type { DecodedImage, ImageDecoder, NamedBytes } from '../core/types.ts';

const PNG_SIGNATURE = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];
const JPEG_SIGNATURE = [0xff, 0xd8, 0xff];

function startsWith(bytes: Uint8Array, signature: readonly number[]): boolean {
  return signature.every((b, i) => bytes[i] === b);
}

/** PNG of any colour type and bit depth → 8-bit RGBA (pngjs rescales 16-bit samples). */
function decodePng(bytes: Uint8Array): DecodedImage {
  const png = PNG.sync.read(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength));
  return { width: png.width, height: png.height, rgba: new Uint8Array(png.data.buffer, png.data.byteOffset, png.data.byteLength) };
}

/** Baseline or progressive JPEG → RGBA with alpha 255. */
function decodeJpeg(bytes: Uint8Array): DecodedImage {
  const image = jpeg.decode(bytes, { useTArray: true, formatAsRGBA: true });
  return { width: image.width, height: image.height, rgba: image.data };
}

function withReason(what: string, decode: () => DecodedImage): DecodedImage {
  try {
    return decode();
  } catch (error) {
    throw new Error(`${what}: ${error instanceof Error ? error.message : String(error)}`);
  }
}

/** ImageDecoder for Node: PNG or JPEG bytes → RGBA; throws with the library's reason otherwise. */
export const decodeImageNode: ImageDecoder = async (file: NamedBytes): Promise<DecodedImage> => {
  if (startsWith(file.bytes, PNG_SIGNATURE)) return withReason('invalid PNG', () => decodePng(file.bytes));
  if (startsWith(file.bytes, JPEG_SIGNATURE)) return withReason('invalid JPEG', () => decodeJpeg(file.bytes));
  const head = Array.from(file.bytes.subarray(0, 4), (b) => b.toString(16).padStart(2, '0')).join(' ');
  throw new Error(`not a PNG or JPEG file (first bytes: ${head || 'none'})`);
};
