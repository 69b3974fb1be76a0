/**
 * The committed demo assets (public/demo/) are consistent with each other and with the generator.
 * The data set is invented (scripts/demo/markers.ts); what is checked here is bookkeeping, file
 * formats that tfjs and pngjs define, and the demo's acceptance bar.
 */
import fs from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { PNG } from 'pngjs';
import { useBackend } from '../helpers/backend.ts';
import { MARKER_CLASSES, MARKER_PIXELS, generateMarkers } from '../../scripts/demo/markers.ts';
import { MODELS_DIR, SAMPLES_DIR, SAMPLE_SEED } from '../../scripts/demo/demo-config.ts';

const MODEL_NAMES = ['standard', 'hardened'] as const;

function readClasses(): string[] {
  return fs.readFileSync(path.join(SAMPLES_DIR, 'classes.txt'), 'utf8').split('\n').filter((l) => l.length > 0);
}

function readManifest(): { file: string; label: string }[] {
  const lines = fs.readFileSync(path.join(SAMPLES_DIR, 'manifest.csv'), 'utf8').split('\n').filter((l) => l.length > 0);
  expect(lines[0]).toBe('file,label');
  return lines.slice(1).map((line) => {
    const [file, label, ...rest] = line.split(',');
    expect(rest).toEqual([]);
    return { file: file ?? '', label: label ?? '' };
  });
}

/** Load a model folder through tfjs' own in-memory IO handler (model.json + its weight files). */
async function loadFromMemory(dir: string): Promise<tf.LayersModel> {
  const json = JSON.parse(fs.readFileSync(path.join(dir, 'model.json'), 'utf8')) as tf.io.ModelJSON;
  const specs = json.weightsManifest.flatMap((group) => group.weights);
  const buffers = json.weightsManifest.flatMap((group) => group.paths.map((p) => new Uint8Array(fs.readFileSync(path.join(dir, p)))));
  const weightData = tf.io.concatenateArrayBuffers(buffers.map((b) => b.slice().buffer));
  return tf.loadLayersModel(tf.io.fromMemory({ modelTopology: json.modelTopology, weightSpecs: specs, weightData }));
}

/** RGB floats in [0,1] of a PNG, HWC (pngjs always decodes to RGBA bytes). */
function decodePng(file: string): Float32Array {
  const png = PNG.sync.read(fs.readFileSync(path.join(SAMPLES_DIR, file)));
  const out = new Float32Array(png.width * png.height * 3);
  for (let i = 0; i < png.width * png.height; i++) {
    for (let c = 0; c < 3; c++) out[i * 3 + c] = png.data[i * 4 + c]! / 255;
  }
  return out;
}

/** The raw bytes of a float array (a view, so identical floats compare bit for bit). */
function bytesOf(values: Float32Array): Buffer {
  return Buffer.from(values.buffer, values.byteOffset, values.byteLength);
}

describe('demo assets', () => {
  beforeAll(async () => {
    await useBackend('wasm');
  });

  it('classes.txt lists the generator classes in index order', () => {
    expect(readClasses()).toEqual([...MARKER_CLASSES]);
  });

  it('every manifest row names an existing PNG in its class folder with a valid label', () => {
    const classes = new Set(readClasses());
    const rows = readManifest();
    expect(rows.length).toBeGreaterThanOrEqual(180);
    for (const row of rows) {
      expect(classes.has(row.label), row.label).toBe(true);
      expect(row.file.split('/')[0]).toBe(row.label);
      expect(fs.existsSync(path.join(SAMPLES_DIR, row.file)), row.file).toBe(true);
    }
    expect(new Set(rows.map((r) => r.file)).size).toBe(rows.length);
  });

  it('the committed PNGs are exactly what the generator draws for the sample seed', () => {
    const rows = readManifest();
    const generated = generateMarkers(SAMPLE_SEED, rows.length);
    rows.forEach((row, i) => {
      expect(MARKER_CLASSES[generated.labels[i]!]).toBe(row.label);
      const pixels = decodePng(row.file);
      const expected = generated.pixels.subarray(i * MARKER_PIXELS, (i + 1) * MARKER_PIXELS);
      // The generator rounds to 8-bit levels, so the PNG bytes reproduce it to float precision.
      let worst = 0;
      for (let k = 0; k < MARKER_PIXELS; k++) worst = Math.max(worst, Math.abs(pixels[k]! - expected[k]!));
      expect(worst, row.file).toBeLessThan(1e-6);
    });
  });

  it('the generator is deterministic per seed', () => {
    const a = generateMarkers(7, 12);
    const b = generateMarkers(7, 12);
    const c = generateMarkers(8, 12);
    expect(bytesOf(a.pixels).equals(bytesOf(b.pixels))).toBe(true);
    expect(Array.from(a.labels)).toEqual(Array.from(b.labels));
    expect(bytesOf(a.pixels).equals(bytesOf(c.pixels))).toBe(false);
    // A prefix does not depend on how many images are drawn after it.
    expect(bytesOf(generateMarkers(7, 3).pixels).equals(bytesOf(a.pixels.subarray(0, 3 * MARKER_PIXELS)))).toBe(true);
  });

  for (const name of MODEL_NAMES) {
    it(`${name}: loads with tf.loadLayersModel, 32×32×3 in, one logit per class out, files under 1 MB`, async () => {
      const dir = path.join(MODELS_DIR, name);
      const bytes = fs.readdirSync(dir).filter((f) => f !== 'card.json').reduce((sum, f) => sum + fs.statSync(path.join(dir, f)).size, 0);
      expect(bytes).toBeLessThan(1024 * 1024);
      const model = await loadFromMemory(dir);
      try {
        expect(model.inputs[0]?.shape).toEqual([null, 32, 32, 3]);
        expect(model.outputs[0]?.shape).toEqual([null, readClasses().length]);
        const card = JSON.parse(fs.readFileSync(path.join(dir, 'card.json'), 'utf8')) as { classes: string[]; output: string };
        expect(card.classes).toEqual(readClasses());
        expect(card.output).toBe('logits');
      } finally {
        model.dispose();
      }
    });
  }

  it('standard model: clean accuracy on the committed samples is at least 95 %', async () => {
    const rows = readManifest();
    const classes = readClasses();
    const pixels = new Float32Array(rows.length * MARKER_PIXELS);
    rows.forEach((row, i) => pixels.set(decodePng(row.file), i * MARKER_PIXELS));
    const model = await loadFromMemory(path.join(MODELS_DIR, 'standard'));
    const before = tf.memory().numTensors;
    const predicted = tf.tidy(() => tf.argMax(model.predict(tf.tensor4d(pixels, [rows.length, 32, 32, 3])) as tf.Tensor2D, 1));
    const values = await predicted.data();
    predicted.dispose();
    model.dispose();
    expect(tf.memory().numTensors).toBeLessThanOrEqual(before);
    const correct = rows.filter((row, i) => classes[values[i]!] === row.label).length;
    // The demo's acceptance bar (issue): ≥ 95 % clean accuracy on held-out samples.
    expect(correct / rows.length).toBeGreaterThanOrEqual(0.95);
  });
});
