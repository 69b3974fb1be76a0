/**
 * loadOnnxModel: reads an .onnx file (bytes), compiles its graph into tfjs ops and returns a
 * differentiable LoadedModel. See README.md in this folder for the design and the operator list.
 */
import * as tf from '@tensorflow/tfjs';
import type { LoadedModel, NamedBytes } from '../types.ts';
import { compileGraph, defaultOpset, type CompiledGraph } from './compile.ts';
import { describeOnnx } from './describe.ts';
import { MALFORMED_PREFIX, OnnxLoadError } from './errors.ts';
import { ProtobufError } from './protobuf.ts';
import { runGraph, type RuntimeGraph } from './runtime.ts';
import { decodeModel, type GraphProto, type ModelProto } from './schema.ts';
import { BATCH } from './symbolic.ts';

/** Oldest opset whose operator semantics (numpy broadcasting) the translators implement. */
const MIN_OPSET = 7;

function parse(file: NamedBytes): { model: ModelProto; graph: GraphProto } {
  let model: ModelProto;
  try {
    model = decodeModel(file.bytes);
  } catch (err) {
    if (err instanceof ProtobufError) {
      throw new OnnxLoadError(`${MALFORMED_PREFIX} "${file.name}": malformed protobuf (${err.message}); the file is truncated or is not an ONNX model.`);
    }
    throw err;
  }
  const graph = model.graph;
  if (graph === undefined || graph.nodes.length === 0) {
    throw new OnnxLoadError(`${MALFORMED_PREFIX} "${file.name}": it holds no graph; the file is truncated or is not an ONNX model.`);
  }
  const opset = defaultOpset(model);
  if (opset < MIN_OPSET) throw new OnnxLoadError(`The ONNX model "${file.name}" uses opset ${opset}; Brink reads opset ${MIN_OPSET} and newer — convert it with onnx.version_converter.`);
  return { model, graph };
}

/**
 * Compile with a symbolic batch size; when the graph hard-codes the batch size it was exported
 * with (e.g. Reshape to [1, -1]) and that size is declared, compile for it and run in chunks.
 */
function compileForBatch(model: ModelProto, graph: GraphProto, declared: number | null): { compiled: CompiledGraph; fixedBatch: number | null } {
  try {
    return { compiled: compileGraph(model, graph, BATCH), fixedBatch: null };
  } catch (symbolicError) {
    if (!(symbolicError instanceof OnnxLoadError) || declared === null) throw symbolicError;
    try {
      return { compiled: compileGraph(model, graph, declared), fixedBatch: declared };
    } catch {
      throw symbolicError;
    }
  }
}

function declaredBatch(graph: GraphProto): number | null {
  const initializers = new Set(graph.initializers.map((t) => t.name));
  const input = graph.inputs.find((i) => !initializers.has(i.name));
  const d = input?.dims?.[0];
  return typeof d === 'number' && d > 0 ? d : null;
}

function checkInput(input: tf.Tensor4D, expected: readonly number[], fixedBatch: number | null): void {
  const [, ...rest] = input.shape;
  if (rest.join() !== expected.join()) {
    throw new Error(`The ONNX model expects input [N, ${expected.join(', ')}] in its own layout, got [${input.shape.join(', ')}].`);
  }
  if (fixedBatch !== null && input.shape[0] % fixedBatch !== 0) {
    throw new Error(`The ONNX model runs ${fixedBatch} images at a time; a batch of ${input.shape[0]} is not a multiple of that.`);
  }
}

/** Load an ONNX classifier. Throws OnnxLoadError with a readable message for anything it cannot run. */
export async function loadOnnxModel(file: NamedBytes): Promise<LoadedModel> {
  const { model, graph } = parse(file);
  const declared = declaredBatch(graph);
  const { compiled, fixedBatch } = compileForBatch(model, graph, declared);
  let disposed = false;
  try {
    const description = describeOnnx(model, graph, compiled, declared, fixedBatch);
    const expected = compiled.inputMeta.shape.slice(1) as number[];
    const k = description.numClasses;
    const runtime: RuntimeGraph = { inputName: compiled.inputName, steps: compiled.steps, output: compiled.output };
    const kept = compiled.kept;
    const runChunk = (x: tf.Tensor): tf.Tensor => runGraph(runtime, x).reshape([x.shape[0]!, k]);
    return {
      description,
      forward(input: tf.Tensor4D): tf.Tensor2D {
        if (disposed) throw new Error('This ONNX model has been disposed.');
        checkInput(input, expected, fixedBatch);
        return tf.tidy(() => {
          if (fixedBatch === null || input.shape[0] === fixedBatch) return runChunk(input) as tf.Tensor2D;
          const chunks = tf.split(input, input.shape[0] / fixedBatch, 0);
          return tf.concat(chunks.map(runChunk), 0) as tf.Tensor2D;
        });
      },
      dispose(): void {
        if (disposed) return;
        disposed = true;
        kept.forEach((t) => t.dispose());
      },
    };
  } catch (err) {
    compiled.kept.forEach((t) => t.dispose());
    throw err;
  }
}
