/**
 * Elementwise one-input operators (activations and friends). They keep whichever layout their
 * input is in, so they never add a transpose. Semantics: the ONNX operator docs (onnx/docs/Operators.md).
 */
import * as tf from '@tensorflow/tfjs';
import { hostResult, kernelResult, type OpCompiler, type OpContext } from '../context.ts';
import type { HostValue } from '../values.ts';

const FLT_MAX = 3.4028234663852886e38;

type Elementwise = (x: tf.Tensor) => tf.Tensor;

/**
 * An operator y = f(x), f made of differentiable tfjs ops. `make` reads the attributes once at
 * load time; kernels never capture the context (it holds the load-time data).
 */
function unary(make: (ctx: OpContext) => Elementwise): OpCompiler {
  return (ctx) => {
    const f = make(ctx);
    return kernelResult([ctx.meta(0)], [0], ({ input }) => [input(0).map(f)]);
  };
}

/** A parameterless operator. */
function simple(f: Elementwise): OpCompiler {
  return unary(() => f);
}

/** Identity passes load-time values through untouched (shape arithmetic often goes through it). */
const identity: OpCompiler = (ctx) => {
  const host = ctx.host(0);
  if (host !== undefined) return hostResult(host);
  return kernelResult([ctx.meta(0)], [0], ({ input }) => [input(0)]);
};

/** Dropout at inference is the identity; its optional mask output is all true. */
const dropout: OpCompiler = (ctx) => {
  const training = ctx.has(2) ? ctx.requireInts(2, 'training_mode')[0] : 0;
  if (training === 1) ctx.fail('Dropout in training mode is not supported (export the model in eval mode)');
  const meta = ctx.meta(0);
  const host = ctx.host(0);
  if (host !== undefined) return hostResult(host, { shape: host.shape, dtype: 'bool', data: new Int32Array(host.data.length).fill(1) });
  return kernelResult([meta, { shape: meta.shape, dtype: 'bool' }], [0], ({ input }) => {
    const x = input(0);
    return [x, x.map((t) => tf.onesLike(t).cast('bool'))];
  });
};

/** A scalar taken from an optional load-time input (Clip's min/max since opset 11). */
function optionalScalar(ctx: OpContext, i: number, what: string, fallback: number): number {
  if (!ctx.has(i)) return fallback;
  const value: HostValue = ctx.requireHost(i, what);
  const v = value.data[0];
  if (value.data.length !== 1 || typeof v !== 'number') ctx.fail(`${what} must be a scalar known at load time`);
  return v as number;
}

/** Clip: attributes min/max before opset 11, optional inputs from 11 on (ReLU6 is Clip(0, 6)). */
const clip: OpCompiler = (ctx) => {
  const [lo, hi] =
    ctx.opset < 11
      ? [ctx.attrs.float('min', -FLT_MAX), ctx.attrs.float('max', FLT_MAX)]
      : [optionalScalar(ctx, 1, 'min', -FLT_MAX), optionalScalar(ctx, 2, 'max', FLT_MAX)];
  const meta = ctx.meta(0);
  // clipByValue's gradient passes where lo ≤ x ≤ hi; PyTorch's hardtanh passes only strictly inside.
  // They differ only for pre-activations exactly at a bound.
  return kernelResult([meta], [0], ({ input }) => [input(0).map((x) => tf.clipByValue(x, lo, hi))]);
};

function hardSigmoid(x: tf.Tensor, alpha: number, beta: number): tf.Tensor {
  return tf.clipByValue(tf.add(tf.mul(x, alpha), beta), 0, 1);
}

function gelu(x: tf.Tensor, approximate: string): tf.Tensor {
  if (approximate === 'tanh') {
    const inner = tf.mul(Math.sqrt(2 / Math.PI), tf.add(x, tf.mul(0.044715, tf.pow(x, 3))));
    return tf.mul(tf.mul(0.5, x), tf.add(1, tf.tanh(inner)));
  }
  return tf.mul(tf.mul(0.5, x), tf.add(1, tf.erf(tf.mul(x, Math.SQRT1_2))));
}

export const ELEMENTWISE_OPS: Record<string, OpCompiler> = {
  Identity: identity,
  Dropout: dropout,
  Relu: simple((x) => tf.relu(x)),
  Sigmoid: simple((x) => tf.sigmoid(x)),
  Tanh: simple((x) => tf.tanh(x)),
  Exp: simple((x) => tf.exp(x)),
  Log: simple((x) => tf.log(x)),
  Neg: simple((x) => tf.neg(x)),
  Abs: simple((x) => tf.abs(x)),
  Sqrt: simple((x) => tf.sqrt(x)),
  Reciprocal: simple((x) => tf.reciprocal(x)),
  Erf: simple((x) => tf.erf(x)),
  Softplus: simple((x) => tf.softplus(x)),
  Elu: unary((ctx) => {
    const alpha = ctx.attrs.float('alpha', 1);
    return (x) => (alpha === 1 ? tf.elu(x) : tf.where(tf.greater(x, 0), x, tf.mul(alpha, tf.expm1(x))));
  }),
  LeakyRelu: unary((ctx) => {
    const alpha = ctx.attrs.float('alpha', 0.01);
    return (x) => tf.leakyRelu(x, alpha);
  }),
  HardSigmoid: unary((ctx) => {
    const alpha = ctx.attrs.float('alpha', 0.2);
    const beta = ctx.attrs.float('beta', 0.5);
    return (x) => hardSigmoid(x, alpha, beta);
  }),
  HardSwish: simple((x) => tf.mul(x, hardSigmoid(x, 1 / 6, 0.5))),
  Gelu: unary((ctx) => {
    const approximate = ctx.attrs.string('approximate', 'none');
    return (x) => gelu(x, approximate);
  }),
  Clip: clip,
};
