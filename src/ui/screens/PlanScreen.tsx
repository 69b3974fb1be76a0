/** Step 4: which searches, which threat model, which budgets; the form follows the attacks' metadata. */
import type { ReactElement } from 'react';
import type { AttackId } from '../../core/attacks/types.ts';
import type { Norm } from '../../core/types.ts';
import { BudgetEditor } from '../components/BudgetEditor.tsx';
import { useWorkspace } from '../store/workspace.ts';
import { attackChoices, planCost, toSweepConfig } from '../lib/plan.ts';
import { SearchOptions } from '../components/SearchOptions.tsx';
import { count, duration } from '../lib/format.ts';
import { HealthSettingsFields } from '../components/HealthPanel.tsx';

function NumberField(props: { label: string; value: number; min: number; step?: number; disabled: boolean; onChange: (v: number) => void; note?: string }): ReactElement {
  return (
    <label className="field">
      {props.label}
      <input
        type="number"
        value={props.value}
        min={props.min}
        step={props.step ?? 1}
        disabled={props.disabled}
        onChange={(e) => {
          const v = Number(e.target.value);
          if (e.target.value !== '' && Number.isFinite(v)) props.onChange(v);
        }}
      />
      {props.note !== undefined && <span className="muted small">{props.note}</span>}
    </label>
  );
}

/** The estimate line: gradient evaluations and, after a first run, a time at the measured rate. */
function Estimate(): ReactElement {
  const plan = useWorkspace((s) => s.plan);
  const classes = useWorkspace((s) => s.model.value?.description.numClasses ?? null);
  const guess = useWorkspace((s) => s.clean.value?.correct ?? s.samples.value?.count ?? 0);
  const lastRate = useWorkspace((s) => s.run.progress?.rate ?? 0);
  const build = toSweepConfig(plan, classes);
  if (!build.ok) return <p className="problem" role="alert" data-testid="plan-problem">{build.error}</p>;
  const cost = planCost(build.config, guess);
  return (
    <p className="estimate" data-testid="plan-estimate">
      At most <strong>{count(cost)}</strong> model evaluations (a forward and backward pass for one image; a forward pass for the searches without gradients), counting every
      clean-correct image at every budget above 0; images that flip drop out, so the real number is smaller.{lastRate > 0 ? ` At the last run's rate that is up to ${duration(cost / lastRate)}.` : ''}
    </p>
  );
}

/** Whether the health checks follow the sweep by themselves, and the settings of the searches they add. */
function HealthOption(): ReactElement {
  const health = useWorkspace((s) => s.plan.health);
  const update = useWorkspace((s) => s.updatePlan);
  const running = useWorkspace((s) => s.run.status === 'running');
  return (
    <section className="panel form">
      <label className="choice">
        <input type="checkbox" checked={health.after} disabled={running} onChange={(e) => update({ health: { ...health, after: e.target.checked } })} data-testid="plan-health" />
        <span>
          <strong>Check the evaluation after the sweep</strong>{' '}
          <span className="muted">
            — eight tests for a search too weak or gradients that mislead it, with extra searches on the same images (these can take longer than the sweep itself). The
            results screen can also run them later.
          </span>
        </span>
      </label>
      <HealthSettingsFields disabled={running} />
    </section>
  );
}

/** The sweep plan screen. */
export function PlanScreen(): ReactElement {
  const plan = useWorkspace((s) => s.plan);
  const update = useWorkspace((s) => s.updatePlan);
  const running = useWorkspace((s) => s.run.status === 'running');
  const goTo = useWorkspace((s) => s.goTo);
  const toggle = (id: AttackId, on: boolean): void => update({ attacks: attackChoices().map((a) => a.id).filter((a) => (a === id ? on : plan.attacks.includes(a))) });
  return (
    <div className="stack">
      <h2>Sweep plan</h2>
      <section className="panel form">
        <fieldset className="field">
          <legend>Searches</legend>
          {attackChoices().map((a) => (
            <label key={a.id} className="choice">
              <input type="checkbox" checked={plan.attacks.includes(a.id)} disabled={running} onChange={(e) => toggle(a.id, e.target.checked)} data-testid={`attack-${a.id}`} />
              <span>
                <strong>{a.label}</strong> <span className="muted">— {a.summary}</span>
              </span>
            </label>
          ))}
        </fieldset>
        <fieldset className="field">
          <legend>Threat model: how the size of a change is measured</legend>
          {(['linf', 'l2'] as Norm[]).map((n) => (
            <label key={n} className="choice">
              <input type="radio" name="norm" checked={plan.norm === n} disabled={running} onChange={() => update({ norm: n })} />
              <span>{n === 'linf' ? 'L∞: no pixel moves by more than ε' : 'L2: the Euclidean length of the whole change is at most ε'}</span>
            </label>
          ))}
        </fieldset>
        <BudgetEditor text={plan.budgets} norm={plan.norm} disabled={running} onChange={(budgets) => update({ budgets })} />
      </section>
      <SearchOptions />
      <section className="panel form">
        <div className="row">
          <NumberField label="Seed" value={plan.seed} min={0} disabled={running} onChange={(seed) => update({ seed: Math.round(seed) })} note="the same seed gives the same results" />
          <NumberField label="Images per batch" value={plan.batchSize} min={1} disabled={running} onChange={(batchSize) => update({ batchSize: Math.round(batchSize) })} />
        </div>
      </section>
      <HealthOption />
      <Estimate />
      <div className="row">
        <button type="button" className="primary" onClick={() => goTo('run')}>
          Continue to the run
        </button>
      </div>
    </div>
  );
}
