/** Top bar: name and purpose, which engine runs, and the one-click demo. */
import type { ReactElement } from 'react';
import { formatBackend } from '../../core/backend/initBackend.ts';
import { useWorkspace } from '../store/workspace.ts';
import { loadDemoModel, runDemo } from '../store/actions.ts';
import { workerBusy, type DemoModelId } from '../store/state.ts';

/** Engine status in words: flavour, threads, and why threads are off when they are. */
export function EngineBadge(): ReactElement {
  const engine = useWorkspace((s) => s.engine);
  if (engine.busy) return <span className="badge">starting the engine…</span>;
  if (engine.value === null) return <span className="badge badge-bad">engine failed: {engine.error}</span>;
  const { backend, isolated } = engine.value;
  const single = isolated ? '' : ' · single-threaded: the page is not cross-origin isolated';
  return (
    <span className={backend.notice === null ? 'badge' : 'badge badge-warn'} title={backend.notice ?? undefined} data-testid="engine-badge">
      {formatBackend(backend)}
      {single}
    </span>
  );
}

/** The header. */
export function Header(): ReactElement {
  const demo = useWorkspace((s) => s.model.value?.demo ?? null);
  const running = useWorkspace(workerBusy);
  const ready = useWorkspace((s) => s.engine.value !== null);
  return (
    <header className="header">
      <div className="brand">
        <span className="brand-name">Brink</span>
        <span className="brand-line">How far can a small, bounded change to an image push your classifier? Measured here, in your browser.</span>
      </div>
      <EngineBadge />
      <div className="demo-box">
        <label className="inline">
          demo model{' '}
          <select
            value={demo ?? ''}
            disabled={!ready || running}
            onChange={(e) => void loadDemoModel(e.target.value as DemoModelId)}
            data-testid="demo-model-select"
          >
            {demo === null && <option value="">(your own model)</option>}
            <option value="standard">standard training</option>
            <option value="hardened">adversarially trained</option>
          </select>
        </label>
        <button
          type="button"
          className="primary"
          title="Loads the demo model and images, sets the demo plan (FGSM and PGD, L∞, budgets up to 8/255) and runs it"
          data-testid="demo-button" disabled={!ready || running} onClick={() => void runDemo()}>
          Run the demo sweep
        </button>
      </div>
    </header>
  );
}
