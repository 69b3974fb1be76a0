/**
 * The comparison chart as plain Plotly data: every run's curves on one set of axes, one colour per
 * run (the palette of the report's chart), one dash per search, each with its Wilson 95 % band.
 * Also the words of the difference table. Pure, so it is tested in Node.
 */
import type { Data, Layout } from 'plotly.js-dist-min';
import type { AttackId } from '../../core/attacks/types.ts';
import type { ComparisonRow, LabelledRun } from '../../core/compare/compareRuns.ts';
import { PALETTE } from '../../core/report/svgChart.ts';
import { attackLabel, groupByAttack, robustAccuracyLayout } from './figure.ts';

/** Plotly dash styles, one per search in first-seen order. */
export const COMPARISON_DASHES = ['solid', 'dash', 'dot', 'dashdot'] as const;

/** The searches of all runs, in first-seen order. */
export function comparedAttacks(runs: readonly LabelledRun[]): AttackId[] {
  const seen: AttackId[] = [];
  for (const r of runs) for (const p of r.run.run.curve) if (!seen.includes(p.attack)) seen.push(p.attack);
  return seen;
}

function translucent(hex: string, alpha: number): string {
  const n = Number.parseInt(hex.slice(1), 16);
  return `rgba(${(n >> 16) & 255}, ${(n >> 8) & 255}, ${n & 255}, ${alpha})`;
}

/** Traces: per run and search a band (first) and a line. */
export function comparisonTraces(runs: readonly LabelledRun[]): Data[] {
  const attacks = comparedAttacks(runs);
  const traces: Data[] = [];
  runs.forEach((run, i) => {
    const colour = PALETTE[i % PALETTE.length]!;
    for (const [attack, list] of groupByAttack(run.run.run.curve)) {
      const name = `${run.label}: ${attackLabel(attack)}`;
      const xs = list.map((p) => p.eps);
      traces.push({
        type: 'scatter',
        mode: 'lines',
        x: [...xs, ...[...xs].reverse()],
        y: [...list.map((p) => p.ci95High), ...[...list].reverse().map((p) => p.ci95Low)],
        fill: 'toself',
        fillcolor: translucent(colour, 0.13),
        line: { width: 0 },
        hoverinfo: 'skip',
        showlegend: false,
        legendgroup: name,
        name: `${name} 95 % interval`,
      });
      traces.push({
        type: 'scatter',
        mode: 'lines+markers',
        x: xs,
        y: list.map((p) => p.robustAccuracy),
        name,
        legendgroup: name,
        line: { color: colour, width: 2, dash: COMPARISON_DASHES[attacks.indexOf(attack) % COMPARISON_DASHES.length]! },
        marker: { color: colour, size: 6 },
        text: list.map((p) => `${p.robust} of ${p.samples} held · 95 % interval ${(p.ci95Low * 100).toFixed(1)}–${(p.ci95High * 100).toFixed(1)} %`),
        hovertemplate: `${name} at ε = %{x:.4g}<br>robust accuracy %{y:.1%}<br>%{text}<extra></extra>`,
      });
    }
  });
  return traces;
}

/** The layout: budgets of all runs on the x axis (in k/255 too for L∞). */
export function comparisonLayout(runs: readonly LabelledRun[]): Partial<Layout> {
  return robustAccuracyLayout(
    runs.flatMap((r) => r.run.run.curve.map((p) => p.eps)),
    runs.map((r) => r.run.run.config.norm),
  );
}

/** A difference of proportions in percentage points with its sign: "+12.5 pp", "−3.0 pp", "0.0 pp". */
export function points(difference: number, digits = 1): string {
  const value = (Math.abs(difference) * 100).toFixed(digits);
  if (Number(value) === 0) return `${(0).toFixed(digits)} pp`;
  return `${difference < 0 ? '−' : '+'}${value} pp`;
}

/** The difference of a row with Newcombe's interval: "+20.0 pp (95 % interval +5.2 to +33.4 pp)". */
export function differenceText(row: Pick<ComparisonRow, 'difference' | 'differenceLow' | 'differenceHigh'>): string {
  return `${points(row.difference)} (95 % interval ${points(row.differenceLow).replace(' pp', '')} to ${points(row.differenceHigh)})`;
}

/** Whether the interval of a difference leaves out 0 (the two runs differ beyond sampling noise at 95 %). */
export function differenceExcludesZero(row: Pick<ComparisonRow, 'differenceLow' | 'differenceHigh'>): boolean {
  return row.differenceLow > 0 || row.differenceHigh < 0;
}
