/**
 * The safety-review steps of the end-to-end suite: after the demo sweep, save the run to one file,
 * read it back in a fresh browser (new profile) without running anything, export the HTML report
 * and check it is self-contained, and compare two runs (the other demo model on the same plan),
 * including a deliberately mismatched copy that the comparison must flag.
 */
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { launch } from './browser.mjs';
import { download, expect, openScreen, parseCsv, snap, textOf, TIMEOUT, waitForDemoWorkspace } from './steps.mjs';
import { pgdClassRows } from './analysis.mjs';

/** CSV rows as objects keyed by the header. */
function csvRecords(text) {
  const [header, ...rows] = parseCsv(text);
  return rows.map((r) => Object.fromEntries(header.map((h, i) => [h, r[i]])));
}

async function tableCells(page, selector) {
  return page.$$eval(`${selector} tbody tr`, (rows) => rows.map((row) => [...row.children].map((cell) => (cell.textContent ?? '').trim())));
}

/** The y values of the chart's lines (Plotly keeps the figure's data on its div). */
async function lineValues(page, testId) {
  return page.$eval(`[data-testid=${testId}]`, (div) => (div.data ?? []).filter((t) => t.mode === 'lines+markers').map((t) => ({ name: t.name, y: Array.from(t.y) })));
}

/** The percent text the workbench prints for a fraction (one decimal). */
const percentText = (fraction) => `${(Number(fraction) * 100).toFixed(1)} %`;

/** The results table (search, ε, counts, accuracy, interval) shows exactly the curve.csv rows. */
function expectTableIsCurve(cells, curve) {
  expect(cells.length === curve.length, `the results table has ${cells.length} rows, curve.csv ${curve.length}`);
  cells.forEach((c, i) => {
    const p = curve[i];
    expect(c[0].toLowerCase() === p.attack, `row ${i + 1}: search ${c[0]} vs ${p.attack}`);
    expect(c[2] === `${p.robust} / ${p.clean_correct} / ${p.samples}`, `row ${i + 1}: counts "${c[2]}" vs curve.csv ${p.robust} / ${p.clean_correct} / ${p.samples}`);
    expect(c[3] === percentText(p.robust_accuracy), `row ${i + 1}: robust accuracy "${c[3]}" vs curve.csv ${p.robust_accuracy}`);
    expect(c[4] === `${percentText(p.ci95_low)} – ${percentText(p.ci95_high)}`, `row ${i + 1}: interval "${c[4]}" vs curve.csv ${p.ci95_low}–${p.ci95_high}`);
  });
}

/** Every src/href value of an HTML text. */
const linksOf = (html) => [...html.matchAll(/\b(?:src|href)\s*=\s*["']([^"']*)["']/gi)].map((m) => m[1]);

/** A copy of a saved run whose samples, preprocessing, budgets and search settings differ: not like for like. */
function mismatchedCopy(saved) {
  const run = structuredClone(saved);
  run.savedAt = new Date(Date.parse(saved.savedAt) + 60_000).toISOString();
  run.run.samples.sha256 = 'f'.repeat(64);
  run.run.preprocessing.mean = run.run.preprocessing.mean.map((m) => m + 0.5);
  run.run.config.eps = run.run.config.eps.slice(0, -1);
  run.run.config.seed += 1;
  run.run.config.attacks[run.run.config.attacks.length - 1].options.steps = 3;
  return run;
}

/**
 * The review checks, run with the suite's `check`. `curveCsv` is the demo sweep's curve.csv as the
 * exports screen gave it. Returns nothing; each check reports on its own.
 */
