/**
 * Turns tfjs model artifacts into a LoadedModel: a LayersModel run with predict(), or a GraphModel
 * run with execute() (never executeAsync, whose ops the gradient tape does not see).
 */
import * as tf from '@tensorflow/tfjs';
import type { LoadedModel } from '../types.ts';
import { describeModel, type ModelFacts } from './describeModel.ts';
import { elementCount } from './modelFiles.ts';

/**
 * Ops that make GraphModel.execute() throw (tfjs sends them to executeAsync): TF control flow,
 * v1 and v2, and the ops whose output shape depends on the data.
 */
const ASYNC_ONLY_OPS = new Set([
  'Enter', 'Exit', 'Merge', 'Switch', 'LoopCond', 'NextIteration',
  'StatelessIf', 'If', 'if', 'StatelessWhile', 'While',
  'NonMaxSuppressionV2', 'NonMaxSuppressionV3', 'NonMaxSuppressionV4', 'NonMaxSuppressionV5', 'Where',
]);

interface GraphNode {
  readonly name?: string;
  readonly op?: string;
  readonly input?: readonly string[];
}

interface GraphTopology {
  readonly node?: readonly GraphNode[];
  readonly library?: { readonly function?: readonly { readonly nodeDef?: readonly GraphNode[] }[] };
}

/** Counts the float weights of a manifest (integer constants such as reshape targets are not parameters). */
export function countParameters(specs: readonly tf.io.WeightsManifestEntry[]): number {
  return specs.filter((s) => s.dtype === 'float32').reduce((n, s) => n + elementCount(s.shape), 0);
}

/** Flattens a rank > 2 output (e.g. [N, 1, 1, K]) to [N, K]. */
function toRows(y: tf.Tensor): tf.Tensor2D {
  if (y.rank === 2) return y as tf.Tensor2D;
  return tf.reshape(y, [y.shape[0] ?? 1, -1]);
}

function requireOne(kind: 'input' | 'output', names: readonly string[], dispose: () => void): void {
  if (names.length === 1) return;
  dispose();
  throw new Error(`The model has ${names.length} ${kind}s (${names.join(', ') || 'none'}); Brink needs exactly one ${kind === 'input' ? 'image input' : 'class-score output'}.`);
}

function requireImageInput(shape: readonly (number | null)[], dispose: () => void): void {
  if (shape.length === 4) return;
  dispose();
  throw new Error(`The model input has shape [${shape.map((d) => d ?? '?').join(', ')}]; Brink needs a rank-4 image input (NHWC or NCHW).`);
}

function outputNote(shape: readonly (number | null)[] | undefined): string[] {
  if (shape === undefined || shape.length === 2) return [];
  return [`The model output has rank ${shape.length}; it is flattened to [N, K] class scores.`];
}

function endsInSoftmaxLayer(model: tf.LayersModel): boolean {
  const layer = model.outputs[0]?.sourceLayer;
  if (layer === undefined) return false;
  if (layer.getClassName() === 'Softmax') return true;
  const config = layer.getConfig() as { activation?: unknown };
  return config.activation === 'softmax';
}

/** Builds a LoadedModel around a Keras-style LayersModel. */
export async function openLayersModel(artifacts: tf.io.ModelArtifacts, specs: readonly tf.io.WeightsManifestEntry[]): Promise<LoadedModel> {
  let model: tf.LayersModel;
  try {
    model = await tf.loadLayersModel(tf.io.fromMemory(artifacts));
  } catch (err) {
    throw new Error(`The Keras-style (layers) model could not be built: ${err instanceof Error ? err.message : String(err)}`);
  }
  const dispose = (): void => {
    model.dispose();
  };
  requireOne('input', model.inputs.map((t) => t.name), dispose);
  requireOne('output', model.outputs.map((t) => t.name), dispose);
  const inputShape = model.inputs[0]!.shape.map((d) => d ?? null);
  requireImageInput(inputShape, dispose);
  const forward = (x: tf.Tensor4D): tf.Tensor2D =>
    tf.tidy(() => toRows(model.predict(x, { batchSize: Math.max(1, x.shape[0]) }) as tf.Tensor));
  const facts: ModelFacts = {
    format: 'layers',
    inputShape,
    finalSoftmax: endsInSoftmaxLayer(model),
    parameterCount: countParameters(specs),
    forward,
    notes: outputNote(model.outputs[0]!.shape),
  };
  return finish(facts, dispose);
}

