/**
 * The flip matrix at one search × budget: rows are true classes, columns the class the model gives
 * after the attack. Every cell shows its count; the shading only repeats it.
 */
import type { ReactElement } from 'react';
import type { FlipMatrix } from '../../core/stats/perClass.ts';
import { cellShade, matrixTotals } from '../lib/classStats.ts';

/** The matrix. */
export function FlipMatrixTable({ matrix }: { matrix: FlipMatrix }): ReactElement {
  const totals = matrixTotals(matrix);
  const names = matrix.classNames;
  return (
    <div className="matrix-box">
      <table className="matrix" data-testid="flip-matrix">
        <thead>
          <tr>
            <th scope="col" className="matrix-corner">
              true ↓ · after the attack →
            </th>
            {names.map((n, p) => (
              <th key={p} scope="col" title={n}>
                {n}
              </th>
            ))}
            <th scope="col">all</th>
          </tr>
        </thead>
        <tbody>
          {matrix.counts.map((row, t) => (
            <tr key={t}>
              <th scope="row">{names[t]}</th>
              {row.map((n, p) => (
                <td
                  key={p}
                  className={p === t ? 'diagonal' : n > 0 ? 'moved' : ''}
                  style={{ background: cellShade(n, totals.rows[t] ?? 0, p === t) }}
                  title={`${n} of ${totals.rows[t] ?? 0} ${names[t]} images read as ${names[p]}`}
                >
                  {n}
                </td>
              ))}
              <td className="total">{totals.rows[t]}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="muted small" data-testid="flip-matrix-summary">
        {totals.diagonal} of {totals.total} images keep their true class (the diagonal); {totals.total - totals.diagonal} end in another one, either read wrongly from the start or
        moved there by the search.
      </p>
    </div>
  );
}
