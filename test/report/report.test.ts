/**
 * The HTML report in Node: self-contained (nothing to fetch), every required section present,
 * user-provided names escaped, and the command line it prints recreates the run. For a run made in
 * the workbench the command is rebuilt from the configuration; running it must give the same
 * curve.csv and samples.csv bytes as the original run.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { loadRun } from '../../src/core/savedRun/loadRun.ts';
import { SAVED_RUN_FILE, type SavedRun } from '../../src/core/savedRun/types.ts';
import { renderReport } from '../../src/core/report/renderReport.ts';
import { reproduceCommand, shellQuote } from '../../src/core/report/commandLine.ts';
import { CLASSES, MODEL, SAMPLES, cli, sweepFixture, tmp } from './cliRun.ts';

// Settings away from the defaults, so the rebuilt command has to carry them.
const SETTINGS = ['--steps', '4', '--restarts', '2', '--loss', 'margin', '--seed', '5', '--batch', '7'];
let dir = '';
let saved: SavedRun;

beforeAll(async () => {
  dir = await sweepFixture(SETTINGS);
  saved = loadRun(readFileSync(path.join(dir, SAVED_RUN_FILE), 'utf8'));
});

/** The run as if made in the workbench: no recorded command line. */
function asWorkbenchRun(run: SavedRun): SavedRun {
  const { commandLine: _commandLine, ...record } = run.run;
  return { ...run, origin: 'workbench', run: record };
}

describe('renderReport', () => {
  it('is self-contained: no scripts, no external URLs, no stylesheet or font fetches', () => {
    const page = renderReport(saved);
    expect(page).not.toMatch(/<script/i);
    expect(page).not.toMatch(/@import|url\(/i);
    // The only URLs allowed in src/href are data: URLs (xmlns names a namespace; it is never fetched).
    const links = [...page.matchAll(/\b(?:src|href)="([^"]*)"/g)].map((m) => m[1]!);
    expect(links.length).toBeGreaterThan(0);
    for (const link of links) expect(link.startsWith('data:')).toBe(true);
    expect(page).toMatch(/Content-Security-Policy" content="default-src 'none'/);
  });

  it('has every section the review needs, in order', () => {
    const page = renderReport(saved);
    const ids = ['purpose', 'identification', 'threat-model', 'searches', 'curves', 'per-class', 'flip-matrix', 'health', 'gallery', 'limitations', 'reproduce', 'environment'];
    const positions = ids.map((id) => page.indexOf(`id="${id}"`));
    for (const p of positions) expect(p).toBeGreaterThan(0);
    expect([...positions].sort((a, b) => a - b)).toEqual(positions);
    expect(page).toContain(saved.run.model.sha256);
    expect(page).toContain(saved.run.samples.sha256);
    expect(page).toMatch(/upper bound/);
    expect(page).toMatch(/not a certificate/);
    expect(page).toMatch(/safety standards/);
    // ε = 0.05 is 12.75 grey levels (0.05 · 255), ε = 0.1 is 25.5.
    expect(page).toContain('12.75/255');
    expect(page).toContain('25.5/255');
  });

  it('prints the recorded command line of a CLI run', () => {
    // Reference: run.json, written by the sweep itself.
    const recorded = (JSON.parse(readFileSync(path.join(dir, 'run.json'), 'utf8')) as { commandLine: string[] }).commandLine;
    const command = reproduceCommand(saved);
    expect(command.command).toBe(recorded.map(shellQuote).join(' '));
    expect(recorded.slice(0, 6)).toEqual(['npm', 'run', '-s', 'cli', '--', 'sweep']);
    expect(renderReport(saved)).toContain(command.command);
  });

  it('escapes file names, class names, title and purpose', () => {
    const hostile = '<img src=x onerror="alert(1)">&\'';
    const names = [...(saved.run.samples.classNames ?? [])];
    names[0] = hostile;
    const run: SavedRun = {
      ...saved,
      run: { ...saved.run, samples: { ...saved.run.samples, classNames: names } },
      flips: saved.flips.map((f) => ({ ...f, file: `${hostile}.png` })),
    };
    const page = renderReport(run, { title: `<b>${hostile}</b>`, purpose: hostile });
    expect(page).not.toContain('<img src=x');
    expect(page).not.toContain('<b>');
    expect(page).toContain('&lt;img src=x onerror=&quot;alert(1)&quot;&gt;&amp;&#39;');
  });

  it('gives the same bytes for the same run and options', () => {
    expect(renderReport(saved, { generatedAt: '2020-01-01T00:00:00Z' })).toBe(renderReport(saved, { generatedAt: '2020-01-01T00:00:00Z' }));
  });
});

describe('the command rebuilt for a workbench run', () => {
  it('recreates the same curve.csv and samples.csv bytes when run', async () => {
    const command = reproduceCommand(asWorkbenchRun(saved));
    expect(command.exact).toBe(true);
    const args = command.command.split(' ');
    expect(args.slice(0, 6)).toEqual(['npm', 'run', '-s', 'cli', '--', 'sweep']);
    // Put the files where the command expects them (as its notes say): model/, samples/, classes.txt and --out.
    const out = tmp();
    const classes = path.join(out, 'classes.txt');
    writeFileSync(classes, `${(saved.run.samples.classNames ?? []).join('\n')}\n`);
    const swap: Record<string, string> = { 'model/model.json': MODEL, 'samples/': SAMPLES, 'classes.txt': classes, 'brink-rerun': path.join(out, 'rerun') };
    const r = await cli(args.slice(5).map((a) => swap[a] ?? a));
    expect(r.stderr).not.toContain('internal error');
    expect(r.code).toBe(0);
    for (const f of ['curve.csv', 'samples.csv']) expect(readFileSync(path.join(out, 'rerun', f), 'utf8')).toBe(readFileSync(path.join(dir, f), 'utf8'));
    expect(readFileSync(CLASSES, 'utf8').trim().split('\n')).toEqual(saved.run.samples.classNames);
  });

  it('says when the command line cannot carry per-search values', () => {
    const run = asWorkbenchRun(saved);
    const attacks = run.run.config.attacks.map((a) => (a.id === 'fgsm' ? { id: 'apgd-ce' as const, options: { steps: 9, restarts: 1, randomStart: true, target: { kind: 'untargeted' } } } : a));
    const command = reproduceCommand({ ...run, run: { ...run.run, config: { ...run.run.config, attacks } } });
    expect(command.exact).toBe(false);
    expect(command.notes.join(' ')).toMatch(/steps \(apgd-ce 9, pgd 4\)/);
  });
});

describe('brink report: bad usage', () => {
  it('names a run folder without a saved run, and a missing --out', async () => {
    const { reportCommand, REPORT_FLAGS } = await import('../../src/cli/reportCommand.ts');
    const { parseArgs } = await import('../../src/cli/args.ts');
    const empty = tmp();
    await expect(reportCommand(parseArgs([empty, '--out', path.join(empty, 'r.html')], REPORT_FLAGS))).rejects.toThrow(/no run\.brink\.json in this folder/);
    await expect(reportCommand(parseArgs([dir], REPORT_FLAGS))).rejects.toThrow(/missing --out/);
    await expect(reportCommand(parseArgs([], REPORT_FLAGS))).rejects.toThrow(/give one run folder/);
  });
});