export async function reviewChecks({ check, page, serverUrl, artifacts, curveCsv, measured }) {
  if (curveCsv === null) {
    await check('the safety-review checks', () => expect(false, 'no curve.csv from the exports check to compare the saved run with'));
    return;
  }
  const blockStarted = Date.now();
  const curve = csvRecords(curveCsv.toString('utf8'));
  const savedPath = path.join(artifacts, 'run.brink.json');
  let saved = null;

  await check('the demo run saves to one file, run.brink.json, with its curve, records and flip thumbnails', async () => {
    await openScreen(page, 'review');
    const file = await download(page, 'save-run');
    expect(file.name === 'run.brink.json', `the saved run is named ${file.name}`);
    saved = JSON.parse(file.bytes.toString('utf8'));
    writeFileSync(savedPath, file.bytes);
    expect(saved.format === 'brink-saved-run' && saved.formatVersion === 1 && saved.origin === 'workbench', 'not a workbench brink-saved-run v1 file');
    expect(saved.records.length === Number(curve[0].samples), `${saved.records.length} per-image records for ${curve[0].samples} samples`);
    expect(saved.run.curve.length === curve.length && saved.run.curve.every((p, i) => p.robust === Number(curve[i].robust) && p.attack === curve[i].attack), 'the saved curve differs from curve.csv');
    expect(saved.flips.length >= 1 && saved.flips.every((f) => f.originalPng.startsWith('iVBORw0KGgo') && f.adversarialPng.startsWith('iVBORw0KGgo')), `flip thumbnails missing or not PNG (${saved.flips.length})`);
    await snap(page, artifacts, '8-review');
    return `${(file.bytes.length / 1000).toFixed(0)} kB, ${saved.records.length} records, ${saved.flips.length} thumbnails, health checks ${saved.health ? saved.health.length : 'none'}`;
  });

  const fresh = await launch(serverUrl);
  try {
    const other = fresh.page;
    await other.goto(serverUrl);
    await waitForDemoWorkspace(other);

    await check('in a fresh browser the saved run loads and shows the same curve, table and thumbnails without running anything', async () => {
      expect(saved !== null, 'no saved run to load');
      await openScreen(other, 'review');
      await other.setInputFiles('[data-testid=saved-run-drop-files]', savedPath);
      await other.waitForSelector('main[data-screen=results] [data-testid=saved-run-banner]', { timeout: TIMEOUT.step });
      const banner = await textOf(other, '[data-testid=saved-run-banner]');
      expect(/Loaded from a saved run: run\.brink\.json, saved \d{4}-\d\d-\d\d \d\d:\d\d UTC/.test(banner), `banner: "${banner.slice(0, 120)}"`);
      expect(banner.includes(saved.run.model.sha256) && banner.includes(saved.run.samples.sha256), 'the banner does not show the model and sample hashes');
      expectTableIsCurve(await tableCells(other, '[data-testid=results-table]'), curve);
      await other.waitForFunction(() => document.querySelectorAll('[data-testid=curve-chart] .scatterlayer .trace').length > 0, null, { timeout: TIMEOUT.step });
      const lines = await lineValues(other, 'curve-chart');
      const drawn = lines.flatMap((l) => l.y);
      // The chart draws one line per search in first-seen order, each by ascending ε: curve.csv's own order (search, then budget).
      const expected = curve.map((p) => Number(p.robust_accuracy));
      expect(drawn.length === expected.length && drawn.every((y, i) => Math.abs(y - expected[i]) < 5e-7), `chart values ${drawn.join(',')} vs curve.csv ${expected.join(',')}`);
      const thumbs = await other.$$eval('[data-testid=saved-run-gallery] img', (imgs) => imgs.map((img) => ({ data: img.src.startsWith('data:image/png;base64,'), width: img.naturalWidth })));
      expect(thumbs.length >= 2 && thumbs.every((t) => t.data && t.width > 0), `gallery thumbnails: ${JSON.stringify(thumbs.slice(0, 3))}`);
      const runStatus = await textOf(other, '[data-testid=nav-run] .step-status');
      expect(runStatus === 'not started', `the fresh browser ran something: run step says "${runStatus}"`);
      const reviewStatus = await textOf(other, '[data-testid=nav-review] .step-status');
      expect(reviewStatus === '1 saved run', `with one saved run loaded and none run here, the review step says "${reviewStatus}"`);
      // The per-class table is computed from the saved records: its held counts add up to the curve table's robust count.
      const { held, classes } = await pgdClassRows(other);
      const classHeld = classes.reduce((a, r) => a + Number(r[3]), 0);
      expect(classes.length === 6 && classHeld === held, `the saved run's per-class table holds ${classHeld} over ${classes.length} classes; the curve table says ${held} held`);
      await snap(other, artifacts, '8b-saved-run-results');
      await other.locator('[data-testid=class-breakdown]').scrollIntoViewIfNeeded();
      await snap(other, artifacts, '8b-saved-run-by-class');
      return `${curve.length} rows equal curve.csv; ${thumbs.length} thumbnails; PGD 8/255 held ${held} = sum over 6 classes; run step "${runStatus}"`;
    });

    await check('the HTML report exports in one click, is self-contained and renders with the curve.csv numbers', async () => {
      await openScreen(other, 'review');
      const file = await download(other, 'export-report');
      const html = file.bytes.toString('utf8');
      expect(file.name === 'report.html', `the report is named ${file.name}`);
      const links = linksOf(html);
      const external = links.filter((l) => !l.startsWith('data:'));
      expect(links.length > 0 && external.length === 0, `src/href values that are not data: URLs: ${external.slice(0, 3).join(', ')}`);
      expect(!/https?:\/\//i.test(links.join(' ')) && !/<script/i.test(html), 'the report links to http(s) or carries a script');
      const view = await fresh.context.newPage();
      const requests = [];
      view.on('request', (r) => requests.push(r.url()));
      await view.setContent(html, { waitUntil: 'load' });
      const rows = await tableCells(view, '#curve-table');
      const asCsv = rows.map((r) => r.slice(0, 9).join(','));
      const expected = curveCsv.toString('utf8').trim().split('\n').slice(1);
      expect(JSON.stringify(asCsv) === JSON.stringify(expected), `report table row 1 "${asCsv[0]}" vs curve.csv "${expected[0]}"`);
      await snap(view, artifacts, '8c-report');
      await view.close();
      const fetched = requests.filter((u) => !u.startsWith('data:') && u !== 'about:blank');
      expect(fetched.length === 0, `the report made requests: ${fetched.slice(0, 3).join(', ')}`);
      return `${(html.length / 1000).toFixed(0)} kB, ${links.length} data: links, no requests`;
    });

    let comparisonMs = 0;
    await check('"compare with the other demo model" runs the same plan and overlays both runs with a difference table', async () => {
      await openScreen(other, 'review');
      const started = Date.now();
      await other.click('[data-testid=compare-other-demo]');
      await other.waitForSelector('main[data-screen=review] [data-testid=comparison-table] tbody tr', { timeout: TIMEOUT.demo });
      comparisonMs = Date.now() - started;
      await other.waitForFunction(() => document.querySelectorAll('[data-testid=comparison-chart] .scatterlayer .trace').length > 0, null, { timeout: TIMEOUT.step });
      const warnings = await other.getAttribute('[data-testid=comparison-warnings]', 'data-warnings');
      expect(warnings === '0', `the same plan on the same samples should compare like for like, got ${warnings} warning(s): ${await textOf(other, '[data-testid=comparison-warnings]')}`);
      const lines = await lineValues(other, 'comparison-chart');
      expect(lines.length === 4, `expected 2 runs × 2 searches on the chart, found ${lines.length}: ${lines.map((l) => l.name).join('; ')}`);
      const table = csvRecords((await download(other, 'export-comparison-csv')).bytes.toString('utf8'));
      expect(table.length === curve.length, `${table.length} comparison rows for ${curve.length} curve points`);
      table.forEach((r, i) => {
        expect(r.robust_a === curve[i].robust && r.eps === curve[i].eps, `row ${i + 1}: the baseline is not the saved run (${r.robust_a} vs ${curve[i].robust})`);
        const difference = Number(r.robust_accuracy_b) - Number(r.robust_accuracy_a);
        expect(Math.abs(difference - Number(r.difference)) < 2e-6, `row ${i + 1}: difference ${r.difference} ≠ ${difference.toFixed(6)}`);
        expect(Number(r.difference_ci95_low) <= Number(r.difference) && Number(r.difference) <= Number(r.difference_ci95_high), `row ${i + 1}: the interval misses the difference`);
      });
      // The demo's model cards: PGD at 4/255 holds 142 of 204 for standard training and 185 of 204 adversarially trained.
      const pgd = table.filter((r) => r.attack === 'pgd');
      const largest = pgd[pgd.length - 1];
      expect(Number(largest.difference) > 0, `the adversarially trained model should hold up better at the largest PGD budget; difference ${largest.difference}`);
      await other.locator('[data-testid=comparison-table]').scrollIntoViewIfNeeded();
      await snap(other, artifacts, '8d-comparison');
      measured.comparison = { ms: comparisonMs, pgdLargest: `${largest.difference} [${largest.difference_ci95_low}, ${largest.difference_ci95_high}]` };
      return `after ${(comparisonMs / 1000).toFixed(1)} s; PGD at ε = ${largest.eps}: ${largest.robust_a} → ${largest.robust_b} held, difference ${largest.difference} [${largest.difference_ci95_low}, ${largest.difference_ci95_high}]`;
    });

    await check('a comparison with a mismatched run names the differing samples, preprocessing, threat model and search settings', async () => {
      const copyPath = path.join(artifacts, 'run-mismatched.brink.json');
      writeFileSync(copyPath, `${JSON.stringify(mismatchedCopy(saved))}\n`);
      await openScreen(other, 'review');
      await other.setInputFiles('[data-testid=saved-run-drop-files]', copyPath);
      await other.waitForSelector('main[data-screen=results] [data-testid=saved-run-banner]', { timeout: TIMEOUT.step });
      await openScreen(other, 'review');
      await other.waitForSelector('[data-testid=comparison-warnings] .compare-warn', { timeout: TIMEOUT.step });
      const kinds = await other.$$eval('[data-testid=comparison-warnings] li[data-kind]', (items) => items.map((li) => li.getAttribute('data-kind')));
      for (const kind of ['samples', 'preprocessing', 'threat-model', 'search']) expect(kinds.includes(kind), `no ${kind} warning among ${kinds.join(', ')}`);
      await other.locator('[data-testid=comparison-warnings]').scrollIntoViewIfNeeded();
      await snap(other, artifacts, '8e-comparison-warnings');
      return `${kinds.length} warnings: ${[...new Set(kinds)].join(', ')}`;
    });

    await check('the fresh browser had no console errors and made no request to another origin', async () => {
      expect(fresh.problems.length === 0, `${fresh.problems.length} problem(s):\n    ${fresh.problems.slice(0, 10).join('\n    ')}`);
      expect(fresh.foreign.length === 0, `${fresh.foreign.length} request(s) to other origins: ${fresh.foreign.slice(0, 5).join(', ')}`);
    });
  } finally {
    await fresh.close();
    // The whole block, fresh browser start and demo workspace load included.
    measured.reviewMs = Date.now() - blockStarted;
    console.log(`     (review checks took ${(measured.reviewMs / 1000).toFixed(1)} s in all)`);
  }
}
