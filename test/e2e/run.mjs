/**
 * Browser end-to-end suite (`npm run test:e2e`, after `vite build`): serves dist/ on 127.0.0.1 with
 * the cross-origin isolation headers, drives Debian's chromium through playwright-core and checks
 * the workbench as a user meets it. Screenshots of every screen go to test-artifacts/ (not committed).
 * Exits non-zero, naming each failed check, when anything is wrong.
 */
import { existsSync, mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { unzipSync, zipSync } from 'fflate';
import { serveStatic } from './server.mjs';
import { CHROMIUM, launch } from './browser.mjs';
import { cliFilesFor } from './cli.mjs';
import { reviewChecks } from './review.mjs';
import { classViews, flipBudgets, flipBudgetsStopped, healthAfterDemo, onnxModel } from './analysis.mjs';
import { demoSubsetZip, download, expect, openFlipDetail, openScreen, runDemo, snap, textOf, TIMEOUT, waitForDemoWorkspace, waitForLabel } from './steps.mjs';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const DIST = path.join(ROOT, 'dist');
const ARTIFACTS = path.join(ROOT, 'test-artifacts');
const PNG_SIGNATURE = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);

const results = [];
const measured = {};

async function check(name, body) {
  const started = Date.now();
  try {
    const detail = await body();
    results.push({ name, ok: true, ms: Date.now() - started, detail: detail ?? '' });
    console.log(`ok   ${name} (${((Date.now() - started) / 1000).toFixed(1)} s)${detail ? ` — ${detail}` : ''}`);
    return true;
  } catch (err) {
    results.push({ name, ok: false, ms: Date.now() - started, detail: err instanceof Error ? err.message : String(err) });
    console.log(`FAIL ${name}: ${err instanceof Error ? err.message : String(err)}`);
    return false;
  }
}

function firstDifference(a, b) {
  const lines = [a.toString('utf8').split('\n'), b.toString('utf8').split('\n')];
  const i = lines[0].findIndex((line, k) => line !== lines[1][k]);
  return i < 0 ? `lengths ${a.length} vs ${b.length}` : `line ${i + 1}: browser "${lines[0][i]}" vs CLI "${lines[1][i]}"`;
}

