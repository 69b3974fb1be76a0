/**
 * Report sections with the measurements: the curves (chart and the table with the exact values of
 * curve.csv), per-class robust accuracy, the flip matrix, health checks and the flip gallery.
 */
import { CURVE_CSV_HEADER } from '../export/curveCsv.ts';
import { fixed6 } from '../export/csvFormat.ts';
import { curveOf } from '../stats/curve.ts';
import { flipMatrices, perClassRobustness, type FlipMatrix } from '../stats/perClass.ts';
import type { CurvePoint } from '../sweep/types.ts';
import { greyLevels, normName, percent } from './format.ts';
import { html, raw, type Html } from './html.ts';
import { attackLabel, className, type ReportContext } from './context.ts';
import { curveChartSvg, PALETTE } from './svgChart.ts';

/** The cells of one curve.csv row, as curve.csv prints them. */
export function curveCells(c: ReportContext, p: CurvePoint): string[] {
  return [p.attack, p.norm, c.eps(p.eps), String(p.samples), String(p.cleanCorrect), String(p.robust), fixed6(p.robustAccuracy), fixed6(p.ci95Low), fixed6(p.ci95High)];
}

/** Curves: the chart with Wilson bands, a summary sentence per search, and the exact table. */
export function curvesSection(c: ReportContext): Html {
  const { run } = c.saved;
  const series = c.attacks.map((a, i) => ({
    label: attackLabel(a),
    color: PALETTE[i % PALETTE.length]!,
    points: curveOf(run.curve, a).map((p) => ({ x: p.eps, y: p.robustAccuracy, low: p.ci95Low, high: p.ci95High })),
  }));
  const chart = curveChartSvg(series, {
    title: `Robust accuracy against the ${normName(run.config.norm)} budget`,
    xLabel: `ε (${normName(run.config.norm)}, pixel units on [0, 1])`,
    yLabel: 'robust accuracy',
    references: [{ y: run.samples.cleanAccuracy, label: `clean accuracy ${percent(run.samples.cleanAccuracy)}` }],
  });
  return html`<section class="major" id="curves"><h2>Robust accuracy</h2>
<p>Robust accuracy is the share of all samples that are classified correctly clean and at every adversarial point the search found within the budget. Shaded bands and the interval columns are Wilson 95 % score intervals (Wilson 1927) over the ${run.samples.count} samples.</p>
<ul>${c.attacks.map((a) => summaryLine(c, a))}</ul>
<div class="chart">${raw(chart)}</div>
<table id="curve-table"><thead><tr>
${CURVE_CSV_HEADER.map((h) => html`<th data-csv="${h}"${raw(numeric(h) ? ' class="num"' : '')}>${h}</th>`)}<th class="num">ε as k/255</th><th class="num">attack success rate</th>
</tr></thead><tbody>
${run.curve.map((p) => html`<tr>${curveCells(c, p).map((cell, i) => html`<td${raw(numeric(CURVE_CSV_HEADER[i]!) ? ' class="num"' : '')}>${cell}</td>`)}<td class="num">${greyLevels(p.eps)}</td><td class="num">${fixed6(p.attackSuccessRate)}</td></tr>`)}
</tbody></table>
<p class="note">The first nine columns are exactly the rows of curve.csv. Attack success rate = samples flipped ÷ samples correct clean.</p>
</section>`;
}

const numeric = (column: string): boolean => !['attack', 'norm'].includes(column);

function summaryLine(c: ReportContext, attack: CurvePoint['attack']): Html {
  const points = curveOf(c.saved.run.curve, attack);
  const last = points[points.length - 1];
  if (last === undefined) return html`<li>${attackLabel(attack)}: no finished points.</li>`;
  return html`<li>${attackLabel(attack)} at ε = ${c.eps(last.eps)} (${greyLevels(last.eps)}): robust accuracy ${percent(last.robustAccuracy)} (${last.robust} of ${last.samples}; 95 % interval ${percent(last.ci95Low)} to ${percent(last.ci95High)}).</li>`;
}

/** Per-class robust accuracy, one table per search (classes × budgets). */
export function perClassSection(c: ReportContext): Html {
  const points = perClassRobustness(c.result, c.classNames);
  return html`<section class="major" id="per-class"><h2>Robust accuracy per class</h2>
<p>Per true class: robust samples ÷ samples of that class, with its Wilson 95 % interval. Small classes give wide intervals.</p>
${c.attacks.map((attack) => {
    const mine = points.filter((p) => p.attack === attack && p.eps > 0).sort((a, b) => a.eps - b.eps);
    if (mine.length === 0) return '';
    return html`<h3>${attackLabel(attack)}</h3>
<table class="per-class" data-attack="${attack}"><thead><tr><th>Class</th><th class="num">Samples</th><th class="num">Correct clean</th>${mine.map((p) => html`<th class="num">ε = ${c.eps(p.eps)}</th>`)}</tr></thead><tbody>
${c.classNames.map((name, k) => {
      const first = mine[0]!.classes[k];
      return html`<tr><td>${name}</td><td class="num">${first?.samples ?? 0}</td><td class="num">${first?.cleanCorrect ?? 0}</td>${mine.map((p) => {
        const cls = p.classes[k];
        return cls === undefined || cls.samples === 0 ? html`<td class="num">–</td>` : html`<td class="num">${cls.robustAccuracy.toFixed(3)} (${cls.robust}/${cls.samples}) <span class="note">[${cls.ci95Low.toFixed(3)}, ${cls.ci95High.toFixed(3)}]</span></td>`;
      })}</tr>`;
    })}
</tbody></table>`;
  })}
</section>`;
}

