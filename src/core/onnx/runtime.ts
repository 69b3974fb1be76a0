/** Runs a compiled graph on one input batch: the kernels in order, on a map of named operands. */
import * as tf from '@tensorflow/tfjs';
import type { CompiledGraph, Source, Step } from './compile.ts';

/**
 * What a forward call needs. The loaded model keeps only this (not the decoded file, whose tensor
 * payloads are views into the file's bytes).
 */
export type RuntimeGraph = Pick<CompiledGraph, 'inputName' | 'steps' | 'output'>;
import { OnnxLoadError, OnnxRunError } from './errors.ts';
import { hostToTensor, Operand } from './values.ts';

/**
 * The graph output for `input` (in the model's own layout), in ONNX layout. Differentiable; call
 * inside tf.tidy (intermediate tensors are left to the caller's scope, as the gradient tape needs them).
 */
export function runGraph(graph: RuntimeGraph, input: tf.Tensor): tf.Tensor {
  const batch = input.shape[0]!;
  const values = new Map<string, Operand>([[graph.inputName, Operand.of(input)]]);
  for (const step of graph.steps) runStep(step, values, batch);
  return resolve(graph.output, values, batch, 'the graph output').canonical();
}

function runStep(step: Step, values: Map<string, Operand>, batch: number): void {
  let outputs: Operand[];
  try {
    outputs = step.kernel({
      batch,
      input: (i) => {
        const source = step.sources[i];
        if (source === undefined) throw new Error(`input ${i} was not declared as read at run time`);
        return resolve(source, values, batch, `input ${i}`);
      },
    });
  } catch (err) {
    // tfjs errors (a shape mismatch deep in an op) are re-thrown naming the node.
    if (err instanceof OnnxLoadError || err instanceof OnnxRunError) throw err;
    throw new OnnxRunError(`ONNX node ${step.label} failed at run time: ${err instanceof Error ? err.message : String(err)}`);
  }
  step.outputs.forEach((name, k) => {
    const out = outputs[k];
    if (name !== '' && out !== undefined) values.set(name, out);
  });
}

function resolve(source: Source, values: Map<string, Operand>, batch: number, what: string): Operand {
  if (source.kind === 'constant') return Operand.of(source.tensor);
  if (source.kind === 'symbolic') return Operand.of(hostToTensor(source.value, batch));
  const value = values.get(source.name);
  if (value === undefined) throw new Error(`${what} ("${source.name}") has not been computed`);
  return value;
}
