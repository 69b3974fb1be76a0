/** The robustness curve: robust accuracy against ε per attack, Wilson 95 % bands, clean accuracy. */
import { useMemo, type ReactElement } from 'react';
import type { CurvePoint } from '../../core/sweep/types.ts';
import type { Norm } from '../../core/types.ts';
import { curveLayout, curveTraces } from '../lib/figure.ts';
import { usePlot } from './usePlot.ts';

export interface CurveChartProps {
  readonly points: readonly CurvePoint[];
  readonly cleanAccuracy: number | null;
  readonly norm: Norm;
}

/** The chart (a Plotly div). */
export function CurveChart({ points, cleanAccuracy, norm }: CurveChartProps): ReactElement {
  const data = useMemo(() => curveTraces(points, cleanAccuracy), [points, cleanAccuracy]);
  const layout = useMemo(() => curveLayout(points, norm), [points, norm]);
  const ref = usePlot(data, layout);
  return <div ref={ref} className="chart" data-testid="curve-chart" data-points={points.length} />;
}
