/** One sample's answer against ε: the confidence of the predicted class at each budget, per attack. */
import { useMemo, type ReactElement } from 'react';
import type { Data, Layout } from 'plotly.js-dist-min';
import type { SampleRecord } from '../../core/sweep/types.ts';
import { ATTACK_COLOURS, attackLabel } from '../lib/figure.ts';
import { usePlot } from './usePlot.ts';

export interface ConfidenceChartProps {
  readonly record: SampleRecord;
  readonly classNames: readonly string[];
}

/** Traces: per attack, markers filled where the answer is wrong. */
export function confidenceTraces(record: SampleRecord, classNames: readonly string[]): Data[] {
  const attacks = [...new Set(record.outcomes.map((o) => o.attack))];
  return attacks.map((attack) => {
    const outcomes = record.outcomes.filter((o) => o.attack === attack).sort((a, b) => a.eps - b.eps);
    const colour = ATTACK_COLOURS[attack] ?? '#444';
    return {
      type: 'scatter',
      mode: 'lines+markers',
      name: attackLabel(attack),
      x: outcomes.map((o) => o.eps),
      y: outcomes.map((o) => o.advConf),
      text: outcomes.map((o) => `${classNames[o.advPred] ?? o.advPred}${o.advPred === record.label ? ' (right)' : ' (wrong)'}`),
      hovertemplate: 'ε = %{x:.4g}<br>answer %{text}<br>confidence %{y:.1%}<extra></extra>',
      line: { color: colour, width: 1.5 },
      marker: {
        color: outcomes.map((o) => (o.advPred === record.label ? '#ffffff' : colour)),
        line: { color: colour, width: 2 },
        size: 9,
      },
    };
  });
}

const LAYOUT: Partial<Layout> = {
  margin: { l: 56, r: 12, t: 8, b: 48 },
  height: 260,
  xaxis: { title: { text: 'budget ε' }, gridcolor: '#e7e4dc', zeroline: false },
  yaxis: { title: { text: 'confidence of the answer' }, range: [0, 1.02], tickformat: '.0%', gridcolor: '#e7e4dc' },
  legend: { orientation: 'h', y: -0.3 },
  paper_bgcolor: '#ffffff',
  plot_bgcolor: '#ffffff',
};

/** The chart; hollow markers: still the true class, filled: a wrong class. */
export function ConfidenceChart({ record, classNames }: ConfidenceChartProps): ReactElement {
  const data = useMemo(() => confidenceTraces(record, classNames), [record, classNames]);
  const ref = usePlot(data, LAYOUT);
  return <div ref={ref} className="chart-small" data-testid="confidence-chart" />;
}
