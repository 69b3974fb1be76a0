/**
 * readModelFiles (CLI): a model.json path brings its manifest shards from the same folder, a .onnx
 * path brings just that file, and a missing file is named. The round trip is checked against the
 * bytes written (the files on disk are the reference).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtemp, mkdir, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { useBackend } from '../helpers/backend.ts';
import { readModelFiles } from '../../src/cli/nodeModelFiles.ts';
import { loadModelFromFiles } from '../../src/core/models/loadModel.ts';
import { closedFormParameters, randomWeights, type SmallNetSpec } from './fixtures.ts';
import { graphModelFiles } from './graphFixture.ts';

const SPEC: SmallNetSpec = { height: 5, width: 5, channels: 1, filters: 2, hidden: 3, classes: 2, layout: 'nhwc', activation: 'relu', softmax: false };
let folder = '';

beforeAll(async () => {
  await useBackend('cpu');
  folder = await mkdtemp(path.join(os.tmpdir(), 'brink-model-'));
  await mkdir(path.join(folder, 'net'));
  for (const file of graphModelFiles(SPEC, randomWeights(SPEC, 2), { shards: 2 })) {
    await writeFile(path.join(folder, 'net', file.name), file.bytes);
  }
  await writeFile(path.join(folder, 'net', 'unrelated.bin'), new Uint8Array([1, 2, 3]));
  await writeFile(path.join(folder, 'tiny.onnx'), new Uint8Array([8, 7]));
});

afterAll(async () => {
  await rm(folder, { recursive: true, force: true });
});

describe('readModelFiles', () => {
  it('reads model.json and exactly the shards its manifest lists', async () => {
    const files = await readModelFiles(path.join(folder, 'net', 'model.json'));
    expect(files.map((f) => f.name)).toEqual(['model.json', 'graph-shard1of2.bin', 'graph-shard2of2.bin']);
    const model = await loadModelFromFiles(files);
    // Closed form: the parameter count of the layer sizes written to disk.
    expect(model.description.parameterCount).toBe(closedFormParameters(SPEC));
    model.dispose();
  });

  it('reads a .onnx path as that one file', async () => {
    const files = await readModelFiles(path.join(folder, 'tiny.onnx'));
    expect(files).toHaveLength(1);
    expect(files[0]!.name).toBe('tiny.onnx');
    expect(Array.from(files[0]!.bytes)).toEqual([8, 7]);
  });

  it('names a missing shard and a missing model file', async () => {
    await rm(path.join(folder, 'net', 'graph-shard2of2.bin'));
    await expect(readModelFiles(path.join(folder, 'net', 'model.json'))).rejects.toThrow(
      /^Weight file graph-shard2of2\.bin listed in model\.json \(.*graph-shard2of2\.bin\) does not exist\.$/,
    );
    await expect(readModelFiles(path.join(folder, 'nope', 'model.json'))).rejects.toThrow(/^Model file .*nope\/model\.json does not exist\.$/);
  });
});
