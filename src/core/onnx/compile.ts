/**
 * Compiles an ONNX graph into a list of tfjs kernels. Nodes are visited once, in file order
 * (ONNX requires topological order). Everything that does not depend on the image — initializers,
 * Constant nodes, shape arithmetic on static shapes — is evaluated here, in plain JS numbers with
 * the batch size kept symbolic; only the rest becomes runtime steps.
 */
import * as tf from '@tensorflow/tfjs';
import { Attributes } from './attributes.ts';
import type { OpContext, OpResult } from './context.ts';
import { nodeError, OnnxLoadError } from './errors.ts';
import { OPERATORS } from './ops/index.ts';
import type { GraphProto, ModelProto, NodeProto } from './schema.ts';
import { decodeTensorData, elemTypeOf } from './tensorData.ts';
import { formatShape, isKnown, type Dim } from './symbolic.ts';
import { hostToTensor, isFullyKnown, Operand, type HostValue, type Kernel, type ValueMeta } from './values.ts';

/** Where a kernel input comes from at run time. */
export type Source =
  | { readonly kind: 'value'; readonly name: string }
  | { readonly kind: 'constant'; readonly tensor: tf.Tensor }
  | { readonly kind: 'symbolic'; readonly value: HostValue };

export interface Step {
  readonly label: string;
  readonly sources: readonly (Source | undefined)[];
  readonly outputs: readonly string[];
  readonly kernel: Kernel;
}

export interface CompiledGraph {
  readonly opset: number;
  readonly inputName: string;
  readonly inputMeta: ValueMeta;
  readonly outputName: string;
  readonly outputMeta: ValueMeta;
  readonly output: Source;
  readonly steps: readonly Step[];
  /** Tensors made at load time; disposed with the model. */
  readonly kept: readonly tf.Tensor[];
  /** The node that produced each value (for output-kind detection). */
  readonly producers: ReadonlyMap<string, NodeProto>;
  readonly extraOutputs: readonly string[];
}

const CONTROL_FLOW = new Set(['If', 'Loop', 'Scan', 'SequenceMap']);

/** The default-domain opset a model imports. */
export function defaultOpset(model: ModelProto): number {
  const entry = model.opsetImports.find((o) => o.domain === '' || o.domain === 'ai.onnx');
  if (entry === undefined) throw new OnnxLoadError('The ONNX file imports no default-domain opset (opset_import is empty); it is not a usable model.');
  return entry.version;
}

/**
 * Compile the graph with the batch dimension of the image input set to `batchDim` (symbolic N, or
 * the fixed size the model was exported with). Tensors made here are disposed on failure.
 */
export function compileGraph(model: ModelProto, graph: GraphProto, batchDim: Dim): CompiledGraph {
  const kept: tf.Tensor[] = [];
  try {
    return new GraphCompiler(graph, defaultOpset(model), batchDim, kept).run();
  } catch (err) {
    kept.forEach((t) => t.dispose());
    throw err;
  }
}

class GraphCompiler {
  private readonly metas = new Map<string, ValueMeta>();
  private readonly hosts = new Map<string, HostValue>();
  private readonly constants = new Map<string, tf.Tensor>();
  private readonly producers = new Map<string, NodeProto>();
  private readonly steps: Step[] = [];

  constructor(
    private readonly graph: GraphProto,
    private readonly opset: number,
    private readonly batchDim: Dim,
    private readonly kept: tf.Tensor[],
  ) {}

  run(): CompiledGraph {
    if (this.graph.sparseInitializerCount > 0) throw new OnnxLoadError('The ONNX graph has sparse initializers, which Brink does not read.');
    for (const init of this.graph.initializers) this.setHost(init.name, decodeTensorData(init, `initializer "${init.name}"`));
    const { name: inputName, meta: inputMeta } = this.imageInput();
    this.metas.set(inputName, inputMeta);
    this.checkOperators();
    this.graph.nodes.forEach((node, index) => this.compileNode(node, index));
    const [first, ...rest] = this.graph.outputs;
    if (first === undefined) throw new OnnxLoadError('The ONNX graph declares no output.');
    const outputMeta = this.metas.get(first.name);
    if (outputMeta === undefined) throw new OnnxLoadError(`The ONNX graph output "${first.name}" is produced by no node.`);
    return {
      opset: this.opset, inputName, inputMeta, outputName: first.name, outputMeta,
      output: this.sourceFor(first.name), steps: this.steps, kept: this.kept, producers: this.producers,
      extraOutputs: rest.map((o) => o.name),
    };
  }

