/** Robust accuracy per true class at one search × budget, with Wilson 95 % intervals. */
import type { ReactElement } from 'react';
import type { PerClassPoint } from '../../core/stats/perClass.ts';
import { percent } from '../lib/format.ts';

/** The table, in class-index order. */
export function PerClassTable({ point }: { point: PerClassPoint }): ReactElement {
  return (
    <table className="results per-class" data-testid="per-class-table">
      <thead>
        <tr>
          <th>true class</th>
          <th>images</th>
          <th>read correctly clean</th>
          <th>held</th>
          <th>robust accuracy</th>
          <th>95 % interval</th>
        </tr>
      </thead>
      <tbody>
        {point.classes.map((c) => (
          <tr key={c.classIndex} data-class={c.classIndex}>
            <td>
              {c.classIndex}: {c.className}
            </td>
            <td>{c.samples}</td>
            <td>{c.cleanCorrect}</td>
            <td>{c.robust}</td>
            <td>{c.samples === 0 ? '–' : percent(c.robustAccuracy)}</td>
            <td>{c.samples === 0 ? 'no images' : `${percent(c.ci95Low)} – ${percent(c.ci95High)}`}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
