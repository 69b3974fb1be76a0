/**
 * Two or more runs compared: warnings first when they are not like for like, then every run's
 * curves on one chart with Wilson bands, then the table of robust-accuracy differences against the
 * baseline at each budget with Newcombe's 95 % interval (and, on the same samples, the paired counts).
 */
import { useMemo, type ReactElement } from 'react';
import { compareRuns, type Comparison, type LabelledRun } from '../../core/compare/compareRuns.ts';
import { comparisonLayout, comparisonTraces, differenceExcludesZero, differenceText } from '../lib/compareFigure.ts';
import { attackLabel } from '../lib/figure.ts';
import { describeEps, formatEps } from '../lib/budgets.ts';
import { percent } from '../lib/format.ts';
import { exportComparison } from '../store/reviewActions.ts';
import { usePlot } from './usePlot.ts';

function Warnings({ comparison }: { comparison: Comparison }): ReactElement {
  const warnings = comparison.warnings.filter((w) => w.level === 'warning');
  const notes = comparison.warnings.filter((w) => w.level === 'note');
  return (
    <div data-testid="comparison-warnings" data-warnings={warnings.length}>
      {warnings.length > 0 ? (
        <div className="compare-warn" role="alert">
          <h4>Not like for like: read the differences with care</h4>
          <ul>
            {warnings.map((w) => (
              <li key={w.message} data-kind={w.kind}>
                <strong>{w.kind.replace('-', ' ')}:</strong> {w.message}
              </li>
            ))}
          </ul>
        </div>
      ) : (
        <p className="compare-ok">Same samples, preprocessing, threat model and search settings: the runs compare like for like.</p>
      )}
      {notes.length > 0 && (
        <ul className="muted small compare-notes">
          {notes.map((w) => (
            <li key={w.message}>{w.message}</li>
          ))}
        </ul>
      )}
    </div>
  );
}

function Chart({ runs }: { runs: readonly LabelledRun[] }): ReactElement {
  const data = useMemo(() => comparisonTraces(runs), [runs]);
  const layout = useMemo(() => comparisonLayout(runs), [runs]);
  const ref = usePlot(data, layout);
  return <div ref={ref} className="chart" data-testid="comparison-chart" data-runs={runs.length} />;
}

function accuracy(v: Comparison['rows'][number]['a']): string {
  return `${percent(v.robustAccuracy)} (${v.robust}/${v.samples}; ${percent(v.ci95Low)}–${percent(v.ci95High)})`;
}

function Table({ comparison }: { comparison: Comparison }): ReactElement {
  const paired = comparison.rows.some((r) => r.onlyA !== null);
  const baseline = comparison.runs[0]?.label ?? 'baseline';
  const others = comparison.runs.length > 2;
  return (
    <table className="results compare-table" data-testid="comparison-table">
      <thead>
        <tr>
          {others && <th>compared run</th>}
          <th>search</th>
          <th>ε</th>
          <th>baseline: {baseline}</th>
          <th>{others ? 'compared run' : comparison.runs[1]?.label}</th>
          <th>difference (compared − baseline)</th>
          {paired && <th>robust in only one (baseline / compared)</th>}
        </tr>
      </thead>
      <tbody>
        {comparison.rows.map((r) => (
          <tr key={`${r.other}|${r.attack}|${r.eps}`} data-attack={r.attack} data-eps={r.eps} data-difference={r.difference} className={differenceExcludesZero(r) ? 'beyond-noise' : undefined}>
            {others && <td>{r.other}</td>}
            <td>{attackLabel(r.attack)}</td>
            <td>{r.norm === 'linf' ? describeEps(r.eps) : formatEps(r.eps)}</td>
            <td>{accuracy(r.a)}</td>
            <td>{accuracy(r.b)}</td>
            <td className="difference">{differenceText(r)}</td>
            {paired && <td>{r.onlyA === null ? '–' : `${r.onlyA} / ${r.onlyB ?? 0}`}</td>}
          </tr>
        ))}
      </tbody>
    </table>
  );
}

/** The comparison of `runs` (the first is the baseline). */
export function ComparisonView({ runs }: { runs: readonly LabelledRun[] }): ReactElement {
  const outcome = useMemo(() => {
    try {
      return { comparison: compareRuns(runs), error: null };
    } catch (err) {
      return { comparison: null, error: err instanceof Error ? err.message : String(err) };
    }
  }, [runs]);
  if (outcome.comparison === null) return <p className="problem">{outcome.error}</p>;
  const { comparison } = outcome;
  return (
    <div className="stack" data-testid="comparison">
      <Warnings comparison={comparison} />
      <Chart runs={runs} />
      <p className="muted small">
        Colour: run. Line style: search. Shaded: Wilson 95 % interval of each robust accuracy. The difference interval is Newcombe's hybrid score interval for two independent proportions (1998);
        it treats the runs as independent samples. On the same images the paired counts show how many held in only one of the two runs. Bold: the interval leaves out 0.
      </p>
      {comparison.rows.length === 0 ? <p className="muted">No budget and search appear in both runs, so there is nothing to subtract.</p> : <Table comparison={comparison} />}
      <div className="row">
        <button type="button" data-testid="export-comparison-csv" onClick={() => void exportComparison('csv')}>
          Comparison as CSV
        </button>
        <button type="button" data-testid="export-comparison-svg" onClick={() => void exportComparison('svg')}>
          Chart as SVG
        </button>
        <span className="muted small">comparison.csv has the same columns as the command line's compare output.</span>
      </div>
    </div>
  );
}
