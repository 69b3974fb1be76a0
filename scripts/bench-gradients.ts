/**
 * Gradient benchmark (`npm run bench`): forward time and forward + input-gradient time of the
 * reference CNN on the WASM backend, with the stock tfjs 4.22 kernels and with Brink's
 * replacements, side by side in one run. The two configurations are interleaved and medians of
 * the repeated runs are reported.
 *
 * Reference CNN: conv 32 3×3 relu → max-pool 2 → conv 64 3×3 relu → max-pool 2 → dense 128 relu
 * → dense 10 (logits); input 28×28×1; batch 100; seeded random weights. The gradient is that of
 * the summed softmax cross-entropy of the logits with respect to the input.
 */
import path from 'node:path';
import * as tf from '@tensorflow/tfjs';
import { formatBackend, initBackend } from '../src/core/backend/initBackend.ts';
import { registerBrinkWasmKernels, restoreStockWasmKernels } from '../src/core/backend/kernels/registerKernels.ts';
import { createRng, type Rng } from '../src/core/random/rng.ts';

const BATCH = 100;
const CLASSES = 10;
const WARMUP_RUNS = 2;
const MAX_REPEATS = 9;
const MIN_REPEATS = 3;
/** Stop repeating after this much measuring, to keep the whole run under about two minutes. */
const TIME_BUDGET_MS = 80_000;

interface Configuration {
  readonly name: string;
  readonly activate: () => void;
  readonly forwardMs: number[];
  readonly gradientMs: number[];
  lastGradient: Float32Array | null;
}

function buildReferenceCnn(rng: Rng): tf.LayersModel {
  const model = tf.sequential({
    layers: [
      tf.layers.conv2d({ inputShape: [28, 28, 1], filters: 32, kernelSize: 3, activation: 'relu' }),
      tf.layers.maxPooling2d({ poolSize: 2 }),
      tf.layers.conv2d({ filters: 64, kernelSize: 3, activation: 'relu' }),
      tf.layers.maxPooling2d({ poolSize: 2 }),
      tf.layers.flatten(),
      tf.layers.dense({ units: 128, activation: 'relu' }),
      tf.layers.dense({ units: CLASSES }),
    ],
  });
  // He-style scale (common practice) so activations neither vanish nor explode.
  const weights = model.weights.map((w) => {
    const shape = w.shape as number[];
    const size = shape.reduce((a, b) => a * b, 1);
    const fanIn = shape.length > 1 ? size / shape[shape.length - 1]! : 1;
    const scale = shape.length > 1 ? Math.sqrt(2 / fanIn) : 0.01;
    return tf.tensor(rng.normalArray(size).map((v) => v * scale), shape);
  });
  model.setWeights(weights);
  tf.dispose(weights);
  return model;
}

function timeMs(work: () => void): number {
  const start = performance.now();
  work();
  return performance.now() - start;
}

function median(values: readonly number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const mid = Math.floor(sorted.length / 2);
  return sorted.length % 2 === 1 ? sorted[mid]! : (sorted[mid - 1]! + sorted[mid]!) / 2;
}

function makeRunners(model: tf.LayersModel, x: tf.Tensor4D, labels: tf.Tensor2D) {
  const logits = (input: tf.Tensor4D): tf.Tensor2D => model.apply(input, { training: false }) as tf.Tensor2D;
  const loss = (input: tf.Tensor): tf.Scalar =>
    tf.losses.softmaxCrossEntropy(labels, logits(input as tf.Tensor4D), undefined, 0, tf.Reduction.SUM) as tf.Scalar;
  const gradient = tf.grad(loss);
  return {
    forward: (): void => {
      tf.tidy(() => logits(x).dataSync());
    },
    gradient: (): Float32Array => tf.tidy(() => gradient(x).dataSync() as Float32Array),
  };
}

function maxAbsDifference(a: Float32Array, b: Float32Array): number {
  let worst = 0;
  for (let i = 0; i < a.length; i++) worst = Math.max(worst, Math.abs(a[i]! - b[i]!));
  return worst;
}

function printTable(configs: readonly Configuration[], repeats: number): void {
  const rows = configs.map((c) => {
    const f = median(c.forwardMs);
    const g = median(c.gradientMs);
    return [c.name, f.toFixed(1), g.toFixed(1), (g / f).toFixed(2)];
  });
  const header = ['kernels', 'forward ms', 'forward+grad ms', 'ratio'];
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i]!.length)));
  const line = (cells: readonly string[]): string => cells.map((cell, i) => (i === 0 ? cell.padEnd(widths[i]!) : cell.padStart(widths[i]!))).join('  ');
  console.log(`\nmedians of ${repeats} interleaved runs, batch ${BATCH}`);
  console.log(line(header));
  for (const row of rows) console.log(line(row));
}

async function main(): Promise<void> {
  const info = await initBackend({ wasmPath: path.resolve('node_modules/@tensorflow/tfjs-backend-wasm/dist'), backend: 'wasm' });
  if (info.name !== 'wasm') throw new Error(`the wasm backend did not start: ${info.notice ?? ''}`);
  console.log(`backend: ${formatBackend(info)}; reference CNN, input 28×28×1`);
  const rng = createRng(2024);
  const model = buildReferenceCnn(rng);
  const x = tf.tensor4d(rng.uniformArray(BATCH * 28 * 28, 0, 1), [BATCH, 28, 28, 1]);
  const labelValues = new Float32Array(BATCH * CLASSES);
  for (let i = 0; i < BATCH; i++) labelValues[i * CLASSES + rng.int(CLASSES)] = 1;
  const labels = tf.tensor2d(labelValues, [BATCH, CLASSES]);
  const run = makeRunners(model, x, labels);
  const configs: Configuration[] = [
    { name: 'stock tfjs 4.22 wasm', activate: restoreStockWasmKernels, forwardMs: [], gradientMs: [], lastGradient: null },
    { name: 'Brink wasm kernels', activate: registerBrinkWasmKernels, forwardMs: [], gradientMs: [], lastGradient: null },
  ];
  for (const config of configs) {
    config.activate();
    for (let i = 0; i < WARMUP_RUNS; i++) {
      run.forward();
      config.lastGradient = run.gradient();
    }
  }
  const tensorsBefore = tf.memory().numTensors;
  const start = performance.now();
  let repeats = 0;
  while (repeats < MAX_REPEATS && (repeats < MIN_REPEATS || performance.now() - start < TIME_BUDGET_MS)) {
    for (const config of configs) {
      config.activate();
      config.forwardMs.push(timeMs(run.forward));
      config.gradientMs.push(timeMs(() => (config.lastGradient = run.gradient())));
    }
    repeats++;
  }
  registerBrinkWasmKernels();
  printTable(configs, repeats);
  const [stock, ours] = configs.map((c) => c.lastGradient!);
  console.log(`max |input gradient, stock − Brink| = ${maxAbsDifference(stock!, ours!).toExponential(2)}`);
  console.log(`tensors before/after the timed runs: ${tensorsBefore}/${tf.memory().numTensors}`);
  tf.dispose([x, labels]);
  model.dispose();
}

await main();
