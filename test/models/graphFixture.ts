/**
 * A hand-written tfjs graph-model model.json for the small net of fixtures.ts:
 * Placeholder → (Transpose for NCHW) → Conv2D → BiasAdd → Relu/Tanh → Reshape → MatMul → BiasAdd →
 * Relu/Tanh → MatMul → BiasAdd (→ Softmax), with Const weights in a manifest and one or more shards.
 * The attribute encoding (base64 strings, "list"/"i" ints, DT_* types) follows TensorFlow's GraphDef JSON.
 */
import type { NamedBytes } from '../../src/core/types.ts';
import { flatSize, type FileOptions, type SmallNetSpec, type SmallNetWeights } from './fixtures.ts';

interface GraphNodeJson {
  name: string;
  op: string;
  input?: string[];
  attr?: Record<string, unknown>;
}

interface ConstWeight {
  readonly name: string;
  readonly shape: number[];
  readonly dtype: 'float32' | 'int32';
  readonly values: Float32Array | Int32Array;
}

const FLOAT = { type: 'DT_FLOAT' };
const b64 = (s: string): string => Buffer.from(s, 'utf8').toString('base64');
const dims = (shape: readonly number[]): { dim: { size: string }[] } => ({ dim: shape.map((d) => ({ size: String(d) })) });
const ints = (values: readonly number[]): { list: { i: string[] } } => ({ list: { i: values.map(String) } });

function constNode(w: ConstWeight): GraphNodeJson {
  const dtype = w.dtype === 'float32' ? 'DT_FLOAT' : 'DT_INT32';
  return { name: w.name, op: 'Const', attr: { value: { tensor: { dtype, tensorShape: dims(w.shape) } }, dtype: { type: dtype } } };
}

function op(name: string, kind: string, input: string[], attr: Record<string, unknown> = { T: FLOAT }): GraphNodeJson {
  return { name, op: kind, input, attr };
}

export interface GraphOptions extends FileOptions {
  /** Extra nodes appended to the graph (e.g. a control-flow op or a second output). */
  readonly extraNodes?: readonly GraphNodeJson[];
  /** Placeholder shape override (default [-1, H, W, C] or [-1, C, H, W]). */
  readonly inputShape?: readonly number[];
  /** Wrap the output in an Identity node (as converters often do). */
  readonly identityOutput?: boolean;
}

function weightsOf(spec: SmallNetSpec, w: SmallNetWeights): ConstWeight[] {
  const d = flatSize(spec);
  const list: ConstWeight[] = [
    { name: 'conv/kernel', shape: [3, 3, spec.channels, spec.filters], dtype: 'float32', values: w.w1 },
    { name: 'conv/bias', shape: [spec.filters], dtype: 'float32', values: w.b1 },
    { name: 'flat/shape', shape: [2], dtype: 'int32', values: new Int32Array([-1, d]) },
    { name: 'hidden/kernel', shape: [d, spec.hidden], dtype: 'float32', values: w.w2 },
    { name: 'hidden/bias', shape: [spec.hidden], dtype: 'float32', values: w.b2 },
    { name: 'out/kernel', shape: [spec.hidden, spec.classes], dtype: 'float32', values: w.w3 },
    { name: 'out/bias', shape: [spec.classes], dtype: 'float32', values: w.b3 },
  ];
  if (spec.layout === 'nchw') list.unshift({ name: 'to_nhwc/perm', shape: [4], dtype: 'int32', values: new Int32Array([0, 2, 3, 1]) });
  return list;
}

