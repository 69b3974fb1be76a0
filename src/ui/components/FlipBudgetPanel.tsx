/**
 * Flip budgets: for each image the smallest budget at which a search flips it (bisection over ε,
 * or DeepFool's estimate). The form, the run and stop buttons, progress, and the view of the answer.
 */
import type { ReactElement } from 'react';
import type { FlipSearchId } from '../../core/flips/types.ts';
import type { Norm } from '../../core/types.ts';
import { useWorkspace } from '../store/workspace.ts';
import { workerBusy } from '../store/state.ts';
import { cancelFlips, runFlips } from '../store/analysisActions.ts';
import { FLIP_SEARCH_WORDS, flipSearchChoices, resolvedMaxEps, toFlipRequest } from '../lib/flipPlan.ts';
import { budgetText } from '../lib/flipFigure.ts';
import { attackLabel } from '../lib/figure.ts';
import { count } from '../lib/format.ts';
import { WholeNumberInput } from './WholeNumberInput.tsx';
import { FlipBudgetView } from './FlipBudgetView.tsx';

function FlipForm({ disabled, pixelsPerImage }: { disabled: boolean; pixelsPerImage: number }): ReactElement {
  const settings = useWorkspace((s) => s.flipSettings);
  const update = useWorkspace((s) => s.updateFlipSettings);
  const defaultMax = resolvedMaxEps({ ...settings, maxEps: '' }, pixelsPerImage) ?? 0.5;
  return (
    <div className="options">
      <label className="field">
        Search
        <select value={settings.search} disabled={disabled} onChange={(e) => update({ search: e.target.value as FlipSearchId })} data-testid="flip-search">
          {flipSearchChoices().map((id) => (
            <option key={id} value={id}>
              {attackLabel(id)}
            </option>
          ))}
        </select>
        <span className="muted small">{FLIP_SEARCH_WORDS[settings.search]}</span>
      </label>
      <label className="field">
        Threat model
        <select value={settings.norm} disabled={disabled} onChange={(e) => update({ norm: e.target.value as Norm })} data-testid="flip-norm">
          <option value="linf">L∞: no pixel moves by more than ε</option>
          <option value="l2">L2: the length of the whole change is at most ε</option>
        </select>
      </label>
      <label className="field">
        Largest budget tried
        <input value={settings.maxEps} placeholder={`${budgetText(defaultMax, settings.norm)}: any image can become flat grey`} disabled={disabled} onChange={(e) => update({ maxEps: e.target.value })} data-testid="flip-max-eps" />
      </label>
      <label className="field">
        Tolerance of the bisection
        <input value={settings.tol} placeholder="1/510: half a grey level" disabled={disabled || settings.search === 'deepfool'} onChange={(e) => update({ tol: e.target.value })} data-testid="flip-tol" />
      </label>
      <WholeNumberInput label="Images" value={settings.limit} min={1} emptyMeans="all" disabled={disabled} testId="flip-limit" note="spread over the classes; empty: all" onChange={(limit) => update({ limit })} />
      <WholeNumberInput
        label="Iterations per search"
        value={settings.steps}
        min={1}
        emptyMeans="the search's default"
        disabled={disabled || settings.search === 'deepfool'}
        testId="flip-steps"
        onChange={(steps) => update({ steps })}
      />
    </div>
  );
}

/** The panel. */
export function FlipBudgetPanel(): ReactElement {
  const flips = useWorkspace((s) => s.flips);
  const busy = useWorkspace(workerBusy);
  const settings = useWorkspace((s) => s.flipSettings);
  const samples = useWorkspace((s) => (s.samples.value !== null && s.samples.value.mismatch === null ? s.samples.value : null));
  const hasModel = useWorkspace((s) => s.model.value !== null);
  const preprocessing = useWorkspace((s) => s.preprocessing);
  const plan = useWorkspace((s) => s.plan);
  const pixels = samples === null ? 0 : samples.height * samples.width * samples.channels;
  const build = toFlipRequest(settings, { pixelsPerImage: pixels, seed: plan.seed, batchSize: plan.batchSize, preprocessing });
  const running = flips.status === 'running';
  const p = flips.progress;
  return (
    <section className="panel form" data-testid="flip-panel" data-status={flips.status}>
      <h3>How far is each image from a flip?</h3>
      <p className="muted small">
        For every image, the smallest budget at which the search changes the model's answer, found by halving the interval between a failed and a flipping budget. One such
        measurement gives the whole curve at once. Each budget is an upper bound: a stronger search may flip the image with less.
      </p>
      <FlipForm disabled={busy} pixelsPerImage={pixels} />
      {!build.ok && samples !== null && (
        <p className="problem" role="alert">
          {build.error}
        </p>
      )}
      <div className="row">
        <button type="button" className="primary" data-testid="flips-button" disabled={busy || !build.ok || samples === null || !hasModel} onClick={() => void runFlips()}>
          Measure flip budgets
        </button>
        <button type="button" data-testid="flips-cancel" disabled={!running} onClick={cancelFlips}>
          Stop
        </button>
        {running && (
          <span className="muted" role="status">
            {p === null ? 'reading the clean answers…' : `${count(p.done)} of ${count(p.total)} images done, ${count(p.probes)} searches run`}
          </span>
        )}
      </div>
      {running && (
        <div className="bar" role="progressbar" aria-valuemin={0} aria-valuemax={100} aria-valuenow={p === null || p.total === 0 ? 0 : Math.round((100 * p.done) / p.total)}>
          <div className="bar-fill" style={{ width: `${p === null || p.total === 0 ? 0 : ((100 * p.done) / p.total).toFixed(1)}%` }} />
        </div>
      )}
      {flips.error !== null && (
        <p className="problem" role="alert">
          {flips.error}
        </p>
      )}
      {flips.reply !== null && <FlipBudgetView reply={flips.reply} subject={flips.subject} />}
    </section>
  );
}
