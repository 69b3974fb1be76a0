/** Step 2: the labelled images to attack. */
import { useEffect, type ReactElement } from 'react';
import { DropZone } from '../components/DropZone.tsx';
import { SampleGrid } from '../components/SampleGrid.tsx';
import { CleanAccuracy } from '../components/CleanAccuracy.tsx';
import { useWorkspace } from '../store/workspace.ts';
import { workerBusy } from '../store/state.ts';
import { loadDemoSamples, loadSamples, refreshPreview } from '../store/actions.ts';
import { filesFromList } from '../lib/files.ts';

/** Preview tiles asked for on this screen. */
const GRID_COUNT = 24;

/** The samples screen. */
export function SamplesScreen(): ReactElement {
  const samples = useWorkspace((s) => s.samples);
  const model = useWorkspace((s) => s.model.value);
  const preview = useWorkspace((s) => s.preview.value);
  const clean = useWorkspace((s) => s.clean.value);
  const running = useWorkspace(workerBusy);
  const ready = useWorkspace((s) => s.engine.value !== null);
  const value = samples.value;
  useEffect(() => {
    if (value !== null && !running) void refreshPreview(GRID_COUNT);
  }, [value, model, running]);
  return (
    <div className="stack">
      <h2>Samples</h2>
      <p className="lead">Labelled images the model should read correctly. Each is resized to the model's input size (bilinear) and converted to grey or colour as the model needs.</p>
      <DropZone
        testId="samples-drop"
        title="Drop sample images here"
        hint={
          <>
            One folder per class (<code>stop-bar/001.png</code>), a <code>.zip</code> of such folders, or a CSV manifest with rows <code>file,label</code> together with
            its images. PNG and JPEG. A <code>classes.txt</code> (one class name per line, in index order) among the files is used for the names.
          </>
        }
        accept=".png,.jpg,.jpeg,.zip,.csv,.txt"
        busy={samples.busy}
        error={samples.error}
        disabled={!ready || running}
        onFiles={(files) => void loadSamples(files, null, files.length === 1 ? files[0]!.name : `${files.length} files`)}
      />
      <div className="row">
        <label className="button">
          Class names file…
          <input
            type="file"
            accept=".txt"
            disabled={value === null || running}
            data-testid="class-names-file"
            onChange={(e) => {
              const file = e.target.files?.[0];
              e.target.value = '';
              if (file && value) void filesFromList([file]).then(([named]) => loadSamples([], named ?? null, value.label, value.demo));
            }}
          />
        </label>
        <span className="muted">optional: names in class-index order, one per line</span>
        <button type="button" disabled={!ready || running || samples.busy} onClick={() => void loadDemoSamples()}>
          Use the demo images
        </button>
      </div>
      {value !== null && (
        <section className="panel">
          <h3 data-testid="samples-label">{value.label}</h3>
          <p>
            {value.count} images read from {value.source === 'manifest' ? 'a manifest' : 'class folders'}, at {value.height} × {value.width}
            {value.channels === 1 ? ', grey' : ', colour'}.
          </p>
          {value.mismatch !== null && <p className="problem">{value.mismatch}</p>}
          <table className="counts" data-testid="class-counts">
            <thead>
              <tr>
                <th>index</th>
                <th>class</th>
                <th>images</th>
              </tr>
            </thead>
            <tbody>
              {value.classes.map((c) => (
                <tr key={c.index}>
                  <td>{c.index}</td>
                  <td>{c.name}</td>
                  <td>{c.count}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <CleanAccuracy />
          {preview !== null && <SampleGrid preview={preview} classNames={value.classNames} clean={clean} />}
        </section>
      )}
    </div>
  );
}
