/**
 * The robustness chart as plain Plotly data: one line per attack (robust accuracy against ε), its
 * Wilson 95 % band, and the clean accuracy as a dashed reference line. Pure, so it is tested in Node
 * and used for both the live chart and the PNG export.
 */
import type { Data, Layout } from 'plotly.js-dist-min';
import type { AttackId } from '../../core/attacks/types.ts';
import { ATTACKS } from '../../core/attacks/registry.ts';
import type { CurvePoint } from '../../core/sweep/types.ts';
import type { Norm } from '../../core/types.ts';
import { formatEps, greyLevels } from './budgets.ts';

/** Line colours per attack (our own palette), and the clean reference. */
export const ATTACK_COLOURS: Readonly<Record<AttackId, string>> = {
  fgsm: '#2b6a9a',
  pgd: '#b2552b',
  'apgd-ce': '#6a4f9c',
  'apgd-dlr': '#3d7a4c',
  square: '#a07818',
  deepfool: '#8d3a5f',
  noise: '#7b7f83',
};
export const CLEAN_COLOUR = '#59656d';

function bandColour(hex: string): string {
  const n = Number.parseInt(hex.slice(1), 16);
  return `rgba(${(n >> 16) & 255}, ${(n >> 8) & 255}, ${n & 255}, 0.16)`;
}

/** The attack's own label from its metadata (e.g. "APGD-CE"), or the id for an unknown one. */
export function attackLabel(attack: AttackId): string {
  return ATTACKS.find((a) => a.meta.id === attack)?.meta.label ?? attack;
}

/** The points of each attack, in first-seen order, sorted by ε. */
export function groupByAttack(points: readonly CurvePoint[]): Map<AttackId, CurvePoint[]> {
  const groups = new Map<AttackId, CurvePoint[]>();
  for (const p of points) groups.set(p.attack, [...(groups.get(p.attack) ?? []), p]);
  for (const list of groups.values()) list.sort((a, b) => a.eps - b.eps);
  return groups;
}

/** Traces of the chart: per attack a band (first) and a line; then the clean accuracy line. */
export function curveTraces(points: readonly CurvePoint[], cleanAccuracy: number | null): Data[] {
  const traces: Data[] = [];
  const epsAll = points.map((p) => p.eps);
  for (const [attack, list] of groupByAttack(points)) {
    const colour = ATTACK_COLOURS[attack] ?? '#444';
    const xs = list.map((p) => p.eps);
    traces.push({
      type: 'scatter',
      x: [...xs, ...[...xs].reverse()],
      y: [...list.map((p) => p.ci95High), ...[...list].reverse().map((p) => p.ci95Low)],
      mode: 'lines',
      fill: 'toself',
      fillcolor: bandColour(colour),
      line: { width: 0 },
      hoverinfo: 'skip',
      showlegend: false,
      legendgroup: attack,
      name: `${attackLabel(attack)} 95 % interval`,
    });
    traces.push({
      type: 'scatter',
      mode: 'lines+markers',
      x: xs,
      y: list.map((p) => p.robustAccuracy),
      name: `${attackLabel(attack)}: robust accuracy`,
      legendgroup: attack,
      line: { color: colour, width: 2 },
      marker: { color: colour, size: 7 },
      text: list.map((p) => `${p.robust} of ${p.samples} held · 95 % interval ${(p.ci95Low * 100).toFixed(1)}–${(p.ci95High * 100).toFixed(1)} %`),
      hovertemplate: `${attackLabel(attack)} at ε = %{x:.4g}<br>robust accuracy %{y:.1%}<br>%{text}<extra></extra>`,
    });
  }
  if (cleanAccuracy !== null && epsAll.length > 0) {
    traces.push({
      type: 'scatter',
      mode: 'lines',
      x: [Math.min(...epsAll), Math.max(...epsAll)],
      y: [cleanAccuracy, cleanAccuracy],
      name: 'clean accuracy',
      line: { color: CLEAN_COLOUR, width: 1.5, dash: 'dash' },
      hovertemplate: `clean accuracy %{y:.1%}<extra></extra>`,
    });
  }
  return traces;
}

/** The chart layout; budgets are marked in pixel units and, for L∞, in grey levels (k/255). */
export function curveLayout(points: readonly CurvePoint[], norm: Norm): Partial<Layout> {
  return robustAccuracyLayout(points.map((p) => p.eps), [norm]);
}

/**
 * The robust-accuracy-against-ε frame shared by the curve and the comparison chart: one tick per
 * budget, labelled in pixel units and, when every run is L∞, also in grey levels (k/255).
 */
export function robustAccuracyLayout(budgets: readonly number[], norms: readonly Norm[]): Partial<Layout> {
  const eps = [...new Set(budgets)].sort((a, b) => a - b);
  const distinctNorms = [...new Set(norms)];
  const linf = distinctNorms.length === 1 && distinctNorms[0] === 'linf';
  const normText = distinctNorms.map((n) => (n === 'linf' ? 'L∞' : 'L2')).join(' / ');
  return {
    margin: { l: 64, r: 20, t: 16, b: 72 },
    paper_bgcolor: '#ffffff',
    plot_bgcolor: '#ffffff',
    font: { family: 'system-ui, -apple-system, "Segoe UI", sans-serif', size: 13, color: '#1f2a30' },
    xaxis: {
      title: { text: `budget ε (${normText}, pixel units on 0–1)` },
      tickmode: 'array',
      tickvals: eps,
      ticktext: eps.map((e) => (linf ? `${formatEps(e)}<br>${greyLevels(e)}` : formatEps(e))),
      zeroline: false,
      gridcolor: '#e7e4dc',
    },
    yaxis: { title: { text: 'robust accuracy' }, range: [0, 1.02], tickformat: '.0%', gridcolor: '#e7e4dc', zeroline: false },
    legend: { orientation: 'h', y: -0.28 },
    hovermode: 'closest',
  };
}
