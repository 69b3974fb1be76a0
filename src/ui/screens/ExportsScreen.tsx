/** Step 7: one click per file. CSV and JSON come from the same writers as the command line's files. */
import { useState, type ReactElement } from 'react';
import { useWorkspace } from '../store/workspace.ts';
import { downloadExport, saveBytes } from '../store/actions.ts';
import { curveLayout, curveTraces } from '../lib/figure.ts';
import { loadPlotly } from '../components/usePlot.ts';
import { Cautions } from '../components/Cautions.tsx';

async function exportCurvePng(): Promise<void> {
  const result = useWorkspace.getState().run.result;
  if (result === null) return;
  const module = await loadPlotly();
  const Plotly = module.default ?? module;
  const figure = { data: curveTraces(result.curve, result.cleanAccuracy), layout: { ...curveLayout(result.curve, result.config.norm), width: 900, height: 540 } };
  const url = await Plotly.toImage(figure, { format: 'png', width: 900, height: 540, scale: 2 });
  const bytes = Uint8Array.from(atob(url.slice(url.indexOf(',') + 1)), (c) => c.charCodeAt(0));
  saveBytes(bytes, 'curve.png', 'image/png');
}

/** The exports screen. */
export function ExportsScreen(): ReactElement {
  const hasResult = useWorkspace((s) => s.run.result !== null && s.run.status !== 'running');
  const [problem, setProblem] = useState<string | null>(null);
  const act = (work: () => Promise<void>) => () => {
    setProblem(null);
    work().catch((err: unknown) => setProblem(err instanceof Error ? err.message : String(err)));
  };
  const items: { id: string; label: string; what: string; run: () => Promise<void> }[] = [
    { id: 'export-png', label: 'Curve as PNG', what: 'the chart as an image, 1800 × 1080 pixels', run: exportCurvePng },
    { id: 'export-csv', label: 'Curve as CSV', what: 'curve.csv: one row per search and budget, with Wilson 95 % intervals', run: () => downloadExport('curve-csv') },
    { id: 'export-samples-csv', label: 'Per-image results as CSV', what: 'samples.csv: one row per image, search and budget', run: () => downloadExport('samples-csv') },
    { id: 'export-json', label: 'Run record as JSON', what: 'run.json: SHA-256 of the model and samples, the full settings, seed, versions and engine', run: () => downloadExport('run-json') },
    {
      id: 'export-zip',
      label: 'Changed images as .zip',
      what: 'one PNG per flipped image at the budget that first flipped it, with an index.csv. PNG keeps 8 bits per channel, so values are rounded to the nearest grey level.',
      run: () => downloadExport('adversarial-zip'),
    },
  ];
  return (
    <div className="stack">
      <h2>Exports</h2>
      {!hasResult && <p className="muted">Run a sweep first.</p>}
      <ul className="exports">
        {items.map((item) => (
          <li key={item.id}>
            <button type="button" data-testid={item.id} disabled={!hasResult} onClick={act(item.run)}>
              {item.label}
            </button>
            <span className="muted">{item.what}</span>
          </li>
        ))}
      </ul>
      {problem !== null && <p className="problem" role="alert">{problem}</p>}
      <Cautions />
    </div>
  );
}
