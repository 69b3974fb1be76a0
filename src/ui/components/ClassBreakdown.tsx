/**
 * The per-class views of a sweep: robust accuracy per true class and the flip matrix, for a chosen
 * search × budget. Shown for this session's last sweep (statistics from the worker) and for a run
 * read from a saved-run file (computed here from its records).
 */
import { useMemo, useState, type ReactElement } from 'react';
import type { Norm } from '../../core/types.ts';
import type { SavedRun } from '../../core/savedRun/types.ts';
import { useWorkspace } from '../store/workspace.ts';
import { defaultChoice, savedRunClassViews, statChoices, statsAt, type ClassViews } from '../lib/classStats.ts';
import { PerClassTable } from './PerClassTable.tsx';
import { FlipMatrixTable } from './FlipMatrixTable.tsx';

/** The panel for given statistics (nothing when the run has no budget above 0). */
function ClassBreakdownView({ views, norm }: { views: ClassViews; norm: Norm }): ReactElement | null {
  const choices = useMemo(() => statChoices(views, norm), [views, norm]);
  const [picked, setPicked] = useState<string | null>(null);
  if (choices.length === 0) return null;
  const key = picked !== null && choices.some((c) => c.key === picked) ? picked : defaultChoice(choices);
  const shown = key === null ? null : statsAt(views, key);
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

/** The panel of the current sweep (nothing until its statistics are in). */
export function ClassBreakdown({ norm }: { norm: Norm }): ReactElement | null {
  const stats = useWorkspace((s) => s.stats);
  const runId = useWorkspace((s) => s.run.id);
  if (stats.runId !== runId) return null;
  if (stats.error !== null) return <p className="problem">The per-class figures could not be computed: {stats.error}</p>;
  return stats.value === null ? null : <ClassBreakdownView views={stats.value} norm={norm} />;
}

/** The panel of a saved run, from the per-image records the file holds. */
export function SavedClassBreakdown({ saved }: { saved: SavedRun }): ReactElement | null {
  const views = useMemo(() => savedRunClassViews(saved), [saved]);
  return <ClassBreakdownView views={views} norm={saved.run.config.norm} />;
}
