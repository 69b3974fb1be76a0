import * as tf from '@tensorflow/tfjs';
import path from 'node:path';
import { initBackend } from '../src/core/backend/initBackend.ts';
import { registerBrinkWasmKernels, restoreStockWasmKernels } from '../src/core/backend/kernels/registerKernels.ts';
await initBackend({ wasmPath: path.resolve('node_modules/@tensorflow/tfjs-backend-wasm/dist'), backend: 'wasm' });
const r = (s: number[]) => tf.randomNormal(s);
const cases: Array<[string, string, tf.NamedTensorMap, object]> = [];
{
  const x1 = r([100,28,28,1]); const y1 = tf.maxPool(r([100,26,26,32]) as tf.Tensor4D, 2, 2, 'valid');
  const p1in = r([100,26,26,32]); const p1out = tf.maxPool(p1in as tf.Tensor4D, 2, 2, 'valid');
  const p2in = r([100,11,11,64]); const p2out = tf.maxPool(p2in as tf.Tensor4D, 2, 2, 'valid');
  cases.push(['convIn1', 'Conv2DBackpropInput', { dy: r([100,26,26,32]), filter: r([3,3,1,32]) }, { strides: 1, pad: 'valid', dataFormat: 'NHWC', inputShape: [100,28,28,1] }]);
  cases.push(['convIn2', 'Conv2DBackpropInput', { dy: r([100,11,11,64]), filter: r([3,3,32,64]) }, { strides: 1, pad: 'valid', dataFormat: 'NHWC', inputShape: [100,13,13,32] }]);
  cases.push(['pool1', 'MaxPoolGrad', { dy: r([100,13,13,32]), input: p1in, output: p1out }, { filterSize: 2, strides: 2, pad: 'valid' }]);
  cases.push(['pool2', 'MaxPoolGrad', { dy: r([100,5,5,64]), input: p2in, output: p2out }, { filterSize: 2, strides: 2, pad: 'valid' }]);
  cases.push(['fwdconv2', 'Conv2D', { x: r([100,13,13,32]), filter: r([3,3,32,64]) }, { strides: 1, pad: 'valid', dataFormat: 'NHWC', dilations: 1 }]);
  void x1; void y1;
}
for (const mode of ['stock', 'brink']) {
  if (mode === 'stock') restoreStockWasmKernels(); else registerBrinkWasmKernels();
  for (const [label, name, inputs, attrs] of cases) {
    const times: number[] = [];
    for (let i = 0; i < 5; i++) {
      const t0 = performance.now();
      const out = tf.engine().runKernel(name, inputs, attrs as tf.NamedAttrMap) as tf.Tensor; out.dataSync(); out.dispose();
      times.push(performance.now() - t0);
    }
    times.sort((a, b) => a - b);
    console.log(mode, label, times[2]!.toFixed(1));
  }
}
if (process.argv[2] === 'profile') {
  registerBrinkWasmKernels();
  for (const [label, name, inputs, attrs] of cases.slice(0, 4)) {
    const prof = await tf.profile(() => { const o = tf.engine().runKernel(name, inputs, attrs as tf.NamedAttrMap) as tf.Tensor; o.dataSync(); return o; });
    const agg = new Map<string, number>();
    for (const k of prof.kernels) agg.set(k.name, (agg.get(k.name) ?? 0) + (k.kernelTimeMs as number));
    console.log(label, [...agg.entries()].map(([k, v]) => `${k}:${v.toFixed(1)}`).join(' '));
  }
}
