import * as tf from '@tensorflow/tfjs';
import path from 'node:path';
import { initBackend } from '../src/core/backend/initBackend.ts';
await initBackend({ wasmPath: path.resolve('node_modules/@tensorflow/tfjs-backend-wasm/dist'), backend: 'wasm' });
const model = tf.sequential({ layers: [
  tf.layers.conv2d({ inputShape: [28, 28, 1], filters: 32, kernelSize: 3, activation: 'relu' }),
  tf.layers.maxPooling2d({ poolSize: 2 }),
  tf.layers.conv2d({ filters: 64, kernelSize: 3, activation: 'relu' }),
  tf.layers.maxPooling2d({ poolSize: 2 }),
  tf.layers.flatten(), tf.layers.dense({ units: 128, activation: 'relu' }), tf.layers.dense({ units: 10 })] });
const x = tf.randomUniform([100, 28, 28, 1]) as tf.Tensor4D;
const labels = tf.oneHot(tf.randomUniform([100], 0, 10, 'int32') as tf.Tensor1D, 10).toFloat();
const g = tf.grad((i: tf.Tensor4D) => tf.losses.softmaxCrossEntropy(labels, model.apply(i) as tf.Tensor, undefined, 0, tf.Reduction.SUM) as tf.Scalar);
for (let i = 0; i < 3; i++) tf.tidy(() => g(x).dataSync());
const prof = await tf.profile(() => { const o = g(x); o.dataSync(); return o; });
const agg = new Map<string, number>();
for (const k of prof.kernels) agg.set(k.name, (agg.get(k.name) ?? 0) + (k.kernelTimeMs as number));
console.log([...agg.entries()].sort((a, b) => b[1] - a[1]).map(([k, v]) => `${k}:${v.toFixed(1)}`).join('\n'));
