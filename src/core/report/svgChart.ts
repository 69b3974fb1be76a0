/**
 * Robust-accuracy charts as standalone inline SVG text (no DOM, no plotting library): one line per
 * series with markers, its Wilson 95 % band as a light area, optional horizontal reference lines
 * (clean accuracy), axes with round-number ticks, and a legend under the plot. Print-friendly:
 * white background, dark text, colours that stay distinct in grey (Okabe & Ito's colour-blind-safe
 * palette, common practice).
 */
import { escapeHtml } from './html.ts';

export interface ChartPoint {
  readonly x: number;
  readonly y: number;
  readonly low?: number;
  readonly high?: number;
}

export interface ChartSeries {
  readonly label: string;
  readonly points: readonly ChartPoint[];
  readonly color?: string;
  /** SVG stroke-dasharray, e.g. "6 4". */
  readonly dash?: string;
}

export interface ChartOptions {
  readonly title?: string;
  readonly xLabel: string;
  readonly yLabel: string;
  readonly width?: number;
  readonly height?: number;
  /** Horizontal lines, e.g. clean accuracy. */
  readonly references?: readonly { readonly y: number; readonly label: string; readonly color?: string }[];
}

/** Okabe–Ito palette without its yellow (too pale on white paper). */
export const PALETTE = ['#0072B2', '#D55E00', '#009E73', '#CC79A7', '#E69F00', '#56B4E9', '#000000'] as const;

/** Dash patterns to tell apart series of the same colour. */
export const DASHES = ['', '6 4', '2 3', '8 3 2 3'] as const;

const MARGIN = { left: 64, right: 24, top: 36, bottom: 52 };
const LEGEND_ROW = 20;
const LEGEND_COLUMNS = 2;

/** Round-number tick values covering [0, max] (about `count` of them). */
export function niceTicks(max: number, count = 5): number[] {
  if (!(max > 0)) return [0];
  const rough = max / count;
  const power = 10 ** Math.floor(Math.log10(rough));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * power).find((s) => s >= rough) ?? rough;
  const ticks: number[] = [];
  for (let i = 0; i * step <= max * (1 + 1e-9); i++) ticks.push(Number((i * step).toPrecision(12)));
  return ticks;
}

const num = (v: number): string => (Math.round(v * 100) / 100).toString();

/** The chart as an `<svg>` element (text). */
export function curveChartSvg(series: readonly ChartSeries[], options: ChartOptions): string {
  const width = options.width ?? 720;
  const legendRows = Math.ceil((series.length + (options.references?.length ?? 0)) / LEGEND_COLUMNS);
  const plotHeight = (options.height ?? 380) - MARGIN.top - MARGIN.bottom;
  const height = MARGIN.top + plotHeight + MARGIN.bottom + legendRows * LEGEND_ROW + 8;
  const plotWidth = width - MARGIN.left - MARGIN.right;
  const xMax = Math.max(0, ...series.flatMap((s) => s.points.map((p) => p.x)));
  const xTicks = niceTicks(xMax > 0 ? xMax : 1);
  const xEnd = xTicks[xTicks.length - 1]! || 1;
  const sx = (x: number): number => MARGIN.left + (x / xEnd) * plotWidth;
  const sy = (y: number): number => MARGIN.top + (1 - Math.min(1, Math.max(0, y))) * plotHeight;
  const parts: string[] = [];
  parts.push(`<rect x="0" y="0" width="${width}" height="${height}" fill="#ffffff"/>`);
  if (options.title !== undefined) parts.push(`<text x="${MARGIN.left}" y="22" font-size="15" font-weight="600" fill="#1a1a1a">${escapeHtml(options.title)}</text>`);
  parts.push(axes(xTicks, sx, sy, { plotWidth, plotHeight }, options));
  // Many overlapping bands turn muddy: lighter bands when there are more than two series.
  const bandOpacity = series.length <= 2 ? 0.13 : 0.07;
  series.forEach((s, i) => parts.push(seriesMarkup(s, colorOf(s, i), sx, sy, bandOpacity)));
  for (const ref of options.references ?? []) {
    parts.push(`<line x1="${num(sx(0))}" x2="${num(sx(xEnd))}" y1="${num(sy(ref.y))}" y2="${num(sy(ref.y))}" stroke="${ref.color ?? '#555555'}" stroke-width="1.2" stroke-dasharray="3 3"><title>${escapeHtml(`${ref.label}: ${ref.y.toFixed(4)}`)}</title></line>`);
  }
  parts.push(legend(series, options.references ?? [], MARGIN.top + plotHeight + MARGIN.bottom - 6, width));
  const label = escapeHtml(options.title ?? `${options.yLabel} against ${options.xLabel}`);
  return `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${width} ${height}" width="${width}" height="${height}" role="img" aria-label="${label}" font-family="system-ui, -apple-system, 'Segoe UI', sans-serif">${parts.join('')}</svg>`;
}

