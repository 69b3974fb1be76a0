import { it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { useBackend } from '../helpers/backend.ts';
import { loadOnnxModel } from '../../src/core/onnx/loadOnnx.ts';
import { makeLogitsFn, preprocessingFor } from '../../src/core/models/pipeline.ts';
import { fixtureIndex, readFixture, referenceArray } from './fixtures.ts';
it('probe', async () => {
  const index = fixtureIndex();
  const images = referenceArray(index.images);
  const labels = Int32Array.from(index.labels);
  const torch = referenceArray(index.models['view_flatten']!.gradient);
  for (const b of ['wasm', 'cpu'] as const) {
    await useBackend(b);
    const model = await loadOnnxModel(readFixture('view_flatten_opset11.onnx'));
    const f = makeLogitsFn(model, preprocessingFor(model.description));
    const g = tf.tidy(() => tf.grad((x: tf.Tensor4D) => { const z = f(x); return tf.neg(tf.sum(tf.mul(tf.oneHot(tf.tensor1d(labels,'int32'), 10), tf.logSoftmax(z)))); })(tf.tensor4d(images, [4,16,16,3])).dataSync());
    let worst = 0, wi = 0, scale = 0;
    for (let i = 0; i < g.length; i++) { const d = Math.abs(g[i]! - torch[i]!); scale = Math.max(scale, Math.abs(torch[i]!)); if (d > worst) { worst = d; wi = i; } }
    const n = Math.floor(wi / 768), r = wi % 768, y = Math.floor(r / 48), xx = Math.floor((r % 48) / 3), c = r % 3;
    console.log(b, 'worst', worst, 'scale', scale, 'at', n, y, xx, c, 'ours', g[wi], 'torch', torch[wi]);
    const bad = []; for (let i = 0; i < g.length; i++) if (Math.abs(g[i]! - torch[i]!) > 1e-3 * scale) bad.push(i);
    console.log(b, 'count bad', bad.length, bad.slice(0, 20).map(i => { const r = i % 768; return `${Math.floor(i/768)}:${Math.floor(r/48)},${Math.floor((r%48)/3)},${r%3}`; }).join(' '));
    model.dispose();
  }
});
