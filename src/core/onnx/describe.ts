/** Builds the ModelDescription of a compiled ONNX graph: layout, image size, classes, output kind. */
import type { Layout, ModelDescription, OnnxDetails, OutputKind } from '../types.ts';
import type { CompiledGraph } from './compile.ts';
import { OnnxLoadError } from './errors.ts';
import type { GraphProto, ModelProto } from './schema.ts';
import { DataType } from './schema.ts';
import { dimProduct, formatShape, isKnown } from './symbolic.ts';

/** Lowest and highest opset the loader is tested on (fixtures exported by PyTorch). */
export const TESTED_OPSETS = { min: 11, max: 17 } as const;

/** Ops that hand their input on unchanged in value (for finding what made the output). */
const PASS_THROUGH = new Set(['Identity', 'Reshape', 'Flatten', 'Squeeze', 'Unsqueeze', 'Dropout']);

/**
 * Layout of the image input: the first operator reading it decides (Conv/pool read NCHW; a
 * Transpose with perm [0, 3, 1, 2] means NHWC), else the position of a 1- or 3-sized axis.
 */
function detectLayout(graph: GraphProto, inputName: string, dims: readonly number[], notes: string[]): Layout {
  const reader = graph.nodes.find((n) => n.inputs.includes(inputName));
  if (reader !== undefined) {
    if (['Conv', 'MaxPool', 'AveragePool', 'BatchNormalization', 'GlobalAveragePool'].includes(reader.opType)) return 'nchw';
    const perm = reader.attributes.find((a) => a.name === 'perm')?.ints.join();
    if (reader.opType === 'Transpose' && perm === '0,3,1,2') return 'nhwc';
  }
  const channelish = (d: number | undefined): boolean => d === 1 || d === 3;
  if (channelish(dims[3]) && !channelish(dims[1])) return 'nhwc';
  if (!channelish(dims[1])) notes.push(`The input layout could not be told from the graph; Brink assumes NCHW (shape ${formatShape(dims)}).`);
  return 'nchw';
}

function detectOutputKind(compiled: CompiledGraph, notes: string[]): OutputKind {
  let name = compiled.outputName;
  for (;;) {
    const node = compiled.producers.get(name);
    if (node === undefined) return 'logits';
    if (node.opType === 'Softmax') return 'probabilities';
    if (node.opType === 'LogSoftmax') {
      notes.push('The model ends in LogSoftmax; its log-probabilities are used as logits (they differ from logits by a per-sample constant).');
      return 'logits';
    }
    if (!PASS_THROUGH.has(node.opType) || node.inputs[0] === undefined) return 'logits';
    name = node.inputs[0];
  }
}

function opHistogram(graph: GraphProto): Record<string, number> {
  const counts: Record<string, number> = {};
  for (const node of graph.nodes) counts[node.opType] = (counts[node.opType] ?? 0) + 1;
  return counts;
}

function parameterCount(graph: GraphProto): number {
  return graph.initializers
    .filter((t) => t.dataType === DataType.FLOAT || t.dataType === DataType.DOUBLE || t.dataType === DataType.FLOAT16)
    .reduce((sum, t) => sum + t.dims.reduce((a, b) => a * b, 1), 0);
}

/** Class count K of an [N, K] (or [N, K, 1, …]) output. */
export function classCount(compiled: CompiledGraph): number {
  const shape = compiled.outputMeta.shape;
  const k = dimProduct(shape.slice(1));
  if (shape.length < 2 || !isKnown(k) || k < 1) {
    throw new OnnxLoadError(`The ONNX output "${compiled.outputName}" has shape ${formatShape(shape)}; Brink needs one score vector per image ([N, K]).`);
  }
  return k;
}

/** Everything Brink reports about a loaded ONNX model. `fixedBatch` is set when it runs in fixed-size chunks. */
export function describeOnnx(model: ModelProto, graph: GraphProto, compiled: CompiledGraph, declaredBatch: number | null, fixedBatch: number | null): ModelDescription {
  const notes: string[] = [];
  const dims = compiled.inputMeta.shape.slice(1) as number[];
  const layout = detectLayout(graph, compiled.inputName, [1, ...dims], notes);
  const [channels, height, width] = layout === 'nchw' ? [dims[0]!, dims[1]!, dims[2]!] : [dims[2]!, dims[0]!, dims[1]!];
  const numClasses = classCount(compiled);
  if (compiled.outputMeta.shape.length > 2) notes.push(`The output of shape ${formatShape(compiled.outputMeta.shape)} is flattened to [N, ${numClasses}].`);
  if (fixedBatch !== null) notes.push(`The graph was exported for a fixed batch size of ${fixedBatch}; Brink runs it ${fixedBatch} image${fixedBatch === 1 ? '' : 's'} at a time.`);
  if (compiled.extraOutputs.length > 0) notes.push(`Only the first output ("${compiled.outputName}") is used; ignored: ${compiled.extraOutputs.map((o) => `"${o}"`).join(', ')}.`);
  if (compiled.opset < TESTED_OPSETS.min || compiled.opset > TESTED_OPSETS.max) {
    notes.push(`Opset ${compiled.opset} is outside the opsets Brink is tested on end to end (${TESTED_OPSETS.min}–${TESTED_OPSETS.max}).`);
  }
  const outputKind = detectOutputKind(compiled, notes);
  const onnx: OnnxDetails = {
    opset: compiled.opset,
    inputName: compiled.inputName,
    outputName: compiled.outputName,
    opHistogram: opHistogram(graph),
    producer: `${model.producerName} ${model.producerVersion}`.trim(),
  };
  return {
    format: 'onnx',
    inputShape: [declaredBatch, ...dims],
    layout, height, width, channels, numClasses, outputKind,
    parameterCount: parameterCount(graph),
    notes, onnx,
  };
}
