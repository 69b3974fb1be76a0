/**
 * The browser steps of the end-to-end suite: each drives the app like a user (clicks, file
 * inputs) and returns what it measured. Assertions throw with a message naming what was wrong.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { zipSync } from 'fflate';

export const TIMEOUT = { load: 90_000, demo: 120_000, step: 30_000 };

/** Throws `message` unless `condition` holds. */
export function expect(condition, message) {
  if (!condition) throw new Error(message);
}

/** Go to one of the seven screens through the step list. */
export async function openScreen(page, screen) {
  await page.click(`[data-testid=nav-${screen}]`);
  await page.waitForSelector(`main[data-screen=${screen}]`, { timeout: TIMEOUT.step });
}

/** Screenshot of the visible window, saved as test-artifacts/<name>.png. */
export async function snap(page, artifacts, name) {
  await page.screenshot({ path: path.join(artifacts, `${name}.png`) });
}

/** Wait until the demo workspace is loaded: model described, samples read, clean accuracy known. */
export async function waitForDemoWorkspace(page) {
  await page.waitForSelector('[data-testid=engine-badge]', { timeout: TIMEOUT.load });
  await page.waitForSelector('[data-testid=model-label]', { timeout: TIMEOUT.load });
  const label = await page.textContent('[data-testid=model-label]');
  expect(/standard/.test(label ?? ''), `the first model should be the standard demo model, got "${label}"`);
  await openScreen(page, 'samples');
  await page.waitForSelector('[data-testid=clean-accuracy]', { timeout: TIMEOUT.load });
  return { badge: await page.textContent('[data-testid=engine-badge]'), clean: await page.textContent('[data-testid=clean-accuracy]') };
}

/** Number of drawn data traces in the curve chart (Plotly's SVG). */
export async function chartTraceCount(page) {
  return page.locator('[data-testid=curve-chart] .scatterlayer .trace').count();
}

/**
 * Click the demo button and wait for the finished run: a drawn curve and at least one flipped image.
 * Returns the wall time from the click to that moment and the run's own reported time.
 */
export async function runDemo(page, artifacts) {
  const started = Date.now();
  await page.click('[data-testid=demo-button]');
  await page.waitForSelector('[data-testid=progress][data-status=running]', { timeout: TIMEOUT.step });
  await page.waitForFunction(
    () => Number(document.querySelector('[data-testid=progress]')?.getAttribute('aria-valuenow') ?? 0) > 10 || document.querySelector('main[data-screen=results]') !== null,
    null,
    { timeout: TIMEOUT.demo },
  );
  if ((await page.locator('[data-testid=progress][data-status=running]').count()) > 0) await snap(page, artifacts, '5-run-in-progress');
  await page.waitForSelector('main[data-screen=results] [data-testid=flip-gallery] > li', { timeout: TIMEOUT.demo });
  const untilGallery = Date.now() - started;
  await page.waitForFunction(() => document.querySelectorAll('[data-testid=curve-chart] .scatterlayer .trace').length > 0, null, { timeout: TIMEOUT.step });
  const untilChart = Date.now() - started;
  const flips = await page.locator('[data-testid=flip-gallery] > li').count();
  const traces = await chartTraceCount(page);
  expect(traces >= 3, `the chart should draw bands, lines and the clean line; found ${traces} traces`);
  await page.waitForSelector('[data-testid=flip-gallery] > li canvas', { timeout: TIMEOUT.step });
  await snap(page, artifacts, '6-results');
  return { untilChart, untilGallery, flips, traces };
}

/** Click the first flipped image and wait for its confidence-against-ε chart. */
export async function openFlipDetail(page, artifacts) {
  await page.click('[data-testid=flip-gallery] > li:first-child button');
  await page.waitForSelector('[data-testid=confidence-chart] .scatterlayer .trace', { timeout: TIMEOUT.step });
  await page.locator('[data-testid=confidence-chart]').scrollIntoViewIfNeeded();
  await snap(page, artifacts, '6b-results-flip-detail');
}

/** Click an export button and return the downloaded file's name and bytes. */
export async function download(page, testId) {
  const [file] = await Promise.all([page.waitForEvent('download', { timeout: TIMEOUT.step }), page.click(`[data-testid=${testId}]`)]);
  const where = await file.path();
  return { name: file.suggestedFilename(), bytes: readFileSync(where) };
}

/** A .zip (built here) of a few demo images per class plus the class names, as a user might zip a folder. */
export function demoSubsetZip(repoRoot, perClass) {
  const root = path.join(repoRoot, 'public/demo/samples');
  const classes = readFileSync(path.join(root, 'classes.txt'), 'utf8').split('\n').filter(Boolean);
  const tree = { 'subset/classes.txt': readFileSync(path.join(root, 'classes.txt')) };
  for (const name of classes) {
    for (let i = 0; i < perClass; i++) {
      const file = `${name}/${String(i).padStart(3, '0')}.png`;
      tree[`subset/${file}`] = readFileSync(path.join(root, file));
    }
  }
  return { buffer: Buffer.from(zipSync(tree)), count: classes.length * perClass };
}

/** Wait until a screen's label element reads `text` (a load finished). */
export async function waitForLabel(page, testId, text) {
  await page.waitForFunction(
    ([id, want]) => (document.querySelector(`[data-testid=${id}]`)?.textContent ?? '').includes(want),
    [testId, text],
    { timeout: TIMEOUT.load },
  );
}

/** The text of an element, or '' when it is not there. */
export async function textOf(page, selector) {
  return (await page.locator(selector).count()) > 0 ? ((await page.textContent(selector)) ?? '') : '';
}

/** The eight health checks issue 5 lists, by the ids the panel marks them with. */
export const HEALTH_CHECK_IDS = ['monotone', 'large-budget', 'iterative-vs-single-step', 'gradient-free-vs-gradient', 'convergence', 'gradients', 'noise', 'saturation'];

/** The rows of a table as arrays of cell texts. */
export async function tableRows(page, selector) {
  return page.$$eval(`${selector} tbody tr`, (rows) => rows.map((row) => [...row.children].map((cell) => (cell.textContent ?? '').trim())));
}

/** Plotly keeps a drawn figure's data on its div; read the x and y of the trace at `which` (an index or a trace name). */
export async function plotTrace(page, testId, which) {
  return page.$eval(`[data-testid=${testId}]`, (div, w) => {
    const trace = typeof w === 'number' ? div.data?.[w] : div.data?.find((t) => t.name === w);
    return trace ? { x: Array.from(trace.x ?? []), y: Array.from(trace.y ?? []) } : null;
  }, which);
}

/** "93.1 %" → 0.931. */
export function parsePercent(text) {
  return Number(text.replace('%', '').trim()) / 100;
}

/** Rows of a CSV text (quoted fields allowed), header first. */
export function parseCsv(text) {
  const rows = [];
  for (const line of text.trim().split('\n')) {
    const cells = [];
    let cell = '';
    let quoted = false;
    for (let i = 0; i < line.length; i++) {
      const ch = line[i];
      if (quoted && ch === '"' && line[i + 1] === '"') {
        cell += '"';
        i++;
      } else if (ch === '"') {
        quoted = !quoted;
      } else if (ch === ',' && !quoted) {
        cells.push(cell);
        cell = '';
      } else {
        cell += ch;
      }
    }
    cells.push(cell);
    rows.push(cells);
  }
  return rows;
}
