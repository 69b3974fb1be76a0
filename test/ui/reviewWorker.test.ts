/**
 * The worker's saved run of the last sweep: the thumbnails are the adversarial points the worker
 * kept for its gallery, at each sample's first flipping budget; the hashes are those of the files
 * the sweep read; the file reads back through loadRun.
 */
import { createHash } from 'node:crypto';
import { PNG } from 'pngjs';
import { describe, expect, it } from 'vitest';
import { savedRunOfLastSweep } from '../../src/worker/review.ts';
import type { SweepRecordInputs } from '../../src/worker/engine.ts';
import { loadRun } from '../../src/core/savedRun/loadRun.ts';
import { serializeSavedRun } from '../../src/core/savedRun/saveRun.ts';
import type { HealthCheck } from '../../src/core/health/types.ts';
import type { SweepResult } from '../../src/core/sweep/types.ts';
import type { LoadedModel, SampleSet } from '../../src/core/types.ts';

const size = { height: 2, width: 3, channels: 1 };
// Two grey 2×3 images; sample 0 flips at ε = 0.1, sample 1 never does.
const pixels = Float32Array.from([0, 0.2, 0.4, 0.6, 0.8, 1, 0.5, 0.5, 0.5, 0.5, 0.5, 0.5]);
const adversarial0 = Float32Array.from([0.1, 0.1, 0.3, 0.7, 0.9, 0.9]);

function point(eps: number, robust: number) {
  return { attack: 'fgsm' as const, norm: 'linf' as const, eps, samples: 2, cleanCorrect: 2, robust, robustAccuracy: robust / 2, ci95Low: 0, ci95High: 1, attackSuccessRate: 1 - robust / 2 };
}

const result: SweepResult = {
  config: { attacks: [{ id: 'fgsm', options: {} }], norm: 'linf', eps: [0, 0.1], seed: 0, batchSize: 2 },
  cleanAccuracy: 1,
  cleanCorrect: 2,
  samples: 2,
  curve: [point(0, 2), point(0.1, 1)],
  records: [
    {
      index: 0, file: 'a/0.png', label: 0, cleanPred: 0, cleanConf: 0.9, minFlipEps: { fgsm: 0.1 },
      outcomes: [
        { attack: 'fgsm', eps: 0, advPred: 0, advConf: 0.9, linf: 0, l2: 0, flipped: false },
        { attack: 'fgsm', eps: 0.1, advPred: 1, advConf: 0.6, linf: 0.1, l2: 0.2, flipped: true },
      ],
    },
    {
      index: 1, file: 'b/1.png', label: 1, cleanPred: 1, cleanConf: 0.8, minFlipEps: { fgsm: null },
      outcomes: [
        { attack: 'fgsm', eps: 0, advPred: 1, advConf: 0.8, linf: 0, l2: 0, flipped: false },
        { attack: 'fgsm', eps: 0.1, advPred: 1, advConf: 0.7, linf: 0.1, l2: 0.2, flipped: false },
      ],
    },
  ],
  complete: true,
  startedAt: '2025-01-01T00:00:00.000Z',
  endedAt: '2025-01-01T00:00:01.000Z',
};

const samples: SampleSet = { files: ['a/0.png', 'b/1.png'], labels: Int32Array.from([0, 1]), classNames: ['a', 'b'], ...size, pixels };
const modelFiles = [{ name: 'model.json', bytes: new TextEncoder().encode('{"modelTopology":{}}') }];
const sampleFiles = [{ name: 'a/0.png', bytes: Uint8Array.from([1, 2, 3]) }, { name: 'b/1.png', bytes: Uint8Array.from([4, 5]) }];

const last: SweepRecordInputs = {
  result,
  modelFiles,
  sampleFiles,
  preprocessing: { inputRange: '0,1', mean: [0], std: [1], layout: 'nhwc' },
  model: { description: { height: 2, width: 3, channels: 1, numClasses: 2 } } as unknown as LoadedModel,
  samples,
  classNames: ['a', 'b'],
  backend: { name: 'cpu', simd: false, threads: false, threadCount: 1, notice: null },
  // The worker keeps every flipped point; one of a sample that is robust in the records must not become a thumbnail.
  flips: new Map([['fgsm|0', adversarial0], ['fgsm|1', new Float32Array(6)]]),
  files: samples.files,
  sampleSize: size,
};

/** Grey values of a greyscale PNG, decoded by pngjs (RGBA out; R is the grey value). */
function greyOf(base64: string): number[] {
  const png = PNG.sync.read(Buffer.from(base64, 'base64'));
  expect([png.width, png.height]).toEqual([3, 2]);
  return Array.from({ length: 6 }, (_, p) => png.data[p * 4]!);
}

const sha256 = (bytes: Uint8Array): string => createHash('sha256').update(bytes).digest('hex');

describe('saved run of the last sweep', () => {
  it('makes thumbnails from the kept adversarial pixels at the first flipping budget', async () => {
    const health: HealthCheck[] = [{ id: 'gradient-free', title: 'A gradient-free search', status: 'pass', detail: 'fine', numbers: { gap: 0 } }] as unknown as HealthCheck[];
    const saved = await savedRunOfLastSweep(last, health);
    expect(saved.origin).toBe('workbench');
    expect(saved.flips).toHaveLength(1);
    const flip = saved.flips[0]!;
    expect(flip).toMatchObject({ attack: 'fgsm', eps: 0.1, index: 0, file: 'a/0.png', label: 0, advPred: 1 });
    // pngjs (an independent PNG decoder) reads back the pixels rounded to 8 bits.
    expect(greyOf(flip.originalPng)).toEqual(Array.from(pixels.subarray(0, 6), (v) => Math.round(v * 255)));
    expect(greyOf(flip.adversarialPng)).toEqual(Array.from(adversarial0, (v) => Math.round(v * 255)));
    expect(saved.health).toEqual([{ check: 'gradient-free', status: 'pass', detail: 'fine', title: 'A gradient-free search', numbers: { gap: 0 } }]);
  });

  it('hashes the files the sweep read (sha256sum listing) and reads back through loadRun', async () => {
    const saved = await savedRunOfLastSweep(last, null);
    // The set hash is SHA-256 of the sha256sum-style listing "<hash>  <name>\n", sorted by name (node:crypto as reference).
    const listing = `${sha256(modelFiles[0]!.bytes)}  model.json\n`;
    expect(saved.run.model.sha256).toBe(sha256(new TextEncoder().encode(listing)));
    const sampleListing = sampleFiles.map((f) => `${sha256(f.bytes)}  ${f.name}\n`).join('');
    expect(saved.run.samples.sha256).toBe(sha256(new TextEncoder().encode(sampleListing)));
    expect(saved.health).toBeUndefined();
    const back = loadRun(serializeSavedRun(saved));
    expect(back.run.curve).toEqual(result.curve);
    expect(back.records).toEqual(result.records);
  });
});
