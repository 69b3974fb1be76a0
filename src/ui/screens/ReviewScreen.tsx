/**
 * Step 8, the safety-review package: save the run in view as one file, read saved runs back
 * (no re-running), export the self-contained HTML report, and compare two or more runs.
 */
import { useEffect, useMemo, type ReactElement } from 'react';
import { SAVED_RUN_FILE } from '../../core/savedRun/types.ts';
import { useWorkspace } from '../store/workspace.ts';
import { workerBusy } from '../store/state.ts';
import { CURRENT_RUN, INITIAL_REVIEW, comparedIds, entryRemoved, inclusionToggled, useReview } from '../store/review.ts';
import {
  compareWithOtherDemo, comparedRuns, currentRunKey, currentRunLabel, currentSavedRun, exportReport, hasCurrentRun, loadSavedRunFiles, saveRunInView, viewRun,
} from '../store/reviewActions.ts';
import { savedAtText, shortHash } from '../lib/review.ts';
import { DropZone } from '../components/DropZone.tsx';
import { ComparisonView } from '../components/ComparisonView.tsx';
import '../review.css';

/** What a row of the runs table shows. */
interface RunRow {
  readonly id: string;
  readonly label: string;
  readonly where: string;
  readonly savedAt: string | null;
  readonly modelSha: string | null;
  readonly samplesSha: string | null;
}

function useRunRows(): RunRow[] {
  const entries = useReview((r) => r.entries);
  const current = useReview((r) => r.current);
  const runId = useWorkspace((s) => s.run.id);
  const key = useWorkspace(currentRunKey);
  const present = useWorkspace(hasCurrentRun);
  return useMemo(() => {
    const rows: RunRow[] = entries.map((e) => ({
      id: e.id,
      label: e.label,
      where: e.source === 'file' ? `file ${e.fileName}` : e.fileName,
      savedAt: e.saved.savedAt,
      modelSha: e.saved.run.model.sha256,
      samplesSha: e.saved.run.samples.sha256,
    }));
    if (present) {
      const built = current !== null && current.key === key ? current.saved : null;
      rows.push({ id: CURRENT_RUN, label: currentRunLabel(runId), where: 'this session (not saved yet)', savedAt: null, modelSha: built?.run.model.sha256 ?? null, samplesSha: built?.run.samples.sha256 ?? null });
    }
    return rows;
  }, [entries, current, key, present, runId]);
}

