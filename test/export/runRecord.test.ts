/**
 * run.json from a real sweep (FGSM and PGD on MNIST digits from the `mnist` package): fingerprints
 * checked against node:crypto, versions against the installed packages' manifests, and the record
 * repeatable byte for byte apart from the two times.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import { useBackend } from '../helpers/backend.ts';
import { runSweep } from '../../src/core/sweep/runSweep.ts';
import type { SweepConfig, SweepResult } from '../../src/core/sweep/types.ts';
import { runJson, runRecord, type RunRecordInput } from '../../src/core/export/runRecord.ts';
import type { BackendInfo } from '../../src/core/backend/initBackend.ts';
import { DEFAULT_PREPROCESSING, type NamedBytes } from '../../src/core/types.ts';
import { meansPlusRandomReluModel, mnistSampleSet } from '../sweep/fixtures.ts';

const samples = mnistSampleSet(2, 60);
const CONFIG: SweepConfig = {
  attacks: [
    { id: 'pgd', options: { steps: 3, restarts: 1 } },
    { id: 'fgsm', options: {} },
  ],
  norm: 'linf',
  eps: [0, 0.05],
  seed: 4,
  batchSize: 8,
};

const readFixture = (name: string): NamedBytes => ({ name, bytes: new Uint8Array(readFileSync(`test/fixtures/cli/model/${name}`)) });
const modelFiles = [readFixture('weights.bin'), readFixture('model.json')];
const sampleFiles = samples.files.map((name, i) => ({ name, bytes: new Uint8Array(samples.pixels.buffer, i * 784 * 4, 784 * 4) }));
const nodeSha256 = (b: Uint8Array | string): string => createHash('sha256').update(b).digest('hex');

let backend: BackendInfo;
let first: SweepResult;
let second: SweepResult;
let reordered: SweepResult;
beforeAll(async () => {
  backend = await useBackend('wasm');
  const model = meansPlusRandomReluModel(4);
  first = await runSweep({ logits: model.logits, samples, config: CONFIG });
  second = await runSweep({ logits: model.logits, samples, config: CONFIG });
  // Same configuration, options and keys written in another order.
  const shuffled: SweepConfig = { batchSize: 8, seed: 4, eps: [0, 0.05], norm: 'linf', attacks: [{ id: 'pgd', options: { restarts: 1, steps: 3 } }, { id: 'fgsm', options: {} }] };
  reordered = await runSweep({ logits: model.logits, samples, config: shuffled });
  model.dispose();
});

const inputFor = (result: SweepResult): RunRecordInput => ({
  result,
  modelFiles,
  sampleFiles,
  preprocessing: DEFAULT_PREPROCESSING,
  backend,
  classNames: samples.classNames,
});

const withoutTimes = (json: string): string => json.replace(/"(startedAt|endedAt)": "[^"]*"/g, '"$1": "-"');

describe('run.json', () => {
  it('is identical for two runs with the same inputs apart from the start and end times', async () => {
    const a = await runJson(inputFor(first));
    expect(withoutTimes(await runJson(inputFor(second)))).toBe(withoutTimes(a));
    expect(withoutTimes(await runJson(inputFor(reordered)))).toBe(withoutTimes(a));
    expect(a.endsWith('}\n')).toBe(true);
  });

  it('fingerprints the model files and the sample set with SHA-256', async () => {
    // Reference: node:crypto; the set hash is over the sha256sum-style listing sorted by name.
    const record = await runRecord(inputFor(first));
    expect(record.model.files).toEqual([
      { name: 'model.json', sha256: nodeSha256(modelFiles[1]!.bytes) },
      { name: 'weights.bin', sha256: nodeSha256(modelFiles[0]!.bytes) },
    ]);
    expect(record.model.sha256).toBe(nodeSha256(record.model.files.map((f) => `${f.sha256}  ${f.name}\n`).join('')));
    const listing = [...sampleFiles].sort((x, y) => (x.name < y.name ? -1 : 1)).map((f) => `${nodeSha256(f.bytes)}  ${f.name}\n`).join('');
    expect(record.samples.sha256).toBe(nodeSha256(listing));
    expect(record.samples.files).toBe(20);
  });

  it('records versions, backend, seed, the completed configuration and the curve', async () => {
    // References: package.json of Brink and of the installed @tensorflow/tfjs-core.
    const parsed = JSON.parse(await runJson(inputFor(first))) as Record<string, unknown>;
    const version = (path: string): string => (JSON.parse(readFileSync(path, 'utf8')) as { version: string }).version;
    expect(parsed.brinkVersion).toBe(version('package.json'));
    expect(parsed.tfjsVersion).toBe(version('node_modules/@tensorflow/tfjs-core/package.json'));
    expect(parsed.backend).toEqual({ ...backend });
    expect(parsed.seed).toBe(4);
    expect(parsed.complete).toBe(true);
    expect(parsed.preprocessing).toEqual(DEFAULT_PREPROCESSING);
    const config = parsed.config as SweepConfig;
    // The attacks' validate() completed the options with their defaults (e.g. PGD's randomStart).
    expect(Object.keys(config.attacks[0]!.options)).toEqual(['loss', 'randomStart', 'restarts', 'stepSize', 'steps', 'target']);
    expect(config.attacks[0]!.options.steps).toBe(3);
    expect(parsed.curve).toEqual(JSON.parse(JSON.stringify(first.curve)));
    expect(Date.parse(parsed.startedAt as string)).toBeLessThanOrEqual(Date.parse(parsed.endedAt as string));
  });
});
