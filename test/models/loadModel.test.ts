/**
 * loadModelFromFiles: file matching and the error each broken input gives. The expected messages
 * are Brink's own; the byte counts they quote are checked against the closed-form weight sizes.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { useBackend } from '../helpers/backend.ts';
import { loadModelFromFiles } from '../../src/core/models/loadModel.ts';
import { MALFORMED_PREFIX } from '../../src/core/onnx/errors.ts';
import type { NamedBytes } from '../../src/core/types.ts';
import { closedFormParameters, layersModelFiles, layersModelToFiles, randomWeights, type SmallNetSpec } from './fixtures.ts';
import { graphModelFiles } from './graphFixture.ts';

const SPEC: SmallNetSpec = { height: 5, width: 5, channels: 3, filters: 2, hidden: 4, classes: 3, layout: 'nhwc', activation: 'relu', softmax: false };
const WEIGHTS = randomWeights(SPEC, 1);
const text = (name: string, s: string): NamedBytes => ({ name, bytes: new TextEncoder().encode(s) });

beforeAll(async () => {
  await useBackend('cpu');
});

describe('finding the files', () => {
  it('loads a model.json of any name beside other JSON files, with folder prefixes', async () => {
    const files = await layersModelFiles(SPEC, WEIGHTS, { prefix: 'upload/net/', jsonName: 'my-net.json', shards: 3 });
    const model = await loadModelFromFiles([text('upload/labels.json', '["a","b","c"]'), ...files.reverse()]);
    // Closed form: the description reads the shapes the files declare.
    expect(model.description.format).toBe('layers');
    expect(model.description.parameterCount).toBe(closedFormParameters(SPEC));
    model.dispose();
  });

  it('loads a Keras topology that has no format field as a layers model', async () => {
    const files = await layersModelFiles(SPEC, WEIGHTS);
    const json = JSON.parse(new TextDecoder().decode(files[0]!.bytes)) as Record<string, unknown>;
    delete json['format'];
    const model = await loadModelFromFiles([text('model.json', JSON.stringify(json)), ...files.slice(1)]);
    expect(model.description.format).toBe('layers');
    model.dispose();
  });

  it('load, describe and dispose leave no tensors behind', async () => {
    const layersFiles = await layersModelFiles(SPEC, WEIGHTS);
    const graphFiles = graphModelFiles(SPEC, WEIGHTS);
    const before = tf.memory().numTensors;
    for (const files of [layersFiles, graphFiles]) (await loadModelFromFiles(files)).dispose();
    // Common practice: tf.memory().numTensors returns to where it was.
    expect(tf.memory().numTensors).toBe(before);
  });

  it('loads a hand-written graph model as a graph model', async () => {
    const model = await loadModelFromFiles(graphModelFiles(SPEC, WEIGHTS, { shards: 2 }));
    expect(model.description.format).toBe('graph');
    model.dispose();
  });
});

describe('loading errors', () => {
  it('no model.json among the files', async () => {
    await expect(loadModelFromFiles([text('cat.png', 'x'), text('labels.json', '{}')])).rejects.toThrow(
      /^No model\.json \(a JSON file with a modelTopology\) or \.onnx file among the 2 file\(s\) given \(cat\.png, labels\.json\)\.$/,
    );
  });

  it('a JSON that does not parse is named', async () => {
    await expect(loadModelFromFiles([text('model/model.json', '{"modelTopology": ')])).rejects.toThrow(/model\/model\.json is not valid JSON/);
  });

  it('two model JSON files', async () => {
    const a = await layersModelFiles(SPEC, WEIGHTS);
    const b = await layersModelFiles(SPEC, WEIGHTS, { prefix: 'copy/' });
    await expect(loadModelFromFiles([...a, ...b])).rejects.toThrow(/More than one model\.json .*model\.json, copy\/model\.json/);
  });

  it('a manifest shard that is missing is named', async () => {
    const files = await layersModelFiles(SPEC, WEIGHTS, { shards: 2 });
    const withoutSecond = files.filter((f) => f.name !== 'group1-shard2of2.bin');
    await expect(loadModelFromFiles(withoutSecond)).rejects.toThrow(/^Weight file group1-shard2of2\.bin listed in model\.json is missing/);
  });

  it('shard bytes shorter than the manifest needs', async () => {
    const files = graphModelFiles(SPEC, WEIGHTS);
    const shard = files[1]!;
    const cut = { name: shard.name, bytes: shard.bytes.slice(0, shard.bytes.length - 8) };
    // Closed form: float32 parameters · 4 bytes + the int32 reshape target (2 values · 4 bytes).
    const needed = closedFormParameters(SPEC) * 4 + 8;
    expect(shard.bytes.length).toBe(needed);
    await expect(loadModelFromFiles([files[0]!, cut])).rejects.toThrow(
      new RegExp(`^Weight file\\(s\\) graph-shard1of1\\.bin hold ${needed - 8} bytes but model\\.json needs ${needed};`),
    );
  });

  it('a model with two inputs', async () => {
    const a = tf.input({ shape: [4, 4, 3] });
    const b = tf.input({ shape: [4, 4, 3] });
    const sum = tf.layers.add().apply([a, b]) as tf.SymbolicTensor;
    const flat = tf.layers.flatten().apply(sum) as tf.SymbolicTensor;
    const out = tf.layers.dense({ units: 2 }).apply(flat) as tf.SymbolicTensor;
    const model = tf.model({ inputs: [a, b], outputs: out });
    const files = await layersModelToFiles(model);
    model.dispose();
    await expect(loadModelFromFiles(files)).rejects.toThrow(/^The model has 2 inputs \(.+\); Brink needs exactly one image input\.$/);
  });

  it('a model with two outputs', async () => {
    const second = { name: 'second_head', op: 'Relu', input: ['hidden/act'], attr: { T: { type: 'DT_FLOAT' } } };
    const files = graphModelFiles(SPEC, WEIGHTS, { extraNodes: [second] });
    await expect(loadModelFromFiles(files)).rejects.toThrow(/^The model has 2 outputs \(.*second_head.*\); Brink needs exactly one class-score output\.$/);
  });

  it('an input that is not an image', async () => {
    const model = tf.sequential({ layers: [tf.layers.dense({ units: 3, inputShape: [10] })] });
    const files = await layersModelToFiles(model);
    model.dispose();
    await expect(loadModelFromFiles(files)).rejects.toThrow(/^The model input has shape \[\?, 10\]; Brink needs a rank-4 image input/);
  });

  // TensorFlow control-flow ops (v1: Enter/Exit/Merge/Switch/LoopCond/NextIteration; v2: If/While and
  // their stateless forms) make tfjs refuse GraphModel.execute() in favour of executeAsync.
  for (const opName of ['Enter', 'Exit', 'Merge', 'Switch', 'LoopCond', 'NextIteration', 'StatelessIf', 'If', 'StatelessWhile', 'While']) {
    it(`a graph that needs executeAsync (${opName})`, async () => {
      const node = { name: `flow/${opName}_1`, op: opName, input: ['x'], attr: {} };
      const files = graphModelFiles(SPEC, WEIGHTS, { extraNodes: [node] });
      await expect(loadModelFromFiles(files)).rejects.toThrow(
        new RegExp(`^The graph model needs executeAsync: node "flow/${opName}_1" uses the ${opName} op; Brink runs models with execute\\(\\)`),
      );
    });
  }

  it('a control-flow op inside a library function (TF v2 control flow body) is found too', async () => {
    const files = graphModelFiles(SPEC, WEIGHTS);
    const json = JSON.parse(new TextDecoder().decode(files[0]!.bytes)) as { modelTopology: Record<string, unknown> };
    json.modelTopology['library'] = { function: [{ signature: { name: 'body' }, nodeDef: [{ name: 'body/loop', op: 'StatelessWhile' }] }] };
    await expect(loadModelFromFiles([text('model.json', JSON.stringify(json)), ...files.slice(1)])).rejects.toThrow(
      /node "body\/loop" uses the StatelessWhile op/,
    );
  });

  it('an .onnx file among the files goes to the ONNX loader', async () => {
    const tfjsFiles = await layersModelFiles(SPEC, WEIGHTS);
    const garbage = { name: 'upload/net.onnx', bytes: new Uint8Array([0xff, 0xff, 0xff, 0x07]) };
    // The ONNX loader's own malformed-file message shows the file reached it (and not the tfjs path).
    await expect(loadModelFromFiles([...tfjsFiles, garbage])).rejects.toThrow(MALFORMED_PREFIX);
  });

  it('more than one .onnx file', async () => {
    await expect(loadModelFromFiles([text('a.onnx', ''), text('b.onnx', '')])).rejects.toThrow(/^More than one \.onnx file among the files \(a\.onnx, b\.onnx\)/);
  });
});
