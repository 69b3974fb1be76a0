/** Step 7: one click per file. CSV and JSON come from the same writers as the command line's files. */
import { useState, type ReactElement } from 'react';
import { useWorkspace, type Workspace } from '../store/workspace.ts';
import { downloadExport, saveBytes } from '../store/actions.ts';
import { flipsCsvText, flipsCsvUnavailable, flipsCsvWhat, healthCsvText, healthCsvUnavailable } from '../lib/analysisExports.ts';
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

/** One button of the list; `unavailable` says in a few words why it is disabled. */
interface ExportItem {
  readonly id: string;
  readonly label: string;
  readonly what: string;
  readonly unavailable: string | null;
  readonly run: () => Promise<void>;
}

/** health.csv and flips.csv, written on this thread from the results the page already holds. */
function useAnalysisItems(): ExportItem[] {
  const healthMissing = useWorkspace(healthCsvUnavailable);
  const flipsMissing = useWorkspace(flipsCsvUnavailable);
  const flipsWhat = useWorkspace(flipsCsvWhat);
  // async, so that a refusal of the writer reaches the problem line like any other failed export.
  const textFile = (text: (s: Workspace) => string, fileName: string) => async () => saveBytes(text(useWorkspace.getState()), fileName, 'text/csv');
  return [
    { id: 'export-health-csv', label: 'Health checks as CSV', what: 'health.csv: one row per check of the current sweep: check, status (pass, warn or skip), finding', unavailable: healthMissing, run: textFile(healthCsvText, 'health.csv') },
    { id: 'export-flips-csv', label: 'Flip budgets as CSV', what: flipsWhat, unavailable: flipsMissing, run: textFile(flipsCsvText, 'flips.csv') },
  ];
}

/** The exports screen. */
export function ExportsScreen(): ReactElement {
  const hasResult = useWorkspace((s) => s.run.result !== null && s.run.status !== 'running');
  const [problem, setProblem] = useState<string | null>(null);
  const act = (work: () => Promise<void>) => () => {
    setProblem(null);
    work().catch((err: unknown) => setProblem(err instanceof Error ? err.message : String(err)));
  };
  const analysisItems = useAnalysisItems();
  const sweepMissing = hasResult ? null : 'needs a sweep';
  const items: ExportItem[] = [
    { id: 'export-png', label: 'Curve as PNG', what: 'the chart as an image, 1800 × 1080 pixels', unavailable: sweepMissing, run: exportCurvePng },
    { id: 'export-csv', label: 'Curve as CSV', what: 'curve.csv: one row per search and budget, with Wilson 95 % intervals', unavailable: sweepMissing, run: () => downloadExport('curve-csv') },
    { id: 'export-samples-csv', label: 'Per-image results as CSV', what: 'samples.csv: one row per image, search and budget', unavailable: sweepMissing, run: () => downloadExport('samples-csv') },
    { id: 'export-json', label: 'Run record as JSON', what: 'run.json: SHA-256 of the model and samples, the full settings, seed, versions and engine', unavailable: sweepMissing, run: () => downloadExport('run-json') },
    {
      id: 'export-zip',
      label: 'Changed images as .zip',
      what: 'one PNG per flipped image at the budget that first flipped it, with an index.csv. PNG keeps 8 bits per channel, so values are rounded to the nearest grey level.',
      unavailable: sweepMissing,
      run: () => downloadExport('adversarial-zip'),
    },
    ...analysisItems,
  ];
  return (
    <div className="stack">
      <h2>Exports</h2>
      {!hasResult && <p className="muted">Run a sweep first; flip budgets can be exported without one.</p>}
      <ul className="exports">
        {items.map((item) => (
          <li key={item.id}>
            <button type="button" data-testid={item.id} disabled={item.unavailable !== null} onClick={act(item.run)}>
              {item.label}
            </button>
            <span className="muted">
              {item.what}
              {item.unavailable !== null && (
                <span className="export-unavailable" data-testid={`${item.id}-unavailable`}>
                  {' '}
                  — not yet: {item.unavailable}.
                </span>
              )}
            </span>
          </li>
        ))}
      </ul>
      {problem !== null && <p className="problem" role="alert">{problem}</p>}
      <Cautions />
    </div>
  );
}
