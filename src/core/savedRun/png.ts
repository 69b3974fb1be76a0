/**
 * A tiny PNG encoder (8-bit greyscale or RGB, no interlace), so thumbnails can be made in the core
 * without a canvas: PNG chunks per the PNG specification (W3C / ISO 15948), zlib data via fflate.
 */
import { zlibSync } from 'fflate';

const SIGNATURE = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];

/** Size of an image whose samples are in [0,1], HWC order (1 or 3 channels). */
export interface ImageSize {
  readonly height: number;
  readonly width: number;
  readonly channels: number;
}

let crcTable: Uint32Array | null = null;

/** CRC-32 (ISO 3309, polynomial 0xEDB88320), the checksum every PNG chunk carries. */
export function crc32(bytes: Uint8Array, start = 0, end = bytes.length): number {
  crcTable ??= makeCrcTable();
  let crc = 0xffffffff;
  for (let i = start; i < end; i++) crc = crcTable[(crc ^ bytes[i]!) & 0xff]! ^ (crc >>> 8);
  return (crc ^ 0xffffffff) >>> 0;
}

function makeCrcTable(): Uint32Array {
  const table = new Uint32Array(256);
  for (let n = 0; n < 256; n++) {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    table[n] = c >>> 0;
  }
  return table;
}

/** One chunk: length, type, data, CRC over type and data. */
function chunk(type: string, data: Uint8Array): Uint8Array {
  const out = new Uint8Array(12 + data.length);
  const view = new DataView(out.buffer);
  view.setUint32(0, data.length);
  for (let i = 0; i < 4; i++) out[4 + i] = type.charCodeAt(i);
  out.set(data, 8);
  view.setUint32(8 + data.length, crc32(out, 4, 8 + data.length));
  return out;
}

/** A sample in [0,1] rounded to 8 bits (values outside are clipped). */
export function toByte(value: number): number {
  return Math.round(Math.min(1, Math.max(0, value)) * 255);
}

/**
 * PNG bytes of an image with samples in [0,1] (HWC, 1 channel → greyscale, 3 → RGB), each rounded
 * to 8 bits. Every scanline uses filter type 0 (none): simple, and small images compress well enough.
 */
export function encodePng(pixels: Float32Array | readonly number[], size: ImageSize): Uint8Array {
  const { height, width, channels } = size;
  if (channels !== 1 && channels !== 3) throw new Error(`PNG thumbnails take 1 or 3 channels, got ${channels}.`);
  if (pixels.length !== height * width * channels) throw new Error(`Expected ${height}·${width}·${channels} values, got ${pixels.length}.`);
  const rowBytes = 1 + width * channels;
  const raw = new Uint8Array(height * rowBytes);
  for (let y = 0; y < height; y++) {
    for (let i = 0; i < width * channels; i++) raw[y * rowBytes + 1 + i] = toByte(pixels[y * width * channels + i]!);
  }
  const header = new Uint8Array(13);
  const view = new DataView(header.buffer);
  view.setUint32(0, width);
  view.setUint32(4, height);
  header[8] = 8; // bit depth
  header[9] = channels === 1 ? 0 : 2; // colour type: greyscale or truecolour
  const parts = [Uint8Array.from(SIGNATURE), chunk('IHDR', header), chunk('IDAT', zlibSync(raw, { level: 9 })), chunk('IEND', new Uint8Array(0))];
  const out = new Uint8Array(parts.reduce((n, p) => n + p.length, 0));
  let offset = 0;
  for (const p of parts) {
    out.set(p, offset);
    offset += p.length;
  }
  return out;
}

/**
 * Shrink an image by box averaging so that neither side exceeds `maxSide` (an integer factor;
 * images already small enough are returned as they are).
 */
export function shrinkImage(pixels: Float32Array, size: ImageSize, maxSide: number): { pixels: Float32Array; size: ImageSize } {
  const factor = Math.ceil(Math.max(size.height, size.width) / maxSide);
  if (factor <= 1) return { pixels, size };
  const { channels } = size;
  const height = Math.ceil(size.height / factor);
  const width = Math.ceil(size.width / factor);
  const out = new Float32Array(height * width * channels);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      for (let c = 0; c < channels; c++) out[(y * width + x) * channels + c] = boxMean(pixels, size, y * factor, x * factor, factor, c);
    }
  }
  return { pixels: out, size: { height, width, channels } };
}

function boxMean(pixels: Float32Array, size: ImageSize, top: number, left: number, factor: number, c: number): number {
  let sum = 0;
  let count = 0;
  for (let y = top; y < Math.min(size.height, top + factor); y++) {
    for (let x = left; x < Math.min(size.width, left + factor); x++) {
      sum += pixels[(y * size.width + x) * size.channels + c]!;
      count++;
    }
  }
  return sum / count;
}
