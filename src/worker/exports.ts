/**
 * The export files of the last sweep, written by the core's own writers (the same bytes as the
 * CLI's files), plus a .zip of the adversarial images encoded as PNG by the browser.
 */
import { curveCsv, samplesCsv } from '../core/export/curveCsv.ts';
import { runJson, type RunRecordInput } from '../core/export/runRecord.ts';
import { epsLabeller } from '../core/export/epsLabels.ts';
import { baseName, dirName } from '../core/samples/paths.ts';
import { csvText } from '../core/export/csvFormat.ts';
import type { NamedBytes } from '../core/types.ts';
import { flipKey, type SweepRecordInputs } from './engine.ts';
import { zipEntries } from './archive.ts';
import type { ExportFile, ExportKind } from './protocol.ts';

const TEXT = new TextEncoder();

/** Build one export file from the last sweep. */
export async function exportFile(kind: ExportKind, last: SweepRecordInputs): Promise<ExportFile> {
  switch (kind) {
    case 'curve-csv':
      return { fileName: 'curve.csv', mimeType: 'text/csv', bytes: TEXT.encode(curveCsv(last.result)) };
    case 'samples-csv':
      return { fileName: 'samples.csv', mimeType: 'text/csv', bytes: TEXT.encode(samplesCsv(last.result)) };
    case 'run-json':
      return { fileName: 'run.json', mimeType: 'application/json', bytes: TEXT.encode(await runJsonOf(last)) };
    case 'adversarial-zip':
      return { fileName: 'adversarial-images.zip', mimeType: 'application/zip', bytes: await adversarialZip(last) };
  }
}

function runJsonOf(last: SweepRecordInputs): Promise<string> {
  return runJson(runRecordInputOf(last));
}

/** What the run record (run.json, and the core of a saved run) needs from the last sweep. */
export function runRecordInputOf(last: SweepRecordInputs): RunRecordInput {
  return {
    result: last.result,
    modelFiles: last.modelFiles,
    sampleFiles: last.sampleFiles,
    preprocessing: last.preprocessing,
    ...(last.resize !== undefined ? { resize: last.resize } : {}),
    backend: last.backend,
    model: last.model.description,
    classNames: last.classNames,
  };
}

/**
 * One PNG per flipped sample and attack, at the budget that first flipped it:
 * `<attack>/<class folder>/<name>-eps<budget>.png`, and an index.csv that names each file's
 * sample, labels and budget.
 */
async function adversarialZip(last: SweepRecordInputs): Promise<Uint8Array> {
  const label = epsLabeller(last.result.config);
  const entries: NamedBytes[] = [];
  const rows: string[][] = [];
  const names = last.classNames;
  for (const record of last.result.records) {
    for (const [attack, eps] of Object.entries(record.minFlipEps)) {
      if (eps === null || eps === undefined || eps === 0) continue;
      const pixels = last.flips.get(flipKey(attack as keyof typeof record.minFlipEps, record.index));
      if (pixels === undefined) continue;
      const outcome = record.outcomes.find((o) => o.attack === attack && o.eps === eps);
      const stem = baseName(record.file).replace(/\.[^.]+$/, '');
      const folder = dirName(record.file);
      const path = `${attack}/${folder === '' ? '' : `${folder}/`}${stem}-eps${label(eps)}.png`;
      entries.push({ name: path, bytes: await encodePng(pixels, last.sampleSize) });
      rows.push([path, record.file, attack, label(eps), names[record.label] ?? String(record.label), names[outcome?.advPred ?? -1] ?? String(outcome?.advPred ?? '')]);
    }
  }
  const index = csvText(['image', 'sample', 'attack', 'eps', 'label', 'adversarial_prediction'], rows);
  entries.push({ name: 'index.csv', bytes: TEXT.encode(index) });
  return zipEntries(entries);
}

/** PNG bytes of an image x ∈ [0,1] (1 or 3 channels), rounded to 8 bits, via the browser's encoder. */
export async function encodePng(pixels: Float32Array, size: { height: number; width: number; channels: number }): Promise<Uint8Array> {
  const { height, width, channels } = size;
  const canvas = new OffscreenCanvas(width, height);
  const context = canvas.getContext('2d');
  if (context === null) throw new Error('No 2D canvas available to encode PNG images.');
  const image = context.createImageData(width, height);
  for (let p = 0; p < width * height; p++) {
    for (let c = 0; c < 3; c++) {
      const v = pixels[p * channels + (channels === 1 ? 0 : c)]!;
      image.data[p * 4 + c] = Math.round(Math.min(1, Math.max(0, v)) * 255);
    }
    image.data[p * 4 + 3] = 255;
  }
  context.putImageData(image, 0, 0);
  const blob = await canvas.convertToBlob({ type: 'image/png' });
  return new Uint8Array(await blob.arrayBuffer());
}
