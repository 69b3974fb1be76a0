/**
 * The results screen for a run read from a saved-run file: a banner saying so (file, date, model
 * and sample hashes), then the same curve, table, per-class views and flipped images as after a
 * sweep, all from the file — nothing is run again.
 */
import type { ReactElement } from 'react';
import type { SavedRun } from '../../core/savedRun/types.ts';
import type { ReviewEntry } from '../store/review.ts';
import { exportReport, viewRun } from '../store/reviewActions.ts';
import { useReview } from '../store/review.ts';
import { modelFileName, savedAtText, savedRunHeadline } from '../lib/review.ts';
import { percent } from '../lib/format.ts';
import { CurveChart } from './CurveChart.tsx';
import { ResultsTable } from './ResultsTable.tsx';
import { Cautions } from './Cautions.tsx';
import { SavedRunGallery } from './SavedRunGallery.tsx';
import { SavedClassBreakdown } from './ClassBreakdown.tsx';
import '../review.css';

/** The banner: where the numbers come from. */
export function SavedRunBanner({ entry }: { entry: ReviewEntry }): ReactElement {
  const { run, origin } = entry.saved;
  const busy = useReview((r) => r.busy !== null);
  return (
    <section className="saved-banner" data-testid="saved-run-banner" role="status">
      <p className="saved-banner-title">{savedRunHeadline(entry.fileName, entry.saved)}</p>
      <dl className="saved-facts">
        <dt>model</dt>
        <dd>
          {modelFileName(entry.saved)} · SHA-256 <code data-testid="saved-model-sha">{run.model.sha256}</code>
        </dd>
        <dt>samples</dt>
        <dd>
          {run.samples.count} images · SHA-256 <code data-testid="saved-samples-sha">{run.samples.sha256}</code>
        </dd>
        <dt>made</dt>
        <dd>
          in the {origin === 'cli' ? 'command line' : 'workbench'} by Brink {run.brinkVersion} on {run.backend.name}, {savedAtText(run.startedAt)} – {savedAtText(run.endedAt)}
          {run.complete ? '' : ' · cancelled before it finished'}
        </dd>
      </dl>
      <div className="row">
        <button type="button" data-testid="saved-run-report" disabled={busy} onClick={() => void exportReport()}>
          Report as HTML
        </button>
        <button type="button" data-testid="saved-run-close" onClick={() => viewRun(null)}>
          Back to this session's run
        </button>
        <span className="muted small">Shown as “{entry.label}” in comparisons.</span>
      </div>
    </section>
  );
}

function SavedHealth({ saved }: { saved: SavedRun }): ReactElement | null {
  if (saved.health === undefined || saved.health.length === 0) return null;
  return (
    <section className="panel">
      <h3>Health checks saved with the run</h3>
      <table className="results" data-testid="saved-run-health">
        <thead>
          <tr>
            <th>check</th>
            <th>status</th>
            <th>finding</th>
          </tr>
        </thead>
        <tbody>
          {saved.health.map((h) => (
            <tr key={h.check}>
              <td>{h.title ?? h.check}</td>
              <td>{h.status === 'warn' ? '! warning' : h.status === 'pass' ? '✓ pass' : h.status === 'skip' ? '– not run' : h.status}</td>
              <td>{h.detail}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </section>
  );
}

/** The whole results view of a saved run. */
export function SavedRunResults({ entry }: { entry: ReviewEntry }): ReactElement {
  const { run } = entry.saved;
  return (
    <div className="stack">
      <h2>Results</h2>
      <SavedRunBanner entry={entry} />
      <p className="lead">
        Clean accuracy {percent(run.samples.cleanAccuracy)} ({run.samples.cleanCorrect} of {run.samples.count} images).{run.complete ? '' : ' The sweep was cancelled; only finished points are shown.'}
      </p>
      <div className="with-aside">
        <section className="panel">
          <CurveChart points={run.curve} cleanAccuracy={run.samples.cleanAccuracy} norm={run.config.norm} />
          <p className="muted small">Shaded: Wilson 95 % interval of each robust accuracy. Dashed: clean accuracy.</p>
          <ResultsTable points={run.curve} />
        </section>
        <Cautions />
      </div>
      <SavedHealth saved={entry.saved} />
      <SavedClassBreakdown saved={entry.saved} />
      <SavedRunGallery saved={entry.saved} />
    </div>
  );
}