/** All nodes of a graph topology, those inside library functions (v2 control flow bodies) included. */
function allNodes(topology: GraphTopology): GraphNode[] {
  const nodes = [...(topology.node ?? [])];
  for (const fn of topology.library?.function ?? []) nodes.push(...(fn.nodeDef ?? []));
  return nodes;
}

/** Throws naming the first node whose op needs executeAsync. */
export function rejectAsyncOnlyOps(topology: GraphTopology): void {
  const node = allNodes(topology).find((n) => n.op !== undefined && ASYNC_ONLY_OPS.has(n.op));
  if (node === undefined) return;
  throw new Error(
    `The graph model needs executeAsync: node "${node.name ?? '?'}" uses the ${node.op} op; Brink runs models with execute() so gradients reach the pixels, so export the model without control flow or data-dependent shapes.`,
  );
}

/** True when the output node, looking through Identity nodes, is a Softmax op. */
function endsInSoftmaxOp(topology: GraphTopology, outputName: string): boolean {
  const byName = new Map(allNodes(topology).map((n) => [n.name ?? '', n]));
  let name = outputName.split(':')[0] ?? outputName;
  for (let hops = 0; hops < 16; hops++) {
    const node = byName.get(name);
    if (node === undefined) return false;
    if (node.op === 'Softmax') return true;
    const source = node.input?.[0];
    if (node.op !== 'Identity' || source === undefined) return false;
    name = source.replace(/^\^/, '').split(':')[0] ?? source;
  }
  return false;
}

function graphInputShape(shape: readonly number[] | undefined): { shape: (number | null)[]; notes: string[] } {
  if (shape === undefined || shape.length === 0) {
    return { shape: [null, null, null, null], notes: ['The graph input declares no shape; assumed a rank-4 image input.'] };
  }
  return { shape: shape.map((d) => (d < 0 ? null : d)), notes: [] };
}

/** Builds a LoadedModel around a GraphModel, refusing graphs that only executeAsync can run. */
export async function openGraphModel(artifacts: tf.io.ModelArtifacts, specs: readonly tf.io.WeightsManifestEntry[]): Promise<LoadedModel> {
  const topology = (artifacts.modelTopology ?? {}) as GraphTopology;
  rejectAsyncOnlyOps(topology);
  let model: tf.GraphModel;
  try {
    model = await tf.loadGraphModel(tf.io.fromMemory(artifacts));
  } catch (err) {
    throw new Error(`The graph model could not be built: ${err instanceof Error ? err.message : String(err)}`);
  }
  const dispose = (): void => {
    model.dispose();
  };
  requireOne('input', model.inputs.map((t) => t.name), dispose);
  requireOne('output', model.outputs.map((t) => t.name), dispose);
  const input = graphInputShape(model.inputs[0]!.shape);
  requireImageInput(input.shape, dispose);
  const forward = (x: tf.Tensor4D): tf.Tensor2D => tf.tidy(() => toRows(model.execute(x) as tf.Tensor));
  const facts: ModelFacts = {
    format: 'graph',
    inputShape: input.shape,
    finalSoftmax: endsInSoftmaxOp(topology, model.outputNodes[0] ?? ''),
    parameterCount: countParameters(specs),
    forward,
    notes: input.notes,
  };
  return finish(facts, dispose);
}

function finish(facts: ModelFacts, dispose: () => void): LoadedModel {
  let description;
  try {
    description = describeModel(facts);
  } catch (err) {
    dispose();
    throw err;
  }
  return { description, forward: facts.forward, dispose };
}
