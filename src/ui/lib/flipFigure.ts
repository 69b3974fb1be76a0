/**
 * The flip-budget charts as plain Plotly data: a histogram of the per-image flip budgets with the
 * median marked, and the robust-accuracy curve those budgets imply, with its Wilson 95 % band.
 * Pure, so it is tested in Node.
 */
import type { Data, Layout } from 'plotly.js-dist-min';
import type { FlipHistogram } from '../../core/flips/curve.ts';
import type { FlipCurvePoint } from '../../core/flips/types.ts';
import type { Norm } from '../../core/types.ts';
import { describeEps, formatEps } from './budgets.ts';

const BAR_COLOUR = '#2f5d62';
const MEDIAN_COLOUR = '#a23b2a';
const CURVE_COLOUR = '#6a4f9c';

const BASE_LAYOUT: Partial<Layout> = {
  paper_bgcolor: '#ffffff',
  plot_bgcolor: '#ffffff',
  font: { family: 'system-ui, -apple-system, "Segoe UI", sans-serif', size: 12, color: '#1f2a30' },
  hovermode: 'closest',
  showlegend: false,
};

function normName(norm: Norm): string {
  return norm === 'linf' ? 'L∞' : 'L2';
}

/** A budget in words: with grey levels for L∞. */
export function budgetText(eps: number, norm: Norm): string {
  return norm === 'linf' ? describeEps(eps) : formatEps(eps);
}

/** One bar per bin, at the bin's centre and as wide as the bin. */
export function histogramTraces(h: FlipHistogram, norm: Norm): Data[] {
  const lows = h.edges.slice(0, -1);
  const highs = h.edges.slice(1);
  return [
    {
      type: 'bar',
      x: lows.map((low, i) => (low + highs[i]!) / 2),
      y: [...h.counts],
      width: lows.map((low, i) => highs[i]! - low),
      marker: { color: BAR_COLOUR, line: { color: '#ffffff', width: 1 } },
      hovertext: lows.map((low, i) => `ε from ${formatEps(low)} to ${formatEps(highs[i]!)} (${normName(norm)})`),
      hovertemplate: '%{hovertext}<br>%{y} images<extra></extra>',
      name: 'images per flip budget',
    },
  ];
}

/** The histogram's axes, with the median as a dashed vertical line when it is a positive budget. */
export function histogramLayout(h: FlipHistogram, norm: Norm, median: number | null): Partial<Layout> {
  const upper = h.edges[h.edges.length - 1] ?? 1;
  const tallest = Math.max(0, ...h.counts);
  const marked = median !== null && Number.isFinite(median) && median > 0;
  return {
    ...BASE_LAYOUT,
    margin: { l: 56, r: 16, t: 24, b: 52 },
    bargap: 0,
    xaxis: { title: { text: `flip budget ε (${normName(norm)}, pixel units on 0–1)` }, range: [0, upper], zeroline: false, gridcolor: '#e7e4dc' },
    // Whole images only: with few images per bar, ticks every 1 instead of Plotly's 0.5 steps.
    yaxis: { title: { text: 'images' }, rangemode: 'tozero', gridcolor: '#e7e4dc', ...(tallest <= 10 ? { dtick: 1 } : {}) },
    shapes: marked ? [{ type: 'line', xref: 'x', yref: 'paper', x0: median, x1: median, y0: 0, y1: 1, line: { color: MEDIAN_COLOUR, width: 2, dash: 'dash' } }] : [],
    annotations: marked
      ? [{ x: median, y: 1, xref: 'x', yref: 'paper', yanchor: 'bottom', text: `median ${formatEps(median)}`, showarrow: false, font: { color: MEDIAN_COLOUR, size: 12 } }]
      : [],
  };
}

/** Name of the implied curve's line trace. */
export const FLIP_CURVE_NAME = 'robust accuracy from flip budgets';

/**
 * The implied curve: the Wilson band as its lower and upper edges (the upper one filled down to the
 * lower), then the robust accuracy line. All three are steps, as the share of budgets above ε is.
 */
export function flipCurveTraces(points: readonly FlipCurvePoint[]): Data[] {
  const xs = points.map((p) => p.eps);
  const edge = { type: 'scatter' as const, mode: 'lines' as const, x: xs, hoverinfo: 'skip' as const, line: { width: 0, shape: 'hv' as const } };
  return [
    { ...edge, y: points.map((p) => p.ci95Low), name: '95 % interval, lower edge' },
    { ...edge, y: points.map((p) => p.ci95High), fill: 'tonexty', fillcolor: 'rgba(106, 79, 156, 0.16)', name: '95 % interval' },
    {
      type: 'scatter',
      mode: 'lines',
      x: xs,
      y: points.map((p) => p.robustAccuracy),
      line: { color: CURVE_COLOUR, width: 2, shape: 'hv' },
      text: points.map((p) => `${p.robust} of ${p.samples} held`),
      hovertemplate: 'ε = %{x:.4g}<br>robust accuracy %{y:.1%}<br>%{text}<extra></extra>',
      name: FLIP_CURVE_NAME,
    },
  ];
}

/** Axes of the implied curve. */
export function flipCurveLayout(norm: Norm): Partial<Layout> {
  return {
    ...BASE_LAYOUT,
    margin: { l: 56, r: 16, t: 16, b: 52 },
    xaxis: { title: { text: `budget ε (${normName(norm)}, pixel units on 0–1)` }, zeroline: false, gridcolor: '#e7e4dc' },
    yaxis: { title: { text: 'robust accuracy' }, range: [0, 1.02], tickformat: '.0%', gridcolor: '#e7e4dc', zeroline: false },
  };
}

/** The median flip budget in words, including the two cases without a number. */
export function medianText(median: number | null, maxEps: number, norm: Norm): string {
  if (median === null) return `above the largest budget tried (${budgetText(maxEps, norm)}): at least half of the images read correctly were never flipped`;
  if (Number.isNaN(median)) return 'none: no image was read correctly to begin with';
  return budgetText(median, norm);
}
