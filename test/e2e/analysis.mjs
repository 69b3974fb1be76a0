/**
 * End-to-end steps of the second look at an evaluation (health checks, per-class views, flip
 * budgets) and of ONNX models in the workbench. Each returns a one-line detail for the summary and
 * throws with a message naming what was wrong.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { zipSync } from 'fflate';
import { demoSubsetZip, download, expect, HEALTH_CHECK_IDS, openScreen, parseCsv, parsePercent, plotTrace, snap, tableRows, textOf, TIMEOUT, waitForLabel } from './steps.mjs';

/** Square queries per image for the health checks here: enough to exercise the check, small enough for CI. */
const HEALTH_QUERIES = '200';
/** Images whose flip budgets are measured. */
const FLIP_IMAGES = 12;

/** On the results screen: run the health checks of the demo sweep and read the panel. */
export async function healthAfterDemo(page, artifacts) {
  await openScreen(page, 'results');
  await page.fill('[data-testid=health-queries]', HEALTH_QUERIES);
  await page.click('[data-testid=health-button]');
  await page.waitForSelector('[data-testid=health-panel][data-status=done]', { timeout: TIMEOUT.demo });
  const checks = await page.$$eval('[data-testid=health-checks] > li', (items) =>
    items.map((li) => ({ id: li.dataset.check, status: li.dataset.status, word: li.querySelector('.check-status')?.textContent ?? '', detail: li.querySelector('.check-detail')?.textContent ?? '' })),
  );
  const ids = checks.map((c) => c.id);
  const missing = HEALTH_CHECK_IDS.filter((id) => !ids.includes(id));
  expect(missing.length === 0, `the panel lacks the checks ${missing.join(', ')} (shows ${ids.join(', ')})`);
  const words = { pass: 'pass', warn: 'warning', skip: 'not run' };
  for (const c of checks) {
    expect(c.status in words, `check ${c.id} has status "${c.status}"`);
    // The status must be readable without colour: the word is written next to the mark.
    expect(c.word.includes(words[c.status]), `check ${c.id} (${c.status}) shows "${c.word}" instead of the word "${words[c.status]}"`);
    expect(/\d/.test(c.detail), `check ${c.id} gives no numbers in its explanation: "${c.detail}"`);
  }
  await page.locator('[data-testid=health-panel]').scrollIntoViewIfNeeded();
  await snap(page, artifacts, '6c-results-health');
  const summary = await textOf(page, '[data-testid=health-summary]');
  await healthCsvMatchesPanel(page, checks);
  return `${summary} (${checks.map((c) => `${c.id} ${c.status}`).join(', ')}); health.csv has the same ${checks.length} checks`;
}

/** health.csv from the exports screen: the core writer's header, and one row per check of the panel with its status and finding. */
async function healthCsvMatchesPanel(page, checks) {
  await openScreen(page, 'exports');
  const file = await download(page, 'export-health-csv');
  const [header, ...rows] = parseCsv(file.bytes.toString('utf8'));
  expect(file.name === 'health.csv' && header.join(',') === 'check,status,detail', `health.csv: file ${file.name}, header "${header.join(',')}"`);
  const oneLine = (text) => text.replace(/\s+/g, ' ').trim();
  const fromCsv = rows.map(([id, status, detail]) => `${id} ${status} ${oneLine(detail)}`).sort();
  const fromPanel = checks.map((c) => `${c.id} ${c.status} ${oneLine(c.detail)}`).sort();
  const differ = fromPanel.filter((line, i) => line !== fromCsv[i]);
  expect(fromCsv.length === fromPanel.length && differ.length === 0, `health.csv rows differ from the panel (${fromCsv.length} vs ${fromPanel.length} checks), first: "${differ[0]}"`);
}

/**
 * On a results screen (this session's or a saved run's): choose "PGD at … 8/255" in the by-class
 * menu; returns the curve table's held and total counts at that point and the per-class rows.
 */