async function main() {
  expect(existsSync(path.join(DIST, 'index.html')), 'dist/index.html is missing: run `vite build` first (npm run test:e2e does).');
  expect(existsSync(CHROMIUM), `${CHROMIUM} is missing: install Debian's chromium (apt-get install -y chromium).`);
  mkdirSync(ARTIFACTS, { recursive: true });
  const server = await serveStatic(DIST);
  const browser = await launch(server.url);
  const { page } = browser;
  let record = null;
  let browserCurve = null;
  let browserSamples = null;
  try {
    await page.goto(server.url);

    await check('opens with the demo workspace loaded', async () => {
      const { badge, clean } = await waitForDemoWorkspace(page);
      const isolated = await page.evaluate(() => window.crossOriginIsolated);
      expect(isolated, 'the page is not cross-origin isolated although the server sends COOP/COEP');
      expect(!/single-threaded/.test(badge ?? ''), `the engine badge says it runs single-threaded: "${badge}"`);
      measured.engine = badge;
      await snap(page, ARTIFACTS, '2-samples');
      await openScreen(page, 'model');
      await snap(page, ARTIFACTS, '1-model');
      await openScreen(page, 'preprocessing');
      await page.waitForSelector('[data-testid=model-input-preview] canvas', { timeout: TIMEOUT.step });
      await snap(page, ARTIFACTS, '3-preprocessing');
      await openScreen(page, 'plan');
      await page.waitForSelector('[data-testid=plan-estimate]', { timeout: TIMEOUT.step });
      await snap(page, ARTIFACTS, '4-plan');
      return `${badge}; ${clean}`;
    });

    await check('the demo button runs a sweep and draws a curve and flipped images', async () => {
      const demo = await runDemo(page, ARTIFACTS);
      demo.runStatus = await textOf(page, '[data-testid=nav-run] .step-status');
      measured.demoSweep = demo;
      expect(demo.flips >= 1, 'no flipped image in the gallery');
      return `curve after ${(demo.untilChart / 1000).toFixed(1)} s (sweep ${demo.runStatus}), ${demo.flips} flipped images`;
    });

    await check('clicking a flipped image shows its confidence against ε', () => openFlipDetail(page, ARTIFACTS));

    await check('the health checks of the demo sweep show each check with its status in words and its numbers', () => healthAfterDemo(page, ARTIFACTS));

    await check('the per-class table and the flip matrix agree with the curve and with Wilson intervals', () => classViews(page, ARTIFACTS));

    await check('flip budgets of a few images give a histogram, a median and the curve they imply', () => flipBudgets(page, ARTIFACTS));

    await check('a flip-budget measurement can be stopped midway and keeps the images that finished', () => flipBudgetsStopped(page));

    await check('exports: curve PNG, curve CSV, samples CSV, run JSON, adversarial .zip', async () => {
      await openScreen(page, 'exports');
      await snap(page, ARTIFACTS, '7-exports');
      const png = await download(page, 'export-png');
      expect(png.bytes.subarray(0, 8).equals(PNG_SIGNATURE) && png.bytes.length > 10_000, `curve PNG is not a PNG image (${png.bytes.length} bytes)`);
      browserCurve = (await download(page, 'export-csv')).bytes;
      expect(browserCurve.toString('utf8').startsWith('attack,norm,eps,samples,clean_correct,robust,robust_accuracy,ci95_low,ci95_high\n'), 'curve.csv header is wrong');
      browserSamples = (await download(page, 'export-samples-csv')).bytes;
      record = JSON.parse((await download(page, 'export-json')).bytes.toString('utf8'));
      expect(record.format === 'brink-run' && record.complete === true, 'run.json is not a complete brink-run record');
      const zip = unzipSync(new Uint8Array((await download(page, 'export-zip')).bytes));
      const pngs = Object.keys(zip).filter((n) => n.endsWith('.png'));
      expect('index.csv' in zip && pngs.length >= measured.demoSweep.flips, `the image .zip holds ${pngs.length} PNGs for ${measured.demoSweep.flips} flips`);
      expect(pngs.every((n) => Buffer.from(zip[n].subarray(0, 8)).equals(PNG_SIGNATURE)), 'an entry of the image .zip is not a PNG');
      return `${pngs.length} adversarial PNGs`;
    });

    await check("the browser's curve.csv and samples.csv equal the CLI's, byte for byte", async () => {
      expect(record !== null && browserCurve !== null, 'no browser export to compare');
      const cli = await cliFilesFor(record, ROOT);
      measured.cli = { ms: cli.ms, command: `npm run -s cli -- ${cli.args.join(' ')}` };
      expect(cli.runJson.model.sha256 === record.model.sha256, `the CLI read other model files (SHA-256 ${cli.runJson.model.sha256} vs the browser's ${record.model.sha256})`);
      expect(cli.runJson.samples.sha256 === record.samples.sha256, `the CLI read other sample files (SHA-256 ${cli.runJson.samples.sha256} vs the browser's ${record.samples.sha256})`);
      expect(cli.curveCsv.equals(browserCurve), `curve.csv differs: ${firstDifference(browserCurve, cli.curveCsv)}`);
      expect(cli.samplesCsv.equals(browserSamples), `samples.csv differs: ${firstDifference(browserSamples, cli.samplesCsv)}`);
      return `${cli.curveCsv.toString('utf8').trim().split('\n').length - 1} curve rows; CLI took ${(cli.ms / 1000).toFixed(1)} s`;
    });

    await reviewChecks({ check, page, serverUrl: server.url, artifacts: ARTIFACTS, curveCsv: browserCurve, measured });

    await check('a model loads through the file input, and a wrong file is refused beside the drop zone', async () => {
      await openScreen(page, 'model');
      await page.setInputFiles('[data-testid=model-drop-files]', { name: 'notes.txt', mimeType: 'text/plain', buffer: Buffer.from('not a model') });
      await page.waitForSelector('[data-testid=model-drop-error]', { timeout: TIMEOUT.step });
      const refusal = await textOf(page, '[data-testid=model-drop-error]');
      expect(/model\.json|\.onnx/.test(refusal), `the refusal does not say what is missing: "${refusal}"`);
      expect(/standard/.test(await textOf(page, '[data-testid=model-label]')), 'a refused file replaced the loaded model');
      const folder = path.join(ROOT, 'public/demo/models/hardened');
      await page.setInputFiles('[data-testid=model-drop-files]', [path.join(folder, 'model.json'), path.join(folder, 'weights.bin')]);
      await waitForLabel(page, 'model-label', '2 files');
      expect((await textOf(page, '[data-testid=model-drop-error]')) === '', 'an error is still shown after a good model loaded');
      await snap(page, ARTIFACTS, '1b-model-from-files');
      return refusal;
    });

    await check('samples load through the file inputs (.zip and folder), and an unreadable image is refused', async () => {
      await openScreen(page, 'samples');
      const before = await textOf(page, '[data-testid=samples-label]');
      const broken = Buffer.from(zipSync({ 'stop-bar/a.png': new Uint8Array([1, 2, 3, 4]), 'turn-left/b.png': new Uint8Array([5, 6]) }));
      await page.setInputFiles('[data-testid=samples-drop-files]', { name: 'broken.zip', mimeType: 'application/zip', buffer: broken });
      await page.waitForSelector('[data-testid=samples-drop-error]', { timeout: TIMEOUT.step });
      const refusal = await textOf(page, '[data-testid=samples-drop-error]');
      expect(/unreadable image/.test(refusal), `the refusal does not name the unreadable image: "${refusal}"`);
      expect((await textOf(page, '[data-testid=samples-label]')) === before, 'refused samples replaced the loaded ones');
      const subset = demoSubsetZip(ROOT, 5);
      await page.setInputFiles('[data-testid=samples-drop-files]', { name: 'subset.zip', mimeType: 'application/zip', buffer: subset.buffer });
      await waitForLabel(page, 'samples-label', 'subset.zip');
      const summary = await textOf(page, 'main[data-screen=samples] .panel p');
      expect(summary.includes(`${subset.count} images`), `expected ${subset.count} images from the .zip, read "${summary}"`);
      await page.waitForSelector('[data-testid=clean-accuracy]', { timeout: TIMEOUT.step });
      await page.setInputFiles('[data-testid=samples-drop-folder]', path.join(ROOT, 'public/demo/samples'));
      await waitForLabel(page, 'samples-label', 'files');
      const folderSummary = await textOf(page, 'main[data-screen=samples] .panel p');
      expect(/204 images read from a manifest/.test(folderSummary), `the demo folder should give 204 images from its manifest, read "${folderSummary}"`);
      await page.waitForSelector('[data-testid=clean-accuracy]', { timeout: TIMEOUT.step });
      await snap(page, ARTIFACTS, '2b-samples-from-folder');
      return `${subset.count} from a .zip, 204 from a folder`;
    });

    await check('a running sweep can be cancelled midway and keeps its finished points', async () => {
      await openScreen(page, 'plan');
      await page.fill('[data-option=steps] input[type=number]', '60');
      await openScreen(page, 'run');
      await page.click('[data-testid=run-button]');
      await page.waitForFunction(() => Number(document.querySelector('[data-testid=progress]')?.getAttribute('aria-valuenow') ?? 0) >= 3, null, { timeout: TIMEOUT.demo });
      const clicked = Date.now();
      await page.click('[data-testid=cancel-button]');
      await page.waitForSelector('[data-testid=progress][data-status=cancelled]', { timeout: TIMEOUT.step });
      const stopMs = Date.now() - clicked;
      const status = await textOf(page, '[data-testid=run-status]');
      expect(/Cancelled/.test(status), `run status after cancel: "${status}"`);
      expect(await page.isEnabled('[data-testid=run-button]'), 'the run button stays disabled after cancelling');
      measured.cancelStopMs = stopMs;
      await snap(page, ARTIFACTS, '5b-run-cancelled');
      return `stopped ${stopMs} ms after the click`;
    });

    await check('the header switches to the adversarially trained demo model', async () => {
      await openScreen(page, 'model');
      await page.selectOption('[data-testid=demo-model-select]', 'hardened');
      await waitForLabel(page, 'model-label', 'adversarially trained');
      return await textOf(page, '[data-testid=model-label]');
    });

    await check('an ONNX model loads through the file input, shows its opset, operators and input, and sweeps a few images', () => onnxModel(page, ARTIFACTS, ROOT));

    await check('without cross-origin isolation the app runs single-threaded and says so', async () => {
      const plain = await serveStatic(DIST, { isolated: false });
      browser.allow(plain.url);
      const other = await browser.context.newPage();
      try {
        await other.goto(plain.url);
        const { badge } = await waitForDemoWorkspace(other);
        expect(!(await other.evaluate(() => window.crossOriginIsolated)), 'the page is isolated although no COOP/COEP headers were sent');
        expect(/single-threaded/.test(badge ?? '') && /1 thread\b/.test(badge ?? ''), `the badge should say single-threaded with 1 thread: "${badge}"`);
        return badge;
      } finally {
        await other.close();
        await plain.close();
      }
    });

    await check('no console errors, no uncaught errors, no request to another origin', async () => {
      expect(browser.problems.length === 0, `${browser.problems.length} problem(s):\n    ${browser.problems.slice(0, 10).join('\n    ')}`);
      expect(browser.foreign.length === 0, `${browser.foreign.length} request(s) to other origins: ${browser.foreign.slice(0, 5).join(', ')}`);
      return `${server.requests.length} requests to ${server.url} and none elsewhere`;
    });
  } finally {
    await browser.close();
    await server.close();
  }
  writeFileSync(path.join(ARTIFACTS, 'e2e-summary.json'), `${JSON.stringify({ results, measured }, null, 2)}\n`);
  const failed = results.filter((r) => !r.ok);
  console.log(`\n${results.length - failed.length} of ${results.length} checks passed; screenshots in ${path.relative(ROOT, ARTIFACTS)}/`);
  if (measured.demoSweep) console.log(`demo sweep: curve drawn ${(measured.demoSweep.untilChart / 1000).toFixed(1)} s after the click (${measured.engine})`);
  if (failed.length > 0) {
    console.error(`e2e FAILED: ${failed.map((f) => f.name).join('; ')}`);
    process.exit(1);
  }
}

main().catch((err) => {
  console.error(`e2e FAILED before the checks could finish: ${err instanceof Error ? err.stack : String(err)}`);
  process.exit(1);
});
