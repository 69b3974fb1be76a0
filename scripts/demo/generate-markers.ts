/**
 * Writes the committed held-out samples of the invented floor-marker data set:
 * public/demo/samples/<class>/NNN.png, manifest.csv (file,label) and classes.txt.
 * Run: npm run demo:data   (same seed → identical files)
 */
import fs from 'node:fs';
import path from 'node:path';
import { PNG } from 'pngjs';
import { MARKER_CLASSES, MARKER_PIXELS, MARKER_SIZE, generateMarkers } from './markers.ts';
import { SAMPLES_DIR, SAMPLES_PER_CLASS, SAMPLE_SEED } from './demo-config.ts';

/** Encode one HWC image in [0,1] as an opaque RGBA PNG. */
export function encodeMarkerPng(pixels: Float32Array, offset = 0): Buffer {
  const png = new PNG({ width: MARKER_SIZE, height: MARKER_SIZE });
  for (let i = 0; i < MARKER_SIZE * MARKER_SIZE; i++) {
    for (let c = 0; c < 3; c++) png.data[i * 4 + c] = Math.round(pixels[offset + i * 3 + c]! * 255);
    png.data[i * 4 + 3] = 255;
  }
  return PNG.sync.write(png);
}

/** Generate the sample set and write it (replacing any previous samples) under `root`. */
export function writeSamples(root: string): number {
  const dir = path.join(root, SAMPLES_DIR);
  fs.rmSync(dir, { recursive: true, force: true });
  const count = SAMPLES_PER_CLASS * MARKER_CLASSES.length;
  const { pixels, labels } = generateMarkers(SAMPLE_SEED, count);
  const rows = ['file,label'];
  const perClass = new Array<number>(MARKER_CLASSES.length).fill(0);
  for (let i = 0; i < count; i++) {
    const label = labels[i]!;
    const className = MARKER_CLASSES[label]!;
    const file = `${className}/${String(perClass[label]!).padStart(3, '0')}.png`;
    perClass[label] = perClass[label]! + 1;
    fs.mkdirSync(path.join(dir, className), { recursive: true });
    fs.writeFileSync(path.join(dir, file), encodeMarkerPng(pixels, i * MARKER_PIXELS));
    rows.push(`${file},${className}`);
  }
  fs.writeFileSync(path.join(dir, 'manifest.csv'), `${rows.join('\n')}\n`);
  fs.writeFileSync(path.join(dir, 'classes.txt'), `${MARKER_CLASSES.join('\n')}\n`);
  return count;
}

if (process.argv[1] !== undefined && path.resolve(process.argv[1]) === path.resolve(import.meta.filename)) {
  const count = writeSamples(process.cwd());
  console.log(`wrote ${count} samples to ${SAMPLES_DIR} (seed ${SAMPLE_SEED})`);
}
