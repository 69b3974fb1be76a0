/** The comparison chart: every run's curves on one set of axes, one colour per run, one dash per search. */
import { getAttack } from '../attacks/registry.ts';
import type { AttackId } from '../attacks/types.ts';
import { curveOf } from '../stats/curve.ts';
import { normName } from '../report/format.ts';
import { curveChartSvg, DASHES, PALETTE, type ChartSeries } from '../report/svgChart.ts';
import type { LabelledRun } from './compareRuns.ts';

/** The overlay as SVG text (Wilson 95 % bands included). */
export function comparisonSvg(runs: readonly LabelledRun[], options: { readonly title?: string; readonly width?: number } = {}): string {
  const attacks: AttackId[] = [];
  for (const r of runs) for (const a of r.run.run.config.attacks) if (!attacks.includes(a.id)) attacks.push(a.id);
  const series: ChartSeries[] = [];
  runs.forEach((r, i) => {
    for (const attack of attacks) {
      const points = curveOf(r.run.run.curve, attack);
      if (points.length === 0) continue;
      const dash = DASHES[attacks.indexOf(attack) % DASHES.length]!;
      series.push({
        label: `${r.label}: ${getAttack(attack).meta.label}`,
        color: PALETTE[i % PALETTE.length]!,
        ...(dash !== '' ? { dash } : {}),
        points: points.map((p) => ({ x: p.eps, y: p.robustAccuracy, low: p.ci95Low, high: p.ci95High })),
      });
    }
  });
  const norms = [...new Set(runs.map((r) => r.run.run.config.norm))];
  const normText = norms.map(normName).join(' / ');
  return curveChartSvg(series, {
    title: options.title ?? `Robust accuracy against the ${normText} budget`,
    xLabel: `ε (${normText}, pixel units on [0, 1])`,
    yLabel: 'robust accuracy',
    ...(options.width !== undefined ? { width: options.width } : {}),
  });
}
