/**
 * Starts Debian's chromium through playwright-core with a fresh profile and watches everything the
 * page does that the suite must refuse: console errors, uncaught errors (page and workers), and
 * any request to an origin other than the app's own.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium } from 'playwright-core';

export const CHROMIUM = process.env.BRINK_CHROMIUM ?? '/usr/bin/chromium';
export const CHROMIUM_ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

/** True when a URL belongs to the app: one of its own origins, or a blob:/data: URL the page made itself. */
export function isOwnUrl(url, appOrigins) {
  if (url.startsWith('data:')) return true;
  const plain = url.startsWith('blob:') ? url.slice(5) : url;
  try {
    return appOrigins.has(new URL(plain).origin);
  } catch {
    return false;
  }
}

/**
 * Launch the browser on a fresh profile; returns { context, page, problems, foreign, allow, close }.
 * `problems` collects console errors and uncaught errors, `foreign` requests to other origins;
 * `allow(url)` adds another origin of the app (a second server).
 */
export async function launch(appUrl) {
  const appOrigins = new Set([new URL(appUrl).origin]);
  const profile = mkdtempSync(path.join(os.tmpdir(), 'brink-e2e-profile-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    args: CHROMIUM_ARGS,
    headless: true,
    viewport: { width: 1400, height: 1000 },
    acceptDownloads: true,
  });
  const problems = [];
  const foreign = [];
  const watchConsole = (where) => (message) => {
    if (message.type() === 'error') problems.push(`console error (${where}): ${message.text()}`);
  };
  context.on('request', (request) => {
    if (!isOwnUrl(request.url(), appOrigins)) foreign.push(request.url());
  });
  const watchPage = (page) => {
    page.on('console', watchConsole('page'));
    page.on('pageerror', (error) => problems.push(`uncaught error in the page: ${error.message}`));
    page.on('worker', (worker) => worker.on('console', watchConsole(`worker ${worker.url()}`)));
  };
  context.on('page', watchPage);
  const page = context.pages()[0] ?? (await context.newPage());
  watchPage(page);
  return {
    context,
    page,
    problems,
    foreign,
    allow: (url) => appOrigins.add(new URL(url).origin),
    close: async () => {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
    },
  };
}