export async function pgdClassRows(page) {
  await page.waitForSelector('[data-testid=class-breakdown]', { timeout: TIMEOUT.step });
  const choice = await page.$$eval('[data-testid=class-choice] option', (options) => options.find((o) => /^PGD at .*8\/255/.test(o.textContent ?? ''))?.value ?? null);
  expect(choice !== null, 'the search-and-budget menu offers no "PGD at … 8/255"');
  await page.selectOption('[data-testid=class-choice]', choice);
  const curveRow = (await tableRows(page, '[data-testid=results-table]')).find((r) => r[0] === 'PGD' && r[1].includes('8/255'));
  expect(curveRow !== undefined, 'the curve table has no PGD row at 8/255');
  const [held, , all] = curveRow[2].split('/').map((t) => Number(t.trim()));
  return { held, all, classes: await tableRows(page, '[data-testid=per-class-table]') };
}

/** The per-class table and the flip matrix for PGD at 8/255, against the curve table and the Wilson closed form. */
export async function classViews(page, artifacts) {
  await openScreen(page, 'results');
  const { held, all, classes } = await pgdClassRows(page);
  expect(classes.length === 6, `the per-class table has ${classes.length} rows for the 6 demo classes`);
  const sum = (rows, col) => rows.reduce((a, r) => a + Number(r[col]), 0);
  expect(sum(classes, 1) === all && sum(classes, 3) === held, `per class: ${sum(classes, 3)} held of ${sum(classes, 1)}, the curve table says ${held} of ${all}`);
  for (const [name, images, , kept, , interval] of classes) {
    // Wilson (1927) score interval, recomputed here from the row's own counts.
    const want = wilson95(Number(kept), Number(images));
    const [low, high] = interval.split('–').map(parsePercent);
    expect(Math.abs(low - want.low) < 0.0006 && Math.abs(high - want.high) < 0.0006, `${name}: interval ${interval}, Wilson gives ${(want.low * 100).toFixed(1)}–${(want.high * 100).toFixed(1)} %`);
  }
  const matrix = await tableRows(page, '[data-testid=flip-matrix]');
  expect(matrix.length === 6 && matrix.every((r) => r.length === 8), `the flip matrix is not 6 × 6 (rows of ${matrix.map((r) => r.length).join(', ')} cells)`);
  const cells = matrix.map((r) => r.slice(1, 7).map(Number));
  const total = cells.flat().reduce((a, b) => a + b, 0);
  const diagonal = cells.reduce((a, row, t) => a + row[t], 0);
  // An image that held keeps its true class, and one that flipped (or was read wrongly) leaves it, so the diagonal is the held count.
  expect(total === all && diagonal === held, `the matrix holds ${total} images with ${diagonal} on the diagonal; expected ${all} and ${held}`);
  await page.locator('[data-testid=class-breakdown]').scrollIntoViewIfNeeded();
  await snap(page, artifacts, '6d-results-by-class');
  return `PGD at 8/255: ${held} of ${all} held over 6 classes; ${all - diagonal} off the diagonal`;
}