function colorOf(s: ChartSeries, i: number): string {
  return s.color ?? PALETTE[i % PALETTE.length]!;
}

function axes(xTicks: readonly number[], sx: (x: number) => number, sy: (y: number) => number, size: { plotWidth: number; plotHeight: number }, options: ChartOptions): string {
  const out: string[] = [];
  const yTicks = [0, 0.2, 0.4, 0.6, 0.8, 1];
  for (const y of yTicks) {
    out.push(`<line x1="${MARGIN.left}" x2="${MARGIN.left + size.plotWidth}" y1="${num(sy(y))}" y2="${num(sy(y))}" stroke="#e3e3e3" stroke-width="1"/>`);
    out.push(`<text x="${MARGIN.left - 8}" y="${num(sy(y) + 4)}" font-size="11" text-anchor="end" fill="#333333">${y.toFixed(1)}</text>`);
  }
  for (const x of xTicks) {
    out.push(`<line x1="${num(sx(x))}" x2="${num(sx(x))}" y1="${MARGIN.top}" y2="${MARGIN.top + size.plotHeight}" stroke="#efefef" stroke-width="1"/>`);
    out.push(`<text x="${num(sx(x))}" y="${MARGIN.top + size.plotHeight + 16}" font-size="11" text-anchor="middle" fill="#333333">${escapeHtml(String(x))}</text>`);
  }
  const bottom = MARGIN.top + size.plotHeight;
  out.push(`<line x1="${MARGIN.left}" x2="${MARGIN.left + size.plotWidth}" y1="${bottom}" y2="${bottom}" stroke="#333333" stroke-width="1"/>`);
  out.push(`<line x1="${MARGIN.left}" x2="${MARGIN.left}" y1="${MARGIN.top}" y2="${bottom}" stroke="#333333" stroke-width="1"/>`);
  out.push(`<text x="${MARGIN.left + size.plotWidth / 2}" y="${bottom + 36}" font-size="12" text-anchor="middle" fill="#1a1a1a">${escapeHtml(options.xLabel)}</text>`);
  out.push(`<text transform="translate(16 ${MARGIN.top + size.plotHeight / 2}) rotate(-90)" font-size="12" text-anchor="middle" fill="#1a1a1a">${escapeHtml(options.yLabel)}</text>`);
  return out.join('');
}

function seriesMarkup(s: ChartSeries, color: string, sx: (x: number) => number, sy: (y: number) => number, bandOpacity: number): string {
  const points = [...s.points].sort((a, b) => a.x - b.x);
  const out: string[] = [];
  const banded = points.filter((p) => p.low !== undefined && p.high !== undefined);
  if (banded.length > 1) {
    const upper = banded.map((p) => `${num(sx(p.x))},${num(sy(p.high!))}`);
    const lower = [...banded].reverse().map((p) => `${num(sx(p.x))},${num(sy(p.low!))}`);
    out.push(`<polygon points="${[...upper, ...lower].join(' ')}" fill="${color}" fill-opacity="${bandOpacity}" stroke="none"/>`);
  }
  const line = points.map((p) => `${num(sx(p.x))},${num(sy(p.y))}`).join(' ');
  const dash = s.dash ? ` stroke-dasharray="${s.dash}"` : '';
  out.push(`<polyline points="${line}" fill="none" stroke="${color}" stroke-width="2"${dash}/>`);
  for (const p of points) {
    const band = p.low !== undefined && p.high !== undefined ? ` [${p.low.toFixed(4)}, ${p.high.toFixed(4)}]` : '';
    out.push(`<circle cx="${num(sx(p.x))}" cy="${num(sy(p.y))}" r="3.2" fill="${color}"><title>${escapeHtml(`${s.label}: ε = ${p.x}, ${p.y.toFixed(4)}${band}`)}</title></circle>`);
  }
  return `<g>${out.join('')}</g>`;
}

function legend(series: readonly ChartSeries[], references: NonNullable<ChartOptions['references']>, top: number, width: number): string {
  const columnWidth = (width - MARGIN.left - MARGIN.right) / LEGEND_COLUMNS;
  const items = [
    ...series.map((s, i) => ({ label: s.label, color: colorOf(s, i), dash: s.dash ?? '' })),
    ...references.map((r) => ({ label: r.label, color: r.color ?? '#555555', dash: '3 3' })),
  ];
  return items
    .map((item, i) => {
      const x = MARGIN.left + (i % LEGEND_COLUMNS) * columnWidth;
      const y = top + Math.floor(i / LEGEND_COLUMNS) * LEGEND_ROW;
      const dash = item.dash ? ` stroke-dasharray="${item.dash}"` : '';
      return `<line x1="${x}" x2="${x + 26}" y1="${y}" y2="${y}" stroke="${item.color}" stroke-width="2.5"${dash}/><text x="${x + 34}" y="${y + 4}" font-size="12" fill="#1a1a1a">${escapeHtml(item.label)}</text>`;
    })
    .join('');
}