function InView(): ReactElement {
  const rows = useRunRows();
  const viewing = useReview((r) => r.viewing);
  const busy = useReview((r) => r.busy);
  const error = useReview((r) => r.error);
  const workerWorking = useWorkspace(workerBusy);
  const shown = rows.find((r) => r.id === (viewing ?? CURRENT_RUN));
  const disabled = busy !== null || shown === undefined || (shown.id === CURRENT_RUN && workerWorking);
  return (
    <section className="panel">
      <h3>The run in view</h3>
      <div className="row">
        <label className="field inline">
          run
          <select value={viewing ?? CURRENT_RUN} onChange={(e) => viewRun(e.target.value === CURRENT_RUN ? null : e.target.value)} data-testid="review-in-view">
            {!rows.some((r) => r.id === CURRENT_RUN) && <option value={CURRENT_RUN}>this session's run (none yet)</option>}
            {rows.map((r) => (
              <option key={r.id} value={r.id}>
                {r.label}
              </option>
            ))}
          </select>
        </label>
      </div>
      <ul className="exports review-actions">
        <li>
          <button type="button" data-testid="save-run" disabled={disabled} onClick={() => void saveRunInView()}>
            Save the run
          </button>
          <span className="muted">
            {SAVED_RUN_FILE}: one file with the run record (hashes, settings, versions), the curve, every per-image result, the health checks when they ran, and thumbnails of flipped images. It
            loads back here without running anything.
          </span>
        </li>
        <li>
          <button type="button" data-testid="export-report" disabled={disabled} onClick={() => void exportReport()}>
            Report as HTML
          </button>
          <span className="muted">report.html: one self-contained file (no external requests, charts inline, prints cleanly to PDF) with the scope, the threat model, every search, the curves, per-class tables, cautions and the command line that recreates the numbers.</span>
        </li>
        <li>
          <button type="button" data-testid="compare-other-demo" disabled={disabled || workerWorking} onClick={() => void compareWithOtherDemo()}>
            Compare with the other demo model
          </button>
          <span className="muted">Runs the same plan (searches, budgets, seed, preprocessing) on the other demo model and the demo images, then compares the two runs below.</span>
        </li>
      </ul>
      {busy !== null && (
        <p className="muted" data-testid="review-busy">
          {busy}
        </p>
      )}
      {error !== null && (
        <p className="problem" role="alert" data-testid="review-error">
          {error}
        </p>
      )}
    </section>
  );
}

function RunsTable({ rows }: { rows: readonly RunRow[] }): ReactElement {
  const review = useReview();
  const compared = comparedIds(review, rows.some((r) => r.id === CURRENT_RUN));
  return (
    <table className="results review-runs" data-testid="review-runs">
      <thead>
        <tr>
          <th>compare</th>
          <th>baseline</th>
          <th>run</th>
          <th>from</th>
          <th>saved</th>
          <th>model SHA-256</th>
          <th>samples SHA-256</th>
          <th />
        </tr>
      </thead>
      <tbody>
        {rows.map((r) => (
          <tr key={r.id} data-run={r.id}>
            <td>
              <input type="checkbox" checked={!review.excluded.includes(r.id)} onChange={() => useReview.setState(inclusionToggled(review, r.id))} aria-label={`compare ${r.label}`} />
            </td>
            <td>
              <input type="radio" name="baseline" checked={compared[0] === r.id} disabled={!compared.includes(r.id)} onChange={() => useReview.setState({ baseline: r.id })} aria-label={`${r.label} as the baseline`} />
            </td>
            <td>{r.label}</td>
            <td>{r.where}</td>
            <td>{r.savedAt === null ? '–' : savedAtText(r.savedAt)}</td>
            <td>{r.modelSha === null ? '–' : <code title={r.modelSha}>{shortHash(r.modelSha)}</code>}</td>
            <td>{r.samplesSha === null ? '–' : <code title={r.samplesSha}>{shortHash(r.samplesSha)}</code>}</td>
            <td className="nowrap">
              <button
                type="button"
                onClick={() => {
                  viewRun(r.id === CURRENT_RUN ? null : r.id);
                  useWorkspace.getState().goTo('results');
                }}
              >
                view
              </button>{' '}
              {r.id !== CURRENT_RUN && (
                <button type="button" onClick={() => useReview.setState(entryRemoved(review, r.id))}>
                  remove
                </button>
              )}
            </td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

function Comparison({ rows }: { rows: readonly RunRow[] }): ReactElement {
  const review = useReview();
  const present = useWorkspace(hasCurrentRun);
  const key = useWorkspace(currentRunKey);
  const runId = useWorkspace((s) => s.run.id);
  const busy = useWorkspace(workerBusy);
  const currentCompared = comparedIds(review, rows.some((r) => r.id === CURRENT_RUN)).includes(CURRENT_RUN);
  const needsCurrent = currentCompared && review.current?.key !== key && !busy;
  useEffect(() => {
    if (needsCurrent) currentSavedRun().catch((err: unknown) => useReview.setState({ error: err instanceof Error ? err.message : String(err) }));
  }, [needsCurrent, key]);
  const { entries, excluded, baseline, current } = review;
  const runs = useMemo(() => comparedRuns({ ...INITIAL_REVIEW, entries, excluded, baseline, current }, { present, key, runId }), [entries, excluded, baseline, current, present, key, runId]);
  if (needsCurrent) return <p className="muted">Preparing this session's run for the comparison…</p>;
  if (runs.length < 2) return <p className="muted">Tick two or more runs to compare them: load saved runs above, or use “Compare with the other demo model”.</p>;
  return <ComparisonView runs={runs} />;
}

/** The review screen. */
export function ReviewScreen(): ReactElement {
  const rows = useRunRows();
  const busy = useReview((r) => r.busy !== null);
  return (
    <div className="stack">
      <h2>Review: save, report, compare</h2>
      <p className="lead">Everything a safety review needs from a run, in files someone else can read, trust and reproduce.</p>
      <InView />
      <DropZone
        testId="saved-run-drop"
        title="Load saved runs"
        hint={<>Drop one or more {SAVED_RUN_FILE} files (from this workbench or the command line's --out folder). They are read here, in the browser; nothing is run again.</>}
        accept=".json,application/json"
        busy={busy}
        error={null}
        onFiles={(files) => void loadSavedRunFiles(files)}
      />
      <section className="panel">
        <h3>Runs</h3>
        {rows.length === 0 ? <p className="muted">No runs yet: run a sweep, or load a saved run.</p> : <RunsTable rows={rows} />}
      </section>
      <section className="panel">
        <h3>Comparison</h3>
        <Comparison rows={rows} />
      </section>
    </div>
  );
}
