/**
 * The health panel beside the curve: eight checks for signs that the robustness number is too good
 * (a weak search, masked gradients), each with its status in words and a mark, its one-line verdict
 * and the numbers behind it. The extra searches run in the worker and can be stopped.
 */
import type { ReactElement } from 'react';
import type { HealthCheck } from '../../core/health/types.ts';
import { useWorkspace } from '../store/workspace.ts';
import { workerBusy } from '../store/state.ts';
import { IDLE_HEALTH } from '../store/analysis.ts';
import { cancelHealth, runHealth } from '../store/analysisActions.ts';
import { STATUS_LOOK, checkNumbers, checksInPanelOrder, statusSummary } from '../lib/health.ts';
import { WholeNumberInput } from './WholeNumberInput.tsx';

/** The two settings of the searches the checks add (shared with the plan screen). */
export function HealthSettingsFields({ disabled }: { disabled: boolean }): ReactElement {
  const settings = useWorkspace((s) => s.plan.health);
  const update = useWorkspace((s) => s.updatePlan);
  return (
    <div className="row health-settings">
      <WholeNumberInput
        label="Queries per image, gradient-free search"
        value={settings.queries}
        min={1}
        disabled={disabled}
        testId="health-queries"
        onChange={(v) => v !== null && update({ health: { ...settings, queries: v } })}
      />
      <WholeNumberInput
        label="Random draws per image, noise"
        value={settings.draws}
        min={1}
        disabled={disabled}
        testId="health-draws"
        onChange={(v) => v !== null && update({ health: { ...settings, draws: v } })}
      />
    </div>
  );
}

function CheckItem({ check }: { check: HealthCheck }): ReactElement {
  const look = STATUS_LOOK[check.status];
  const numbers = checkNumbers(check);
  return (
    <li className={`check check-${check.status}`} data-check={check.id} data-status={check.status}>
      <div className="check-head">
        <span className="check-status" title={look.meaning}>
          <span aria-hidden="true">{look.mark}</span> {look.word}
        </span>
        <strong>{check.title}</strong>
      </div>
      <p className="check-detail">{check.detail}</p>
      {numbers.length > 0 && (
        <p className="check-numbers muted small">
          {numbers.map(([label, text]) => (
            <span key={label}>
              {label} {text}
            </span>
          ))}
        </p>
      )}
    </li>
  );
}

/** The panel. */
export function HealthPanel(): ReactElement {
  const runId = useWorkspace((s) => s.run.id);
  const stored = useWorkspace((s) => s.health);
  const busy = useWorkspace(workerBusy);
  const hasCurve = useWorkspace((s) => s.run.status !== 'running' && (s.run.result?.curve.length ?? 0) > 0);
  const health = stored.runId === runId ? stored : IDLE_HEALTH;
  const running = health.status === 'running';
  const report = health.report;
  return (
    <section className="panel health" data-testid="health-panel" data-status={health.status}>
      <h3>Can this number be trusted?</h3>
      <p className="muted small">
        Eight tests for the usual ways a robustness number comes out too good: a search too weak or not converged, or gradients that hide the way to a flip. They run extra
        searches on the same images (FGSM, PGD at a large budget, with more steps and restarts, random noise and the gradient-free Square search).
      </p>
      <HealthSettingsFields disabled={busy} />
      <div className="row">
        <button type="button" className="primary" data-testid="health-button" disabled={busy || !hasCurve} onClick={() => void runHealth()}>
          {report === null ? 'Check this evaluation' : 'Check again'}
        </button>
        <button type="button" data-testid="health-cancel" disabled={!running} onClick={cancelHealth}>
          Stop
        </button>
      </div>
      {running && (
        <div className="muted small" role="status">
          Checking… {health.steps.length === 0 ? 'measuring gradients and the first extra search' : `done so far: ${health.steps.join('; ')}`}
        </div>
      )}
      {health.status === 'cancelled' && <p className="muted">Stopped before the checks were complete; nothing is shown for a half-finished set.</p>}
      {health.error !== null && (
        <p className="problem" role="alert">
          {health.error}
        </p>
      )}
      {report !== null && (
        <>
          <p className="health-summary" data-testid="health-summary">
            {statusSummary(report.checks)}
          </p>
          <ul className="checks" data-testid="health-checks">
            {checksInPanelOrder(report.checks).map((c) => (
              <CheckItem key={c.id} check={c} />
            ))}
          </ul>
          <p className="muted small">A warning points at a likely overestimate. Passing every check does not prove the number right: the checks look for known failure signs only.</p>
        </>
      )}
    </section>
  );
}