  private imageInput(): { name: string; meta: ValueMeta } {
    const inputs = this.graph.inputs.filter((i) => !this.hosts.has(i.name));
    if (inputs.length !== 1) {
      throw new OnnxLoadError(`Brink needs a model with exactly one image input; this ONNX graph has ${inputs.length} (${inputs.map((i) => `"${i.name}"`).join(', ')}).`);
    }
    const input = inputs[0]!;
    if (input.elemType !== undefined && elemTypeOf(input.elemType) !== 'float32') {
      throw new OnnxLoadError(`The ONNX input "${input.name}" is not a float tensor; Brink feeds float images.`);
    }
    const dims = input.dims;
    if (dims === undefined || dims.length !== 4) {
      throw new OnnxLoadError(`The ONNX input "${input.name}" has ${dims === undefined ? 'no declared shape' : `rank ${dims.length}`}; Brink needs a rank-4 image batch (N, C, H, W or N, H, W, C).`);
    }
    const shape: Dim[] = [this.batchDim];
    dims.slice(1).forEach((d, k) => {
      if (typeof d !== 'number' || d <= 0) {
        throw new OnnxLoadError(`The ONNX input "${input.name}" has a free dimension at position ${k + 1} (${JSON.stringify(d)}); Brink needs a fixed image size — export the model with a static height, width and channel count.`);
      }
      shape.push(d);
    });
    return { name: input.name, meta: { shape, dtype: 'float32' } };
  }

  /** Before any work: the first control-flow node, else the first unsupported one (listing all unsupported types). */
  private checkOperators(): void {
    const nodes = this.graph.nodes;
    const flow = nodes.findIndex((n) => CONTROL_FLOW.has(n.opType));
    if (flow >= 0) {
      throw nodeError(nodes[flow]!, flow, this.opset, 'control flow (If, Loop, Scan) is not supported; export the model with its control flow unrolled (static shapes, no data-dependent branches)');
    }
    const unsupported = (n: NodeProto): boolean => (n.domain !== '' && n.domain !== 'ai.onnx') || OPERATORS[n.opType] === undefined;
    const first = nodes.findIndex(unsupported);
    if (first < 0) return;
    const node = nodes[first]!;
    const others = [...new Set(nodes.filter(unsupported).map((n) => n.opType))].filter((t) => t !== node.opType);
    const also = others.length > 0 ? ` (also unsupported here: ${others.join(', ')})` : '';
    const what = node.domain !== '' && node.domain !== 'ai.onnx'
      ? `operator ${node.opType} of domain "${node.domain}" is not supported (only the default ONNX domain)`
      : `operator ${node.opType} is not supported`;
    throw nodeError(node, first, this.opset, `${what}${also}; see src/core/onnx/README.md for the supported operators and how to add one`);
  }

  private compileNode(node: NodeProto, index: number): void {
    const fail = (message: string): never => {
      throw nodeError(node, index, this.opset, message);
    };
    const compiler = OPERATORS[node.opType]!;
    const ctx = this.contextFor(node, fail);
    // tfjs errors while translating or folding (e.g. a shape it rejects) become node errors.
    try {
      this.record(node, compiler(ctx), ctx, fail, index);
    } catch (err) {
      if (err instanceof OnnxLoadError) throw err;
      fail(err instanceof Error ? err.message : String(err));
    }
  }

