/** The curve as a table: one row per attack and budget. */
import type { ReactElement } from 'react';
import type { CurvePoint } from '../../core/sweep/types.ts';
import { describeEps, formatEps } from '../lib/budgets.ts';
import { percent } from '../lib/format.ts';
import { attackLabel } from '../lib/figure.ts';

/** The table. */
export function ResultsTable({ points }: { points: readonly CurvePoint[] }): ReactElement {
  return (
    <table className="results" data-testid="results-table">
      <thead>
        <tr>
          <th>search</th>
          <th>ε</th>
          <th>held / clean-correct / all</th>
          <th>robust accuracy</th>
          <th>95 % interval</th>
          <th>flip rate among clean-correct</th>
        </tr>
      </thead>
      <tbody>
        {points.map((p) => (
          <tr key={`${p.attack}-${p.eps}`}>
            <td>{attackLabel(p.attack)}</td>
            <td>{p.norm === 'linf' ? describeEps(p.eps) : formatEps(p.eps)}</td>
            <td>
              {p.robust} / {p.cleanCorrect} / {p.samples}
            </td>
            <td>{percent(p.robustAccuracy)}</td>
            <td>
              {percent(p.ci95Low)} – {percent(p.ci95High)}
            </td>
            <td>{percent(p.attackSuccessRate)}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
