/** The per-class views of the last sweep: robust accuracy per true class and the flip matrix, for a chosen search × budget. */
import { useMemo, useState, type ReactElement } from 'react';
import type { Norm } from '../../core/types.ts';
import { useWorkspace } from '../store/workspace.ts';
import { defaultChoice, statChoices, statsAt } from '../lib/classStats.ts';
import { PerClassTable } from './PerClassTable.tsx';
import { FlipMatrixTable } from './FlipMatrixTable.tsx';

/** The panel (nothing until the statistics of the current sweep are in). */
export function ClassBreakdown({ norm }: { norm: Norm }): ReactElement | null {
  const stats = useWorkspace((s) => s.stats);
  const runId = useWorkspace((s) => s.run.id);
  const current = stats.runId === runId ? stats.value : null;
  const choices = useMemo(() => (current === null ? [] : statChoices(current, norm)), [current, norm]);
  const [picked, setPicked] = useState<string | null>(null);
  if (stats.runId === runId && stats.error !== null) return <p className="problem">The per-class figures could not be computed: {stats.error}</p>;
  if (current === null || choices.length === 0) return null;
  const key = picked !== null && choices.some((c) => c.key === picked) ? picked : defaultChoice(choices);
  const shown = key === null ? null : statsAt(current, key);
  return (
    <section className="panel" data-testid="class-breakdown">
      <div className="row">
        <h3>By class</h3>
        <label className="field inline">
          search and budget
          <select value={key ?? ''} onChange={(e) => setPicked(e.target.value)} data-testid="class-choice">
            {choices.map((c) => (
              <option key={c.key} value={c.key}>
                {c.label}
              </option>
            ))}
          </select>
        </label>
      </div>
      <p className="muted small">
        A class with few images has a wide interval: its robust accuracy is known only roughly. Each figure is an upper bound, like the curve: a stronger search may flip more.
      </p>
      {shown !== null && (
        <div className="class-views">
          <PerClassTable point={shown.perClass} />
          <FlipMatrixTable matrix={shown.matrix} />
        </div>
      )}
    </section>
  );
}
