/** `brink describe`: load a model and print what Brink detected about it (no samples needed). */
import type { FlagTable, ParsedArgs } from './args.ts';
import { UsageError, formatUsage, requireValue } from './args.ts';
import { readModelFiles } from './nodeModelFiles.ts';
import { startNodeBackend } from './nodePlatform.ts';
import { formatBackend } from '../core/backend/initBackend.ts';
import { loadModelFromFiles } from '../core/models/loadModel.ts';
import type { ModelDescription } from '../core/types.ts';

export const DESCRIBE_FLAGS: FlagTable = {
  model: { kind: 'string', placeholder: '<model.json|model.onnx>', description: 'the model to describe' },
  json: { kind: 'boolean', description: 'print the description as JSON' },
  help: { kind: 'boolean', description: 'show this text' },
};

export const DESCRIBE_USAGE = formatUsage('describe', '--model <model.json|model.onnx> [--json]', DESCRIBE_FLAGS);

/** Print the model description on stdout. */
export async function describeCommand(args: ParsedArgs): Promise<void> {
  if (args.flags.has('help')) {
    process.stdout.write(`${DESCRIBE_USAGE}\n`);
    return;
  }
  const modelPath = requireValue(args, 'model');
  const backend = await startNodeBackend();
  let description: ModelDescription;
  try {
    const model = await loadModelFromFiles(await readModelFiles(modelPath));
    description = model.description;
    model.dispose();
  } catch (err) {
    throw new UsageError(err instanceof Error ? (err.message.split('\n')[0] ?? err.message) : String(err));
  }
  if (args.flags.has('json')) {
    process.stdout.write(`${JSON.stringify({ ...description, backend }, null, 2)}\n`);
    return;
  }
  process.stdout.write(`${describeLines(description, formatBackend(backend)).join('\n')}\n`);
}

/** Human-readable lines for a model description. */
export function describeLines(d: ModelDescription, backend: string): string[] {
  const lines = [
    `format          ${d.format}`,
    `input shape     [${d.inputShape.map((v) => (v === null ? 'N' : String(v))).join(', ')}]`,
    `layout          ${d.layout}`,
    `image size      ${d.height}×${d.width}, ${d.channels} channel${d.channels === 1 ? '' : 's'}`,
    `classes         ${d.numClasses}`,
    `output          ${d.outputKind === 'logits' ? 'logits (raw class scores)' : 'probabilities (Brink takes the log for its losses)'}`,
    `parameters      ${d.parameterCount.toLocaleString('en-US')}`,
    `backend         ${backend}`,
  ];
  if (d.onnx) {
    const ops = Object.entries(d.onnx.opHistogram).map(([op, n]) => `${op}×${n}`).join(' ');
    lines.push(`onnx opset      ${d.onnx.opset} (producer: ${d.onnx.producer || 'unknown'})`);
    lines.push(`onnx input      ${d.onnx.inputName} → ${d.onnx.outputName}`);
    lines.push(`onnx operators  ${ops}`);
  }
  for (const note of d.notes) lines.push(`note            ${note}`);
  return lines;
}