const MATRIX_MAX_CLASSES = 20;

/** The flip matrix (true class → class after the attack) of each search at its largest budget. */
export function flipMatrixSection(c: ReportContext): Html {
  const matrices = flipMatrices(c.result, c.classNames);
  return html`<section class="major" id="flip-matrix"><h2>Flip matrix</h2>
<p>Rows: true class. Columns: the class predicted at the kept point of the search (the clean prediction for samples not attacked). Shown at each search's largest budget; samples.csv holds every budget.</p>
${c.attacks.map((attack) => {
    const mine = matrices.filter((m) => m.attack === attack).sort((a, b) => a.eps - b.eps);
    const last = mine[mine.length - 1];
    if (last === undefined) return '';
    return html`<h3>${attackLabel(attack)} at ε = ${c.eps(last.eps)}</h3>${last.classNames.length <= MATRIX_MAX_CLASSES ? matrixTable(last) : topConfusions(last)}`;
  })}
</section>`;
}

function matrixTable(m: FlipMatrix): Html {
  return html`<table class="matrix" data-attack="${m.attack}"><thead><tr><th>true \\ predicted</th>${m.classNames.map((n) => html`<th>${n}</th>`)}</tr></thead><tbody>
${m.counts.map((row, t) => html`<tr><th>${m.classNames[t]}</th>${row.map((count, p) => html`<td${raw(p === t ? ' class="diag"' : count > 0 ? ' class="off"' : '')}>${count}</td>`)}</tr>`)}
</tbody></table>`;
}

function topConfusions(m: FlipMatrix): Html {
  const pairs: { t: number; p: number; count: number }[] = [];
  m.counts.forEach((row, t) => row.forEach((count, p) => {
    if (p !== t && count > 0) pairs.push({ t, p, count });
  }));
  pairs.sort((a, b) => b.count - a.count || a.t - b.t || a.p - b.p);
  return html`<p class="note">${m.classNames.length} classes: the 20 most frequent changes of class are listed instead of the full matrix.</p>
<table><thead><tr><th>True class</th><th>Predicted after the attack</th><th class="num">Samples</th></tr></thead><tbody>
${pairs.slice(0, 20).map((x) => html`<tr><td>${m.classNames[x.t]}</td><td>${m.classNames[x.p]}</td><td class="num">${x.count}</td></tr>`)}
</tbody></table>`;
}

/** Health checks of the evaluation, when they were run. */
export function healthSection(c: ReportContext): Html {
  const checks = c.saved.health;
  if (checks === undefined || checks.length === 0) {
    return html`<section class="major" id="health"><h2>Health checks</h2><p>No health checks were run with this sweep (the CLI runs them with <code>sweep --health</code>). Without them, a weak search or masked gradients cannot be ruled out as the reason for high robust accuracy.</p></section>`;
  }
  const warnings = checks.filter((h) => h.status === 'warn').length;
  return html`<section class="major" id="health"><h2>Health checks</h2>
<p>Checks for signs that the robustness numbers are too good because the search was weak or the gradients were masked (Carlini et al. 2019; Athalye, Carlini &amp; Wagner 2018). ${warnings === 0 ? 'No check raised a warning.' : `${warnings} check${warnings === 1 ? '' : 's'} raised a warning: read the robust accuracy above with that in mind.`}</p>
<table id="health-table"><thead><tr><th>Check</th><th>Status</th><th>Detail</th></tr></thead><tbody>
${checks.map((h) => html`<tr><td>${h.title ?? h.check} <span class="note mono">(${h.check})</span></td><td class="status-${['pass', 'warn', 'skip'].includes(h.status) ? h.status : 'skip'}">${h.status}</td><td>${h.detail}</td></tr>`)}
</tbody></table>
</section>`;
}

/** An excerpt of the flip gallery: clean and adversarial thumbnails with labels. */
export function gallerySection(c: ReportContext, limit: number): Html {
  const flips = c.saved.flips.slice(0, limit);
  // One flip = one sample flipped by one search (at the smallest budget of the sweep that flipped it).
  const total = c.saved.records.reduce((n, r) => n + Object.values(r.minFlipEps).filter((e) => typeof e === 'number' && e > 0).length, 0);
  if (flips.length === 0) return html`<section class="major" id="gallery"><h2>Flipped samples</h2><p>No thumbnails of flipped samples are stored in this run${total === 0 ? ' (no sample was flipped)' : ''}.</p></section>`;
  return html`<section class="major" id="gallery"><h2>Flipped samples (excerpt)</h2>
<p>${flips.length} of the ${total} flips (a sample flipped by a search), each at the smallest budget of the sweep that flipped it: the clean image, then the adversarial image the search kept (thumbnails, rounded to 8 bits). Every flip is listed in samples.csv.</p>
<div class="gallery">
${flips.map((f) => html`<figure><div class="pair"><div><img alt="clean ${f.file}" src="data:image/png;base64,${f.originalPng}">clean</div><div><img alt="adversarial ${f.file}" src="data:image/png;base64,${f.adversarialPng}">adversarial</div></div>
<figcaption><span class="mono">${f.file}</span><br>${attackLabel(f.attack)}, ε = ${c.eps(f.eps)} (${greyLevels(f.eps)})<br>true: ${className(c, f.label)}; clean: ${className(c, f.cleanPred)} (${percent(f.cleanConf)})<br>after: ${className(c, f.advPred)} (${percent(f.advConf)})</figcaption></figure>`)}
</div>
</section>`;
}
