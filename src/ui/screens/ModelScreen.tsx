/** Step 1: choose the classifier and read what Brink found out about it. */
import type { ReactElement } from 'react';
import { formatBackend } from '../../core/backend/initBackend.ts';
import type { ModelDescription } from '../../core/types.ts';
import { DropZone } from '../components/DropZone.tsx';
import { useWorkspace } from '../store/workspace.ts';
import { loadDemoModel, loadModel } from '../store/actions.ts';
import { count } from '../lib/format.ts';
import { LAYOUT_LABELS } from '../lib/presets.ts';
import { shapeText } from '../lib/modelFacts.ts';
import { OnnxFacts } from '../components/OnnxFacts.tsx';
import { workerBusy } from '../store/state.ts';

const FORMAT_LABELS: Readonly<Record<ModelDescription['format'], string>> = {
  layers: 'TensorFlow.js layers model',
  graph: 'TensorFlow.js graph model',
  onnx: 'ONNX model',
};

/** The facts table of a loaded model. */
function Description({ d }: { d: ModelDescription }): ReactElement {
  const backend = useWorkspace((s) => s.engine.value);
  const rows: [string, string][] = [
    ['format', FORMAT_LABELS[d.format]],
    ['input shape', shapeText(d.inputShape)],
    ['input layout', LAYOUT_LABELS[d.layout]],
    ['image size', `${d.height} × ${d.width}, ${d.channels === 1 ? 'grey' : `${d.channels} channels`}`],
    ['classes', String(d.numClasses)],
    ['output', d.outputKind === 'logits' ? 'raw class scores (logits)' : 'probabilities (Brink takes their log for the losses)'],
    ['parameters', count(d.parameterCount)],
    ['engine', backend === null ? '–' : `${formatBackend(backend.backend)}${backend.isolated ? '' : ' (threads need cross-origin isolation)'}${backend.backend.notice ? ` — ${backend.backend.notice}` : ''}`],
  ];
  return (
    <table className="facts" data-testid="model-description">
      <tbody>
        {rows.map(([k, v]) => (
          <tr key={k}>
            <th>{k}</th>
            <td>{v}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

function Card({ card }: { card: Readonly<Record<string, unknown>> }): ReactElement {
  const entries = Object.entries(card).filter(([, v]) => typeof v === 'string' || typeof v === 'number');
  return (
    <details className="card-box">
      <summary>About this demo model</summary>
      <dl>
        {entries.map(([k, v]) => (
          <div key={k}>
            <dt>{k}</dt>
            <dd>{String(v)}</dd>
          </div>
        ))}
      </dl>
    </details>
  );
}

/** The model screen. */
export function ModelScreen(): ReactElement {
  const model = useWorkspace((s) => s.model);
  const running = useWorkspace(workerBusy);
  const ready = useWorkspace((s) => s.engine.value !== null);
  const value = model.value;
  return (
    <div className="stack">
      <h2>Model</h2>
      <p className="lead">The classifier to probe. It stays on this computer: Brink reads the files in the browser and sends nothing anywhere.</p>
      <DropZone
        testId="model-drop"
        title="Drop a model here"
        hint={
          <>
            A TensorFlow.js <code>model.json</code> with its <code>.bin</code> weight files, the folder holding them, a <code>.zip</code> of that folder, or an{' '}
            <code>.onnx</code> file. The model must end in class scores (logits) or probabilities.
          </>
        }
        accept=".json,.bin,.zip,.onnx"
        busy={model.busy}
        error={model.error}
        disabled={!ready || running}
        onFiles={(files) => void loadModel(files, { key: `files:${files.map((f) => f.name).sort().join('|')}`, label: files.length === 1 ? files[0]!.name : `${files.length} files`, demo: null, card: null })}
      />
      <div className="row">
        <span className="muted">Or use a demo model:</span>
        <button type="button" disabled={!ready || running || model.busy} onClick={() => void loadDemoModel('standard')}>
          standard training
        </button>
        <button type="button" disabled={!ready || running || model.busy} onClick={() => void loadDemoModel('hardened')} data-testid="load-hardened">
          adversarially trained
        </button>
      </div>
      {value !== null && (
        <section className="panel">
          <h3 data-testid="model-label">{value.label}</h3>
          <Description d={value.description} />
          <OnnxFacts d={value.description} />
          {value.description.notes.length > 0 && (
            <ul className="notes">
              {value.description.notes.map((n) => (
                <li key={n}>{n}</li>
              ))}
            </ul>
          )}
          {value.card !== null && <Card card={value.card} />}
          <p className="muted">Files: {value.files.join(', ')}</p>
        </section>
      )}
    </div>
  );
}
