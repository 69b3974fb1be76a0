/**
 * ImageDecoder for browsers and workers: the browser's own decoder (createImageBitmap) and an
 * OffscreenCanvas to read the pixels back. Colour-space conversion and premultiplication are
 * switched off so the bytes are the file's own. Caveat: a 2D canvas may store pixels
 * premultiplied, so fully transparent pixels can come back with RGB 0 here, while the Node
 * decoder keeps the RGB stored in the file.
 */
import type { DecodedImage, ImageDecoder, NamedBytes } from '../core/types.ts';

/** Decodes PNG/JPEG (anything the browser decodes) to RGBA; throws with the browser's reason. */
export const decodeImageBrowser: ImageDecoder = async (file: NamedBytes): Promise<DecodedImage> => {
  // Copy into a plain ArrayBuffer: BlobPart does not accept views over shared memory.
  const bitmap = await createImageBitmap(new Blob([file.bytes.slice()]), { colorSpaceConversion: 'none', premultiplyAlpha: 'none' });
  try {
    const { width, height } = bitmap;
    const context = new OffscreenCanvas(width, height).getContext('2d', { willReadFrequently: true });
    if (context === null) throw new Error('no 2D canvas context available');
    context.drawImage(bitmap, 0, 0);
    const { data } = context.getImageData(0, 0, width, height);
    return { width, height, rgba: new Uint8Array(data.buffer, data.byteOffset, data.byteLength) };
  } finally {
    bitmap.close();
  }
};
