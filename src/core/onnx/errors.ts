/**
 * Errors of the ONNX loader. Every message says what was found and, where there is one, what to
 * do about it; node errors name the node, its op type and the model's opset.
 */
import type { NodeProto } from './schema.ts';

/** Thrown by loadOnnxModel for any file it cannot turn into a model. */
export class OnnxLoadError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'OnnxLoadError';
  }
}

/** How a node is named in messages: its name, or its position and first output when unnamed. */
export function nodeLabel(node: NodeProto, index: number): string {
  if (node.name !== '') return `"${node.name}"`;
  return `#${index} (output "${node.outputs[0] ?? '?'}")`;
}

/** An error about one node: `ONNX node "conv1" (Conv, opset 13): <message>`. */
export function nodeError(node: NodeProto, index: number, opset: number, message: string): OnnxLoadError {
  return new OnnxLoadError(`ONNX node ${nodeLabel(node, index)} (${node.opType || '?'}, opset ${opset}): ${message}`);
}

/** The message prefix for files that are not well-formed protobuf (tests match on it). */
export const MALFORMED_PREFIX = 'Not a readable ONNX file';

/** Thrown when a compiled model fails inside a forward call (e.g. a tfjs shape error), naming the node. */
export class OnnxRunError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'OnnxRunError';
  }
}
