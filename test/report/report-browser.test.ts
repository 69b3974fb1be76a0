/**
 * The report in headless Chromium (Debian's /usr/bin/chromium through playwright-core): it loads
 * with no request other than the file itself and no console errors, its curve table shows exactly
 * the rows of the run's curve.csv, its health table the rows of health.csv, every thumbnail decodes,
 * and hostile names stay text. A screenshot and a PDF print go to test-artifacts/ (not committed).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { loadRun } from '../../src/core/savedRun/loadRun.ts';
import { SAVED_RUN_FILE } from '../../src/core/savedRun/types.ts';
import { renderReport } from '../../src/core/report/renderReport.ts';
import { cli, csvRows, sweepFixture, tmp } from './cliRun.ts';

const CHROMIUM = process.env['BRINK_CHROMIUM'] ?? '/usr/bin/chromium';
const ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'];
const ARTIFACTS = path.resolve('test-artifacts');

let dir = '';
let reportFile = '';
let context: BrowserContext;
const requests: string[] = [];
const problems: string[] = [];

beforeAll(async () => {
  // CI installs Debian's chromium; without it this suite must fail, not skip.
  if (!existsSync(CHROMIUM)) throw new Error(`Chromium not found at ${CHROMIUM}: install it (apt-get install -y chromium) or set BRINK_CHROMIUM.`);
  dir = await sweepFixture(['--steps', '5', '--health']);
  reportFile = path.join(dir, 'report.html');
  const r = await cli(['report', dir, '--out', reportFile]);
  if (r.code !== 0) throw new Error(`report failed (${r.code}): ${r.stderr}`);
  context = await chromium.launchPersistentContext(tmp('brink-report-profile-'), { executablePath: CHROMIUM, args: ARGS, headless: true, viewport: { width: 1100, height: 900 } });
  context.on('request', (request) => void requests.push(request.url()));
  // Anything other than the report file itself is refused (and recorded above).
  await context.route('**/*', (route) => (allowed(route.request().url()) ? route.continue() : route.abort()));
});

afterAll(async () => {
  await context?.close();
});

function allowed(url: string): boolean {
  return url.startsWith('data:') || url.startsWith('about:') || (url.startsWith('file:') && url.endsWith('.html'));
}

async function open(file: string): Promise<Page> {
  const page = await context.newPage();
  page.on('console', (m) => void (m.type() === 'error' && problems.push(`console error: ${m.text()}`)));
  page.on('pageerror', (e) => void problems.push(`page error: ${e.message}`));
  page.on('dialog', (d) => void problems.push(`dialog: ${d.message()}`));
  await page.goto(pathToFileURL(file).href, { waitUntil: 'load' });
  return page;
}

describe('the report in headless Chromium', () => {
  it('loads with no requests but the file itself and no console errors', async () => {
    const page = await open(reportFile);
    await page.waitForTimeout(300); // let late fetches (fonts, favicon) show up if there were any
    expect(problems).toEqual([]);
    expect(requests).toEqual([pathToFileURL(reportFile).href]);
    mkdirSync(ARTIFACTS, { recursive: true });
    await page.screenshot({ path: path.join(ARTIFACTS, 'report.png'), fullPage: true });
    await page.close();
  });

  it('shows exactly the rows of curve.csv in its curve table', async () => {
    const page = await open(reportFile);
    const table = await page.evaluate(() => {
      const heads = [...document.querySelectorAll('#curve-table thead th')].map((th) => th.getAttribute('data-csv'));
      const rows = [...document.querySelectorAll('#curve-table tbody tr')].map((tr) => [...tr.querySelectorAll('td')].map((td) => td.textContent?.trim() ?? ''));
      return { heads, rows };
    });
    const header = readFileSync(path.join(dir, 'curve.csv'), 'utf8').split('\n')[0]!.split(',');
    const columns = header.map((name) => table.heads.indexOf(name));
    expect(columns.every((i) => i >= 0)).toBe(true);
    // Reference: the curve.csv the sweep wrote, cell for cell.
    expect(table.rows.map((cells) => columns.map((i) => cells[i]))).toEqual(csvRows(path.join(dir, 'curve.csv')));
    await page.close();
  });

  it('shows the health checks of health.csv, a chart per search and decodable thumbnails', async () => {
    const page = await open(reportFile);
    const seen = await page.evaluate(() => ({
      health: [...document.querySelectorAll('#health-table tbody tr')].map((tr) => [tr.querySelector('.mono')?.textContent ?? '', tr.querySelectorAll('td')[1]?.textContent ?? '']),
      lines: document.querySelectorAll('#curves svg polyline').length,
      images: [...document.querySelectorAll('#gallery img')].map((img) => ({ ok: (img as HTMLImageElement).complete, width: (img as HTMLImageElement).naturalWidth, height: (img as HTMLImageElement).naturalHeight })),
    }));
    expect(seen.health).toEqual(csvRows(path.join(dir, 'health.csv')).map((r) => [`(${r[0]})`, r[1]]));
    expect(seen.lines).toBe(2); // FGSM and PGD
    expect(seen.images.length).toBeGreaterThan(0);
    // Chromium's own PNG decoder reads every thumbnail at the fixture's 28×28.
    for (const img of seen.images) expect(img).toEqual({ ok: true, width: 28, height: 28 });
    await page.close();
  });

  it('prints on white and to PDF', async () => {
    const page = await open(reportFile);
    await page.emulateMedia({ media: 'print' });
    const background = await page.evaluate(() => [getComputedStyle(document.body).backgroundColor, getComputedStyle(document.querySelector('main')!).backgroundColor]);
    expect(background).toEqual(['rgb(255, 255, 255)', 'rgb(255, 255, 255)']);
    const pdf = await page.pdf({ path: path.join(ARTIFACTS, 'report.pdf'), format: 'A4' });
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    await page.close();
  });

  it('keeps hostile class and file names as text', async () => {
    const saved = loadRun(readFileSync(path.join(dir, SAVED_RUN_FILE), 'utf8'));
    const hostile = '<img src=x onerror="alert(1)"><script>alert(2)</script>';
    const names = (saved.run.samples.classNames ?? []).map((n, i) => (i === 0 ? hostile : n));
    const file = path.join(dir, 'hostile.html');
    writeFileSync(file, renderReport({ ...saved, run: { ...saved.run, samples: { ...saved.run.samples, classNames: names } }, flips: saved.flips.map((f) => ({ ...f, file: hostile })) }));
    const page = await open(file);
    const found = await page.evaluate(() => ({ injected: document.querySelectorAll('img[src="x"], script').length, text: document.body.textContent ?? '' }));
    expect(found.injected).toBe(0);
    expect(found.text).toContain(hostile);
    expect(problems).toEqual([]);
    await page.close();
  });
});
