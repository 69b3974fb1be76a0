/**
 * describeModel: layout, size, class count, output kind and parameter count of loaded models, and the
 * preprocessing checks that depend on them. Parameter counts are checked against the closed form
 * for the layer sizes (conv k·k·Cin·Cout + Cout, dense in·out + out).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { useBackend } from '../helpers/backend.ts';
import { loadModelFromFiles } from '../../src/core/models/loadModel.ts';
import { detectLayout, rowsAreProbabilities } from '../../src/core/models/describeModel.ts';
import { makeLogitsFn, preprocessingFor, validatePreprocessing } from '../../src/core/models/pipeline.ts';
import type { LoadedModel, ModelDescription } from '../../src/core/types.ts';
import { buildLayersModel, closedFormParameters, layersModelFiles, layersModelToFiles, randomWeights, type SmallNetSpec } from './fixtures.ts';
import { graphModelFiles } from './graphFixture.ts';

const BASE = { height: 7, width: 6, channels: 3, filters: 3, hidden: 5, classes: 4 } as const;
const NHWC_SOFTMAX: SmallNetSpec = { ...BASE, layout: 'nhwc', activation: 'tanh', softmax: true };
const NCHW_LOGITS: SmallNetSpec = { ...BASE, layout: 'nchw', activation: 'relu', softmax: false };

beforeAll(async () => {
  await useBackend('cpu');
});

async function describeFiles(files: Parameters<typeof loadModelFromFiles>[0]): Promise<ModelDescription> {
  const model = await loadModelFromFiles(files);
  model.dispose();
  return model.description;
}

describe('layout detection from the input shape', () => {
  it('finds the channel dimension', () => {
    // Closed form: a 1/3/4 in the last position is NHWC, in position 1 it is NCHW.
    expect(detectLayout([null, 28, 28, 1])).toEqual({ layout: 'nhwc', notes: [] });
    expect(detectLayout([null, 224, 224, 3])).toEqual({ layout: 'nhwc', notes: [] });
    expect(detectLayout([null, 1, 28, 28])).toEqual({ layout: 'nchw', notes: [] });
    expect(detectLayout([null, 3, null, null])).toEqual({ layout: 'nchw', notes: [] });
    const ambiguous = detectLayout([null, 3, 8, 3]);
    expect(ambiguous.layout).toBe('nhwc');
    expect(ambiguous.notes[0]).toMatch(/could be NHWC or NCHW/);
  });

  it('reads probability rows', () => {
    // Closed form: rows of non-negative values summing to 1 (within 1e-4) are probabilities.
    expect(rowsAreProbabilities([0.2, 0.8, 0.5, 0.5], 2, 2)).toBe(true);
    expect(rowsAreProbabilities([0.2, 0.80005, 1, 0], 2, 2)).toBe(true);
    expect(rowsAreProbabilities([0.2, 0.8002, 1, 0], 2, 2)).toBe(false);
    expect(rowsAreProbabilities([-0.1, 1.1], 1, 2)).toBe(false);
  });
});

describe('descriptions of loaded models', () => {
  it('layers model, NHWC, softmax activation', async () => {
    const d = await describeFiles(await layersModelFiles(NHWC_SOFTMAX, randomWeights(NHWC_SOFTMAX, 3)));
    expect(d).toMatchObject({ format: 'layers', layout: 'nhwc', height: 7, width: 6, channels: 3, numClasses: 4, outputKind: 'probabilities' });
    expect(d.inputShape).toEqual([null, 7, 6, 3]);
    // Closed form: 3·3·3·3 + 3 + (5·4·3)·5 + 5 + 5·4 + 4 = 84 + 305 + 24 = 413.
    expect(d.parameterCount).toBe(413);
    expect(d.parameterCount).toBe(closedFormParameters(NHWC_SOFTMAX));
    expect(d.notes).toEqual([]);
  });

  it('graph model, NCHW input, logits', async () => {
    const d = await describeFiles(graphModelFiles(NCHW_LOGITS, randomWeights(NCHW_LOGITS, 4)));
    expect(d).toMatchObject({ format: 'graph', layout: 'nchw', height: 7, width: 6, channels: 3, numClasses: 4, outputKind: 'logits' });
    expect(d.inputShape).toEqual([null, 3, 7, 6]);
    // Closed form, as above; the int32 reshape/transpose constants are not parameters.
    expect(d.parameterCount).toBe(413);
  });

  it('graph model ending in Softmax → Identity is probabilities', async () => {
    const spec: SmallNetSpec = { ...NCHW_LOGITS, softmax: true };
    const d = await describeFiles(graphModelFiles(spec, randomWeights(spec, 5), { identityOutput: true }));
    expect(d.outputKind).toBe('probabilities');
    expect(d.notes).toEqual([]);
  });

  it('a softmax hidden behind a reshape is found by the probe pass', async () => {
    const model = buildLayersModel(NHWC_SOFTMAX, randomWeights(NHWC_SOFTMAX, 6));
    model.add(tf.layers.reshape({ targetShape: [BASE.classes] }));
    const files = await layersModelToFiles(model);
    model.dispose();
    const d = await describeFiles(files);
    // Reference: softmax rows are non-negative and sum to 1 (definition of softmax).
    expect(d.outputKind).toBe('probabilities');
    expect(d.notes.join(' ')).toMatch(/sum to 1 on a test input/);
  });

  it('layers model, NCHW via Permute, logits', async () => {
    const spec: SmallNetSpec = { ...NCHW_LOGITS, activation: 'tanh' };
    const d = await describeFiles(await layersModelFiles(spec, randomWeights(spec, 7)));
    expect(d).toMatchObject({ layout: 'nchw', channels: 3, height: 7, width: 6, outputKind: 'logits', numClasses: 4 });
  });

  it('free image dimensions give a note and no probe', async () => {
    const spec: SmallNetSpec = { ...NCHW_LOGITS, layout: 'nhwc' };
    const d = await describeFiles(graphModelFiles(spec, randomWeights(spec, 8), { inputShape: [-1, -1, -1, 3] }));
    expect(d).toMatchObject({ layout: 'nhwc', height: 0, width: 0, channels: 3, numClasses: 0, outputKind: 'logits' });
    expect(d.notes.join(' ')).toMatch(/free image dimensions; set the input size/);
  });
  it('a model with one output score (no class scores) is refused with a message naming the file', async () => {
    // One output unit cannot be a classifier's score vector: robust accuracy needs at least two classes (definition).
    const spec: SmallNetSpec = { ...NCHW_LOGITS, layout: 'nhwc', classes: 1 };
    const files = await layersModelFiles(spec, randomWeights(spec, 9));
    const before = tf.memory().numTensors;
    await expect(loadModelFromFiles(files)).rejects.toThrow(/model\.json gives a single output score per image/);
    expect(tf.memory().numTensors).toBe(before);
  });
});

describe('preprocessing checks', () => {
  let model: LoadedModel;
  beforeAll(async () => {
    model = await loadModelFromFiles(graphModelFiles(NCHW_LOGITS, randomWeights(NCHW_LOGITS, 9)));
  });

  it('the default follows the detected layout and is valid', () => {
    const pre = preprocessingFor(model.description);
    expect(pre).toEqual({ inputRange: '0,1', mean: [0], std: [1], layout: 'nchw' });
    expect(validatePreprocessing(pre, model.description)).toBeNull();
  });

  it('names wrong lengths, zero std and a layout that makes no sense', () => {
    const base = preprocessingFor(model.description);
    expect(validatePreprocessing({ ...base, mean: [0.5, 0.5] }, model.description)).toMatch(/mean has 2 values but the model input has 3 channel/);
    expect(validatePreprocessing({ ...base, std: [0.2, 0, 0.2] }, model.description)).toMatch(/std value must be positive/);
    expect(validatePreprocessing({ ...base, layout: 'nhwc' }, model.description)).toMatch(/Read as NHWC, .* has 6 channels/);
    expect(() => makeLogitsFn(model, { ...base, mean: [1, 2] })).toThrow(/mean has 2 values/);
  });
});

describe('probability outputs become log-probabilities', () => {
  it('a saturated softmax stays finite: log(max(p, 1e-30))', () => {
    const description: ModelDescription = {
      format: 'layers', inputShape: [null, 1, 1, 3], layout: 'nhwc', height: 1, width: 1, channels: 3,
      numClasses: 3, outputKind: 'probabilities', parameterCount: 0, notes: [],
    };
    // A hand-made model: softmax of 1000·x, saturated so that float32 rounds the loser to exactly 0.
    const stub: LoadedModel = { description, forward: (x) => tf.softmax(tf.mul(tf.reshape(x, [-1, 3]), 1000)), dispose: () => undefined };
    const fn = makeLogitsFn(stub, preprocessingFor(description));
    const { value, grad } = tf.tidy(() => {
      const x = tf.tensor4d([1, 0, 0.5], [1, 1, 1, 3]);
      const g = tf.grad((v) => tf.sum(fn(v as tf.Tensor4D)))(x);
      return { value: fn(x).dataSync(), grad: g.dataSync() };
    });
    // Closed form: log 1 = 0 and log(1e-30) = −69.0776 for the two losers (e^−500, e^−1000 underflow).
    expect(value[0]).toBeCloseTo(0, 6);
    expect(value[1]).toBeCloseTo(Math.log(1e-30), 3);
    expect(value[2]).toBeCloseTo(Math.log(1e-30), 3);
    expect(Array.from(grad).every(Number.isFinite)).toBe(true);
  });
});
