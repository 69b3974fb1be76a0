/** The list of steps on the left, each with a short status. */
import type { ReactElement } from 'react';
import { useWorkspace } from '../store/workspace.ts';
import { SCREENS, type ScreenId, type WorkspaceState } from '../store/state.ts';
import { comparedIds, useReview, type ReviewState } from '../store/review.ts';
import { hasCurrentRun } from '../store/reviewActions.ts';
import { duration, percent } from '../lib/format.ts';
import { attackLabel } from '../lib/figure.ts';
import { reviewStepText, type ReviewStepFacts } from '../lib/review.ts';

const TITLES: Readonly<Record<ScreenId, string>> = {
  model: 'Model',
  samples: 'Samples',
  preprocessing: 'Preprocessing',
  plan: 'Sweep plan',
  run: 'Run',
  results: 'Results',
  exports: 'Exports',
  review: 'Review & compare',
};

/** The review screen's counts, in the workspace `s`. */
export function reviewFacts(review: Pick<ReviewState, 'entries' | 'excluded' | 'baseline' | 'busy'>, s: Pick<WorkspaceState, 'run'>): ReviewStepFacts {
  const current = hasCurrentRun(s);
  return { kept: review.entries.length, current, compared: comparedIds(review, current).length, busy: review.busy !== null };
}

/** One line of status under a step's title (`review`: the review screen's counts). */
export function stepStatus(screen: ScreenId, s: WorkspaceState, review: ReviewStepFacts): string {
  switch (screen) {
    case 'model':
      return s.model.busy ? 'loading…' : s.model.value ? `${s.model.value.description.numClasses} classes, ${s.model.value.description.height}×${s.model.value.description.width}` : 'none yet';
    case 'samples':
      return s.samples.busy ? 'reading…' : s.samples.value ? `${s.samples.value.count} images` : 'none yet';
    case 'preprocessing':
      return s.clean.value ? `clean accuracy ${percent(s.clean.value.accuracy)}` : s.model.value ? 'check what the model sees' : '';
    case 'plan':
      return `${s.plan.attacks.map((a) => attackLabel(a)).join(' + ') || 'no search'} · ${s.plan.norm === 'linf' ? 'L∞' : 'L2'}`;
    case 'run':
      if (s.run.status === 'done') return `finished in ${duration(s.run.elapsedMs / 1000)}`;
      return { idle: 'not started', running: 'running…', cancelled: 'cancelled', failed: 'stopped with a problem' }[s.run.status];
    case 'results':
      return s.run.result ? `${s.run.result.curve.length} points${s.run.status === 'running' ? ' so far' : ''}` : 'after a run';
    case 'exports':
      return s.run.status === 'running' ? 'after the run' : s.run.result ? 'ready' : 'after a run';
    case 'review':
      return reviewStepText(review);
  }
}

/** The step navigation. */
export function StepNav(): ReactElement {
  const state = useWorkspace();
  const reviewState = useReview();
  const review = reviewFacts(reviewState, state);
  return (
    <nav className="steps" aria-label="Steps">
      <ol>
        {SCREENS.map((screen, i) => (
          <li key={screen}>
            <button
              type="button"
              className={state.screen === screen ? 'step current' : 'step'}
              aria-current={state.screen === screen ? 'step' : undefined}
              onClick={() => state.goTo(screen)}
              data-testid={`nav-${screen}`}
            >
              <span className="step-number">{i + 1}</span>
              <span className="step-title">{TITLES[screen]}</span>
              <span className="step-status">{stepStatus(screen, state, review)}</span>
            </button>
          </li>
        ))}
      </ol>
    </nav>
  );
}