function graphNodes(spec: SmallNetSpec, weights: readonly ConstWeight[], options: GraphOptions): GraphNodeJson[] {
  const act = spec.activation === 'relu' ? 'Relu' : 'Tanh';
  const shape = options.inputShape ?? (spec.layout === 'nhwc' ? [-1, spec.height, spec.width, spec.channels] : [-1, spec.channels, spec.height, spec.width]);
  const nodes: GraphNodeJson[] = [{ name: 'x', op: 'Placeholder', attr: { dtype: FLOAT, shape: { shape: dims(shape) } } }];
  nodes.push(...weights.map(constNode));
  let image = 'x';
  if (spec.layout === 'nchw') {
    nodes.push(op('to_nhwc', 'Transpose', ['x', 'to_nhwc/perm'], { T: FLOAT, Tperm: { type: 'DT_INT32' } }));
    image = 'to_nhwc';
  }
  const convAttr = { T: FLOAT, strides: ints([1, 1, 1, 1]), dilations: ints([1, 1, 1, 1]), padding: { s: b64('VALID') }, data_format: { s: b64('NHWC') } };
  const matmulAttr = { T: FLOAT, transpose_a: { b: false }, transpose_b: { b: false } };
  nodes.push(
    op('conv/Conv2D', 'Conv2D', [image, 'conv/kernel'], convAttr),
    op('conv/BiasAdd', 'BiasAdd', ['conv/Conv2D', 'conv/bias'], { T: FLOAT, data_format: { s: b64('NHWC') } }),
    op('conv/act', act, ['conv/BiasAdd']),
    op('flat', 'Reshape', ['conv/act', 'flat/shape'], { T: FLOAT, Tshape: { type: 'DT_INT32' } }),
    op('hidden/MatMul', 'MatMul', ['flat', 'hidden/kernel'], matmulAttr),
    op('hidden/BiasAdd', 'BiasAdd', ['hidden/MatMul', 'hidden/bias']),
    op('hidden/act', act, ['hidden/BiasAdd']),
    op('out/MatMul', 'MatMul', ['hidden/act', 'out/kernel'], matmulAttr),
    op('out/BiasAdd', 'BiasAdd', ['out/MatMul', 'out/bias']),
  );
  let last = 'out/BiasAdd';
  if (spec.softmax) {
    nodes.push(op('out/Softmax', 'Softmax', [last]));
    last = 'out/Softmax';
  }
  if (options.identityOutput === true) nodes.push(op('output', 'Identity', [last]));
  nodes.push(...(options.extraNodes ?? []));
  return nodes;
}

function concatWeights(weights: readonly ConstWeight[]): Uint8Array {
  const total = weights.reduce((n, w) => n + w.values.byteLength, 0);
  const out = new Uint8Array(total);
  let offset = 0;
  for (const w of weights) {
    out.set(new Uint8Array(w.values.buffer, w.values.byteOffset, w.values.byteLength), offset);
    offset += w.values.byteLength;
  }
  return out;
}

/** The graph-model files (model.json + shards) for a spec and its weights. */
export function graphModelFiles(spec: SmallNetSpec, weights: SmallNetWeights, options: GraphOptions = {}): NamedBytes[] {
  const consts = weightsOf(spec, weights);
  const data = concatWeights(consts);
  const prefix = options.prefix ?? '';
  const count = options.shards ?? 1;
  const shards: NamedBytes[] = [];
  for (let i = 0; i < count; i++) {
    const start = Math.floor((data.length * i) / count);
    const end = Math.floor((data.length * (i + 1)) / count);
    shards.push({ name: `${prefix}graph-shard${i + 1}of${count}.bin`, bytes: data.slice(start, end) });
  }
  const json = {
    format: 'graph-model',
    generatedBy: 'hand-written test fixture',
    convertedBy: null,
    modelTopology: { node: graphNodes(spec, consts, options), library: {}, versions: { producer: 1 } },
    weightsManifest: [
      { paths: shards.map((s) => s.name.slice(prefix.length)), weights: consts.map((w) => ({ name: w.name, shape: w.shape, dtype: w.dtype })) },
    ],
  };
  return [{ name: `${prefix}${options.jsonName ?? 'model.json'}`, bytes: new TextEncoder().encode(JSON.stringify(json)) }, ...shards];
}