/** Flip budgets of a few demo images with PGD: the histogram, the median and the implied curve. */
export async function flipBudgets(page, artifacts) {
  await openScreen(page, 'results');
  await page.selectOption('[data-testid=flip-search]', 'pgd');
  await page.selectOption('[data-testid=flip-norm]', 'linf');
  await page.fill('[data-testid=flip-max-eps]', '');
  await page.fill('[data-testid=flip-limit]', String(FLIP_IMAGES));
  await page.click('[data-testid=flips-button]');
  await page.waitForSelector('[data-testid=flip-panel][data-status=done]', { timeout: TIMEOUT.demo });
  await page.waitForFunction(() => document.querySelectorAll('[data-testid=flip-histogram] .barlayer .trace').length > 0, null, { timeout: TIMEOUT.step });
  const bars = await plotTrace(page, 'flip-histogram', 0);
  const curve = await plotTrace(page, 'flip-curve', 'robust accuracy from flip budgets');
  expect(bars !== null && curve !== null, 'the histogram or the curve has no data');
  const counts = (await textOf(page, '[data-testid=flip-counts]')).match(/(\d+) read wrongly .* (\d+) never flipped/);
  expect(counts !== null, 'the counts outside the bars are not shown');
  const inBars = bars.y.reduce((a, b) => a + b, 0);
  expect(inBars + Number(counts[1]) + Number(counts[2]) === FLIP_IMAGES, `bars ${inBars} + ${counts[1]} wrong + ${counts[2]} never flipped ≠ ${FLIP_IMAGES} images`);
  // The share of images whose flip budget exceeds ε cannot rise with ε.
  expect(curve.y.every((v, i) => i === 0 || v <= curve.y[i - 1]), 'the curve from flip budgets rises somewhere');
  expect(Math.abs(curve.y[0] - (FLIP_IMAGES - Number(counts[1])) / FLIP_IMAGES) < 1e-9, `at ε = 0 the curve reads ${curve.y[0]}, not the clean accuracy of the ${FLIP_IMAGES} images`);
  const median = await textOf(page, '[data-testid=flip-median]');
  expect(/\d/.test(median), `no median flip budget shown: "${median}"`);
  await page.locator('[data-testid=flip-panel]').scrollIntoViewIfNeeded();
  await snap(page, artifacts, '6e-results-flip-budgets');
  const measuredText = (await textOf(page, '[data-testid=flip-view] p')).match(/on (\d+) of \d+ images/);
  expect(measuredText !== null, 'the flip view does not say how many images were measured');
  const rows = await flipsCsvRows(page);
  const measured = Number(measuredText[1]);
  expect(rows.length === measured, `flips.csv has ${rows.length} rows for the ${measured} images measured`);
  // flip_eps is exactly 0 for an image read wrongly clean and empty for one never flipped: the same counts the panel shows outside the bars.
  const zero = rows.filter((r) => r[3] === '0').length;
  const never = rows.filter((r) => r[3] === '').length;
  expect(zero === Number(counts[1]) && never === Number(counts[2]), `flips.csv: ${zero} at 0 and ${never} empty; the panel says ${counts[1]} read wrongly and ${counts[2]} never flipped`);
  return `${median.trim()}; ${inBars} images in the bars; flips.csv ${rows.length} rows`;
}

/** flips.csv from the exports screen: checks the core writer's header, returns the data rows. */
async function flipsCsvRows(page) {
  await openScreen(page, 'exports');
  const file = await download(page, 'export-flips-csv');
  const [header, ...rows] = parseCsv(file.bytes.toString('utf8'));
  expect(file.name === 'flips.csv' && header.join(',') === 'file,label,clean_pred,flip_eps,adv_pred', `flips.csv: file ${file.name}, header "${header.join(',')}"`);
  return rows;
}

/** Flip budgets of all images, stopped after the first batch: the images that finished stay. */
export async function flipBudgetsStopped(page) {
  await openScreen(page, 'results');
  await page.fill('[data-testid=flip-limit]', '');
  await page.click('[data-testid=flips-button]');
  await page.waitForFunction(() => /^[1-9]\d* of \d+ images done/.test(document.querySelector('[data-testid=flip-panel] [role=status]')?.textContent ?? ''), null, { timeout: TIMEOUT.demo });
  const clicked = Date.now();
  await page.click('[data-testid=flips-cancel]');
  await page.waitForSelector('[data-testid=flip-panel][data-status=cancelled]', { timeout: TIMEOUT.step });
  const stopMs = Date.now() - clicked;
  const summary = await textOf(page, '[data-testid=flip-view] p');
  const measured = summary.match(/on (\d+) of (\d+) images/);
  expect(measured !== null && Number(measured[1]) > 0 && Number(measured[1]) < Number(measured[2]), `after stopping, the view reads "${summary}"`);
  expect(/Stopped early/.test(summary), 'the view does not say the measurement was stopped early');
  return `stopped ${stopMs} ms after the click with ${measured[1]} of ${measured[2]} images measured`;
}

/**
 * Load the PyTorch-exported residual ONNX fixture through the model file input, compare what the
 * model screen shows with the export script's record (test/fixtures/onnx/index.json), then sweep a
 * few demo images with FGSM.
 */
