/** What Brink read from an ONNX file: opset, the detected input (name, shape, layout), the output and the operators used. */
import type { ReactElement } from 'react';
import type { ModelDescription } from '../../core/types.ts';
import { LAYOUT_LABELS } from '../lib/presets.ts';
import { nodeCount, opRows, shapeText } from '../lib/modelFacts.ts';

/** The ONNX part of the model description (nothing for other formats). */
export function OnnxFacts({ d }: { d: ModelDescription }): ReactElement | null {
  const onnx = d.onnx;
  if (onnx === undefined) return null;
  const rows = opRows(onnx.opHistogram);
  return (
    <div className="onnx-facts" data-testid="onnx-facts">
      <h4>ONNX graph</h4>
      <table className="facts">
        <tbody>
          <tr>
            <th>opset</th>
            <td data-testid="onnx-opset">{onnx.opset}</td>
          </tr>
          <tr>
            <th>detected input</th>
            <td data-testid="onnx-input">
              <code>{onnx.inputName}</code>, shape {shapeText(d.inputShape)}, {LAYOUT_LABELS[d.layout]}
            </td>
          </tr>
          <tr>
            <th>output used</th>
            <td>
              <code>{onnx.outputName}</code>, {d.numClasses} classes, {d.outputKind === 'logits' ? 'raw class scores' : 'probabilities'}
            </td>
          </tr>
          <tr>
            <th>made by</th>
            <td>{onnx.producer || 'not recorded in the file'}</td>
          </tr>
        </tbody>
      </table>
      <p className="muted small">
        {rows.length} operator types in {nodeCount(onnx.opHistogram)} nodes, each translated to differentiable TensorFlow.js operations:
      </p>
      <table className="counts" data-testid="onnx-ops">
        <thead>
          <tr>
            <th>operator</th>
            <th>nodes</th>
          </tr>
        </thead>
        <tbody>
          {rows.map(([op, n]) => (
            <tr key={op} data-op={op}>
              <td>{op}</td>
              <td>{n}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
