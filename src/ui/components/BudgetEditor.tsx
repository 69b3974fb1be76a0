/** The budget list editor: free text (list or start:stop:step), parsed as you type, shown in both units. */
import type { ReactElement } from 'react';
import type { Norm } from '../../core/types.ts';
import { describeEps, parseBudgets } from '../lib/budgets.ts';

export interface BudgetEditorProps {
  readonly text: string;
  readonly norm: Norm;
  readonly disabled: boolean;
  readonly onChange: (text: string) => void;
}

/** The editor. */
export function BudgetEditor({ text, norm, disabled, onChange }: BudgetEditorProps): ReactElement {
  const parsed = parseBudgets(text, norm);
  return (
    <div className="field">
      <label htmlFor="budgets">Budgets ε, in pixel units</label>
      <input id="budgets" data-testid="budgets-input" value={text} disabled={disabled} aria-invalid={!parsed.ok} onChange={(e) => onChange(e.target.value)} />
      <span className="muted small">
        A list such as <code>0, 2/255, 4/255, 8/255</code> or <code>0.01 0.02</code>, or a range <code>start:stop:step</code> such as <code>0:8/255:2/255</code>. 0 is the clean point.
      </span>
      {parsed.ok ? (
        <ul className="chips" data-testid="budget-chips">
          {parsed.values.map((v) => (
            <li key={v}>{norm === 'linf' ? describeEps(v) : String(Number(v.toPrecision(4)))}</li>
          ))}
        </ul>
      ) : (
        <p className="problem" role="alert">
          {parsed.error}
        </p>
      )}
    </div>
  );
}
