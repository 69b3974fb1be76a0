/** Step 5: start, watch, cancel. Finished curve points appear while the sweep runs. */
import type { ReactElement } from 'react';
import { useWorkspace } from '../store/workspace.ts';
import { workerBusy } from '../store/state.ts';
import { cancelRun, startRun } from '../store/actions.ts';
import { toSweepConfig } from '../lib/plan.ts';
import { describeEps } from '../lib/budgets.ts';
import { duration } from '../lib/format.ts';
import { RunProgress } from '../components/RunProgress.tsx';
import { CurveChart } from '../components/CurveChart.tsx';
import { ResultsTable } from '../components/ResultsTable.tsx';
import { attackLabel } from '../lib/figure.ts';

const STATUS_TEXT = {
  idle: 'Not started yet.',
  running: 'Running. The page stays usable; the work happens in a background worker.',
  done: 'Finished.',
  cancelled: 'Cancelled. The points that finished are kept.',
  failed: 'Stopped with a problem.',
} as const;

/** The run screen. */
export function RunScreen(): ReactElement {
  const run = useWorkspace((s) => s.run);
  const plan = useWorkspace((s) => s.plan);
  const canRun = useWorkspace((s) => s.engine.value !== null && s.model.value !== null && s.samples.value !== null && s.samples.value.mismatch === null && !s.model.busy && !s.samples.busy);
  const classes = useWorkspace((s) => s.model.value?.description.numClasses ?? null);
  const clean = useWorkspace((s) => s.clean.value?.accuracy ?? null);
  const goTo = useWorkspace((s) => s.goTo);
  const build = toSweepConfig(plan, classes);
  const running = run.status === 'running';
  const busy = useWorkspace(workerBusy);
  return (
    <div className="stack">
      <h2>Run</h2>
      <section className="panel">
        {build.ok ? (
          <p>
            {build.config.attacks.map((a) => attackLabel(a.id)).join(' and ')}, {build.config.norm === 'linf' ? 'L∞' : 'L2'}, budgets{' '}
            {build.config.eps.map((e) => describeEps(e)).join(', ')}; seed {build.config.seed}.
          </p>
        ) : (
          <p className="problem">{build.error}</p>
        )}
        <div className="row">
          <button type="button" className="primary" data-testid="run-button" disabled={!canRun || busy || !build.ok} onClick={() => void startRun(false)}>
            Start the sweep
          </button>
          <button type="button" data-testid="cancel-button" disabled={!running} onClick={cancelRun}>
            Cancel
          </button>
          <span className="muted" data-testid="run-status">
            {STATUS_TEXT[run.status]}
            {run.status === 'done' && ` ${duration(run.elapsedMs / 1000)}.`}
          </span>
        </div>
        {!canRun && <p className="muted">A model and samples that fit it are needed first.</p>}
        {run.error !== null && <p className="problem" role="alert">{run.error}</p>}
        <RunProgress />
      </section>
      {run.result !== null && run.result.curve.length > 0 && (
        <section className="panel">
          <h3>{running ? 'Points so far' : 'Curve'}</h3>
          <CurveChart points={run.result.curve} cleanAccuracy={run.result.cleanAccuracy ?? clean} norm={run.result.config.norm} />
          <ResultsTable points={run.result.curve} />
          {!running && (
            <button type="button" onClick={() => goTo('results')}>
              See the results and flipped images
            </button>
          )}
        </section>
      )}
    </div>
  );
}
