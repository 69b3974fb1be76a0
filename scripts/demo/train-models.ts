/**
 * Trains the two demo models on freshly generated (invented) floor-marker images and writes them to
 * public/demo/models/{standard,hardened}/ with a card.json each:
 *   standard  plain training on clean images
 *   hardened  the standard model fine-tuned by PGD L∞ adversarial training (Madry et al. 2018)
 * Then reports clean accuracy on held-out images and robust accuracy under 10-step PGD.
 * Run: npm run demo:train   (seeded: the same code gives the same models on the same backend)
 * Options for quicker trials: --train-images=N --standard-epochs=N --hardened-epochs=N
 */
import path from 'node:path';
import * as tf from '@tensorflow/tfjs';
import { initBackend, formatBackend } from '../../src/core/backend/initBackend.ts';
import { createRng } from '../../src/core/random/rng.ts';
import { MARKER_CLASSES, generateMarkers, type MarkerSet } from './markers.ts';
import { MODELS_DIR, SAMPLES_PER_CLASS, SAMPLE_SEED, TRAIN_SEED, VALIDATION_SEED } from './demo-config.ts';
import { buildMarkerModel, copyMarkerModel, loadMarkerModel, saveMarkerModel } from './marker-model.ts';
import { trainEpoch, type Adversary } from './training.ts';
import { cleanAccuracy, robustAccuracy, type Tally } from './evaluate.ts';
import { writeModelCard, type ModelReport } from './model-card.ts';

const K = MARKER_CLASSES.length;

/** Every training setting, recorded in the model cards. */
export const SETTINGS = {
  trainImages: 6000,
  validationImages: 1200,
  batchSize: 64,
  standardEpochs: 6,
  standardLearningRate: 1e-3,
  hardenedEpochs: 6,
  hardenedLearningRate: 5e-4,
  adversary: { eps: 4 / 255, steps: 3, stepSize: (2.5 * (4 / 255)) / 3 } satisfies Adversary,
  evalEps: [2 / 255, 4 / 255, 8 / 255],
  evalSteps: 10,
};

function numericFlag(name: string, fallback: number): number {
  const arg = process.argv.find((a) => a.startsWith(`--${name}=`));
  if (arg === undefined) return fallback;
  const value = Number(arg.slice(name.length + 3));
  if (!Number.isInteger(value) || value <= 0) throw new Error(`--${name} must be a positive integer`);
  return value;
}

function seconds(since: number): string {
  return `${((performance.now() - since) / 1000).toFixed(0)} s`;
}

function percent(t: Tally): string {
  return `${(100 * t.accuracy).toFixed(1)} % (${t.correct}/${t.total})`;
}

async function trainModel(model: tf.LayersModel, train: MarkerSet, validation: MarkerSet, label: string, epochs: number, learningRate: number, adversary: Adversary | null, seed: number): Promise<void> {
  const optimizer = tf.train.adam(learningRate);
  const rng = createRng(seed);
  for (let epoch = 1; epoch <= epochs; epoch++) {
    const started = performance.now();
    const loss = await trainEpoch(model, optimizer, train, { batchSize: SETTINGS.batchSize, numClasses: K, rng, adversary });
    const val = await cleanAccuracy(model, validation);
    console.log(`${label} epoch ${epoch}/${epochs}: loss ${loss.toFixed(4)}, held-out clean ${percent(val)}, ${seconds(started)}, tensors ${tf.memory().numTensors}`);
  }
  optimizer.dispose();
}

async function measure(name: string, dir: string, validation: MarkerSet, samples: MarkerSet): Promise<ModelReport> {
  const model = await loadMarkerModel(dir);
  const heldOut = await cleanAccuracy(model, validation);
  const onSamples = await cleanAccuracy(model, samples);
  const robust: { eps: number; tally: Tally }[] = [];
  for (const [i, eps] of SETTINGS.evalEps.entries()) {
    robust.push({ eps, tally: await robustAccuracy(model, samples, eps, SETTINGS.evalSteps, 900 + i) });
  }
  model.dispose();
  console.log(`${name}: held-out clean ${percent(heldOut)}; committed samples clean ${percent(onSamples)}`);
  for (const r of robust) console.log(`${name}: PGD L∞ ε = ${Math.round(r.eps * 255)}/255, ${SETTINGS.evalSteps} steps: robust ${percent(r.tally)}`);
  return { heldOut, samples: onSamples, robust };
}

async function main(): Promise<void> {
  const wasmPath = path.resolve('node_modules/@tensorflow/tfjs-backend-wasm/dist') + '/';
  const backend = await initBackend({ wasmPath, backend: 'wasm' });
  console.log(`backend: ${formatBackend(backend)}${backend.notice ? ` — ${backend.notice}` : ''}`);
  const trainImages = numericFlag('train-images', SETTINGS.trainImages);
  const standardEpochs = numericFlag('standard-epochs', SETTINGS.standardEpochs);
  const hardenedEpochs = numericFlag('hardened-epochs', SETTINGS.hardenedEpochs);
  const total = performance.now();

  let started = performance.now();
  const train = generateMarkers(TRAIN_SEED, trainImages);
  const validation = generateMarkers(VALIDATION_SEED, SETTINGS.validationImages);
  const samples = generateMarkers(SAMPLE_SEED, SAMPLES_PER_CLASS * K);
  console.log(`generated ${trainImages} training, ${SETTINGS.validationImages} held-out and ${samples.labels.length} sample images in ${seconds(started)}`);

  started = performance.now();
  const standard = buildMarkerModel(K, createRng(TRAIN_SEED + 1));
  await trainModel(standard, train, validation, 'standard', standardEpochs, SETTINGS.standardLearningRate, null, TRAIN_SEED + 2);
  console.log(`standard training: ${seconds(started)}`);

  started = performance.now();
  const hardened = copyMarkerModel(standard, K, createRng(TRAIN_SEED + 3));
  await trainModel(hardened, train, validation, 'hardened', hardenedEpochs, SETTINGS.hardenedLearningRate, SETTINGS.adversary, TRAIN_SEED + 4);
  console.log(`hardened training: ${seconds(started)}`);

  const dirs = { standard: path.join(MODELS_DIR, 'standard'), hardened: path.join(MODELS_DIR, 'hardened') };
  for (const [name, model] of [['standard', standard], ['hardened', hardened]] as const) {
    const bytes = await saveMarkerModel(model, dirs[name]);
    console.log(`${name}: saved ${dirs[name]} (${(bytes / 1024).toFixed(0)} KiB, ${model.countParams()} parameters)`);
  }
  const parameters = standard.countParams();
  standard.dispose();
  hardened.dispose();

  started = performance.now();
  for (const name of ['standard', 'hardened'] as const) {
    const report = await measure(name, dirs[name], validation, samples);
    writeModelCard(dirs[name], name, report, { parameters, trainImages, standardEpochs, hardenedEpochs, settings: SETTINGS });
  }
  console.log(`evaluation: ${seconds(started)}; total ${seconds(total)}`);
}

await main();