  private contextFor(node: NodeProto, fail: (m: string) => never): OpContext {
    const has = (i: number): boolean => (node.inputs[i] ?? '') !== '';
    const nameOf = (i: number): string => {
      if (!has(i)) fail(`input ${i} is required but missing`);
      return node.inputs[i]!;
    };
    const host = (i: number): HostValue | undefined => (has(i) ? this.hosts.get(node.inputs[i]!) : undefined);
    const requireHost = (i: number, what: string): HostValue => {
      const value = host(i);
      if (value === undefined) fail(`the shape cannot be resolved when loading: ${what} (input ${i}, "${nameOf(i)}") is computed from the image at run time`);
      return value!;
    };
    return {
      opType: node.opType, opset: this.opset, attrs: new Attributes(node.attributes, fail), inputCount: node.inputs.length, has, host, requireHost, fail,
      meta: (i) => {
        const name = nameOf(i);
        const meta = this.metas.get(name);
        if (meta === undefined) fail(`input "${name}" is produced by no earlier node (the graph is incomplete or not in topological order)`);
        return meta!;
      },
      requireInts: (i, what) => {
        const value = requireHost(i, what);
        if (!isFullyKnown(value)) fail(`the shape cannot be resolved when loading: ${what} depends on the batch size`);
        return Array.from(value.data as ArrayLike<number>);
      },
      keep: (t) => {
        this.kept.push(t);
        return t;
      },
    };
  }

  private record(node: NodeProto, result: OpResult, ctx: OpContext, fail: (m: string) => never, index: number): void {
    const produced = result.kind === 'host' ? result.values.length : result.outputs.length;
    node.outputs.forEach((name, k) => {
      if (name !== '' && k >= produced) fail(`output ${k} ("${name}") is not supported`);
    });
    if (result.kind === 'kernel' && this.canFold(node, result)) result = { kind: 'host', values: this.fold(result, ctx) };
    if (result.kind === 'host') {
      node.outputs.forEach((name, k) => name !== '' && this.setHost(name, result.values[k]!));
    } else {
      const sources = node.inputs.map((name, i) => (result.reads.includes(i) && name !== '' ? this.sourceFor(name) : undefined));
      const label = `${node.name !== '' ? `"${node.name}"` : `#${index}`} (${node.opType}, opset ${this.opset})`;
      this.steps.push({ label, sources, outputs: node.outputs, kernel: result.kernel });
      node.outputs.forEach((name, k) => name !== '' && this.metas.set(name, result.outputs[k]!));
    }
    node.outputs.forEach((name) => this.producers.set(name, node));
  }

  /** A kernel whose inputs are all known at load time runs once now (constant folding). */
  private canFold(node: NodeProto, result: Extract<OpResult, { kind: 'kernel' }>): boolean {
    const inputsKnown = result.reads.every((i) => {
      const value = this.hosts.get(node.inputs[i] ?? '');
      return value !== undefined && isFullyKnown(value);
    });
    return inputsKnown && result.outputs.every((m) => m.shape.every(isKnown));
  }

  private fold(result: Extract<OpResult, { kind: 'kernel' }>, ctx: OpContext): HostValue[] {
    const tensors = tf.tidy(() => {
      const outs = result.kernel({ batch: 1, input: (i) => Operand.of(hostToTensor(ctx.host(i)!)) });
      return result.outputs.map((_, k) => outs[k]!.canonical());
    });
    try {
      return result.outputs.map((meta, k) => {
        const tensor = tensors[k]!;
        if (tensor.shape.join() !== meta.shape.join()) ctx.fail(`computed shape [${tensor.shape.join(', ')}] differs from the expected ${formatShape(meta.shape)}`);
        const data = tensor.dataSync();
        return { shape: meta.shape as number[], dtype: meta.dtype, data: data instanceof Float32Array ? data.slice() : Int32Array.from(data as ArrayLike<number>) };
      });
    } finally {
      tensors.forEach((t) => t.dispose());
    }
  }

  private setHost(name: string, value: HostValue): void {
    this.hosts.set(name, value);
    this.metas.set(name, value);
  }

  private sourceFor(name: string): Source {
    const value = this.hosts.get(name);
    if (value === undefined) return { kind: 'value', name };
    if (!isFullyKnown(value)) return { kind: 'symbolic', value };
    let tensor = this.constants.get(name);
    if (tensor === undefined) {
      tensor = hostToTensor(value);
      this.kept.push(tensor);
      this.constants.set(name, tensor);
    }
    return { kind: 'constant', tensor };
  }
}