export async function onnxModel(page, artifacts, root) {
  const fixture = 'residual_bn_opset16.onnx';
  const index = JSON.parse(readFileSync(path.join(root, 'test/fixtures/onnx/index.json'), 'utf8'));
  const record = index.files.find((f) => f.file === fixture);
  const file = path.join(root, 'test/fixtures/onnx', fixture);
  await openScreen(page, 'model');
  // First zipped, in a folder, as a user may hand it over; then the bare file.
  const zipped = Buffer.from(zipSync({ [`exported/${fixture}`]: new Uint8Array(readFileSync(file)) }));
  await page.setInputFiles('[data-testid=model-drop-files]', { name: 'exported.zip', mimeType: 'application/zip', buffer: zipped });
  await waitForLabel(page, 'model-label', 'exported.zip');
  expect((await textOf(page, '[data-testid=onnx-opset]')).trim() === String(record.opset), 'the zipped ONNX model does not show its opset');
  await page.setInputFiles('[data-testid=model-drop-files]', file);
  await waitForLabel(page, 'model-label', fixture);
  const opset = (await textOf(page, '[data-testid=onnx-opset]')).trim();
  expect(opset === String(record.opset), `the opset reads "${opset}"; the export recorded ${record.opset}`);
  const ops = Object.fromEntries((await tableRows(page, '[data-testid=onnx-ops]')).map(([op, n]) => [op, Number(n)]));
  expect(JSON.stringify(Object.entries(ops).sort()) === JSON.stringify(Object.entries(record.ops).sort()), `operators ${JSON.stringify(ops)}; the export recorded ${JSON.stringify(record.ops)}`);
  const input = await textOf(page, '[data-testid=onnx-input]');
  expect(/\[any, 3, 16, 16\]/.test(input) && /channels first/.test(input), `the detected input reads "${input}"; expected shape [any, 3, 16, 16], channels first`);
  await snap(page, artifacts, '1c-model-onnx');
  await openScreen(page, 'samples');
  const subset = demoSubsetZip(root, 2);
  await page.setInputFiles('[data-testid=samples-drop-files]', { name: 'onnx-subset.zip', mimeType: 'application/zip', buffer: subset.buffer });
  await waitForLabel(page, 'samples-label', 'onnx-subset.zip');
  await page.waitForSelector('[data-testid=clean-accuracy]', { timeout: TIMEOUT.step });
  await openScreen(page, 'plan');
  if (!(await page.isChecked('[data-testid=attack-fgsm]'))) await page.check('[data-testid=attack-fgsm]');
  if (await page.isChecked('[data-testid=attack-pgd]')) await page.uncheck('[data-testid=attack-pgd]');
  await page.fill('[data-testid=budgets-input]', '0, 2/255, 8/255');
  await openScreen(page, 'run');
  await page.click('[data-testid=run-button]');
  await page.waitForSelector('[data-testid=progress][data-status=done]', { timeout: TIMEOUT.demo });
  await page.waitForFunction(() => document.querySelectorAll('[data-testid=curve-chart] .scatterlayer .trace').length > 0, null, { timeout: TIMEOUT.step });
  const rows = await tableRows(page, '[data-testid=results-table]');
  expect(rows.length === 3 && rows.every((r) => r[0] === 'FGSM' && r[2].endsWith(`/ ${subset.count}`)), `expected 3 FGSM rows over ${subset.count} images, got ${JSON.stringify(rows.map((r) => r.slice(0, 3)))}`);
  await snap(page, artifacts, '5c-run-onnx');
  return `opset ${opset}, ${Object.keys(ops).length} operator types; FGSM on ${subset.count} images: ${rows.map((r) => r[3]).join(', ')}`;
}

/** Wilson score interval at 95 % (Wilson 1927, closed form), written here independently of the app. */
function wilson95(k, n) {
  const z = 1.959963984540054;
  const p = k / n;
  const denom = 1 + (z * z) / n;
  const centre = (p + (z * z) / (2 * n)) / denom;
  const half = (z * Math.sqrt((p * (1 - p)) / n + (z * z) / (4 * n * n))) / denom;
  return { low: k === 0 ? 0 : centre - half, high: k === n ? 1 : centre + half };
}
