/** The progress bar of a running sweep: share done, rate, time left, and which point is being searched. */
import type { ReactElement } from 'react';
import { useWorkspace } from '../store/workspace.ts';
import { count, duration, runFigures } from '../lib/format.ts';
import { describeEps } from '../lib/budgets.ts';
import { attackLabel } from '../lib/figure.ts';

/** The bar and its figures. */
export function RunProgress(): ReactElement {
  const run = useWorkspace((s) => s.run);
  const p = run.progress;
  const finished = run.status === 'done';
  const figures = p === null ? null : runFigures(p.done, p.total, p.rate);
  const fraction = finished ? 1 : (figures?.fraction ?? 0);
  return (
    <div className="progress-box">
      <div
        className="bar"
        role="progressbar"
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={Math.round(fraction * 100)}
        data-testid="progress"
        data-status={run.status}
      >
        <div className="bar-fill" style={{ width: `${(fraction * 100).toFixed(1)}%` }} />
      </div>
      <p className="muted">
        {run.status === 'running' && p === null && 'measuring clean predictions…'}
        {p !== null && figures !== null && (
          <>
            {count(p.done)} of about {count(p.total)} model evaluations · {count(figures.rate)} per second ·{' '}
            {run.status === 'running' ? `about ${duration(figures.secondsLeft)} left · now ${attackLabel(p.attack)} at ε = ${describeEps(p.eps)}` : `took ${duration(run.elapsedMs / 1000)}`}
          </>
        )}
      </p>
    </div>
  );
}
