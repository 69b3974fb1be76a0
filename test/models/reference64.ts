/**
 * Float64 re-implementation of the small test net and of the pixel pipeline, written from the
 * textbook definitions (valid cross-correlation as in TensorFlow's Conv2D, dense = x·W + b,
 * log-softmax), plus central finite differences. It shares no code with src/core.
 */
import type { InputRange, Preprocessing } from '../../src/core/types.ts';
import { flatSize, type SmallNetSpec, type SmallNetWeights } from './fixtures.ts';

const act = (spec: SmallNetSpec, v: number): number => (spec.activation === 'relu' ? Math.max(0, v) : Math.tanh(v));

/** The net on one NHWC image (H·W·C values) → K raw outputs (softmax applied when spec.softmax). */
function netOnImage(spec: SmallNetSpec, w: SmallNetWeights, img: Float64Array): Float64Array {
  const { height: H, width: W, channels: C, filters: F, hidden, classes: K } = spec;
  const oh = H - 2;
  const ow = W - 2;
  const flat = new Float64Array(flatSize(spec));
  for (let i = 0; i < oh; i++) {
    for (let j = 0; j < ow; j++) {
      for (let f = 0; f < F; f++) {
        let s = w.b1[f]!;
        for (let di = 0; di < 3; di++) {
          for (let dj = 0; dj < 3; dj++) {
            for (let c = 0; c < C; c++) s += img[((i + di) * W + (j + dj)) * C + c]! * w.w1[((di * 3 + dj) * C + c) * F + f]!;
          }
        }
        flat[(i * ow + j) * F + f] = act(spec, s);
      }
    }
  }
  const h = new Float64Array(hidden);
  for (let u = 0; u < hidden; u++) {
    let s = w.b2[u]!;
    for (let d = 0; d < flat.length; d++) s += flat[d]! * w.w2[d * hidden + u]!;
    h[u] = act(spec, s);
  }
  const out = new Float64Array(K);
  for (let k = 0; k < K; k++) {
    let s = w.b3[k]!;
    for (let u = 0; u < hidden; u++) s += h[u]! * w.w3[u * K + k]!;
    out[k] = s;
  }
  return spec.softmax ? softmax(out) : out;
}

function softmax(z: Float64Array): Float64Array {
  const m = Math.max(...z);
  const e = z.map((v) => Math.exp(v - m));
  const sum = e.reduce((a, b) => a + b, 0);
  return e.map((v) => v / sum);
}

/** Model-space forward on N images given in the model's own layout (NHWC or NCHW). */
export function netForward64(spec: SmallNetSpec, w: SmallNetWeights, input: Float64Array, n: number): Float64Array {
  const { height: H, width: W, channels: C, classes: K } = spec;
  const per = H * W * C;
  const out = new Float64Array(n * K);
  for (let b = 0; b < n; b++) {
    const img = new Float64Array(per);
    for (let i = 0; i < H; i++) {
      for (let j = 0; j < W; j++) {
        for (let c = 0; c < C; c++) {
          const src = spec.layout === 'nhwc' ? (i * W + j) * C + c : (c * H + i) * W + j;
          img[(i * W + j) * C + c] = input[b * per + src]!;
        }
      }
    }
    out.set(netOnImage(spec, w, img), b * K);
  }
  return out;
}

const RANGE: Record<InputRange, [number, number]> = { '0,1': [0, 1], '0,255': [0, 255], '-1,1': [-1, 1] };

/** Pixels (NHWC, [0,1]) → model input in its layout: v = lo + (hi − lo)·x, then (v − mean)/std. */
export function preprocess64(spec: SmallNetSpec, pre: Preprocessing, pixels: Float64Array, n: number): Float64Array {
  const { height: H, width: W, channels: C } = spec;
  const [lo, hi] = RANGE[pre.inputRange];
  const out = new Float64Array(pixels.length);
  for (let b = 0; b < n; b++) {
    for (let i = 0; i < H; i++) {
      for (let j = 0; j < W; j++) {
        for (let c = 0; c < C; c++) {
          const mean = pre.mean[pre.mean.length === 1 ? 0 : c]!;
          const std = pre.std[pre.std.length === 1 ? 0 : c]!;
          const v = (lo + (hi - lo) * pixels[((b * H + i) * W + j) * C + c]! - mean) / std;
          const dst = pre.layout === 'nhwc' ? ((b * H + i) * W + j) * C + c : ((b * C + c) * H + i) * W + j;
          out[dst] = v;
        }
      }
    }
  }
  return out;
}

/** The whole pipeline in float64: logits, or log-probabilities for a softmax net. */
export function pipeline64(spec: SmallNetSpec, w: SmallNetWeights, pre: Preprocessing, pixels: Float64Array, n: number): Float64Array {
  const y = netForward64(spec, w, preprocess64(spec, pre, pixels, n), n);
  return spec.softmax ? y.map(Math.log) : y;
}

/** Central differences (f(x + h·e_i) − f(x − h·e_i)) / 2h for every coordinate i. */
export function centralDifferences(f: (x: Float64Array) => number, x: Float64Array, h: number): Float64Array {
  const g = new Float64Array(x.length);
  const probe = Float64Array.from(x);
  for (let i = 0; i < x.length; i++) {
    probe[i] = x[i]! + h;
    const up = f(probe);
    probe[i] = x[i]! - h;
    const down = f(probe);
    probe[i] = x[i]!;
    g[i] = (up - down) / (2 * h);
  }
  return g;
}

/** Σ c·y, the scalar whose input gradient is tested (it probes the whole Jacobian at once). */
export function weightedSum(y: ArrayLike<number>, c: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < y.length; i++) s += y[i]! * c[i]!;
  return s;
}
