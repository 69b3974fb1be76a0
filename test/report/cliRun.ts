/**
 * Test helpers: run the CLI as a child process (asynchronously, so several can run side by side)
 * and sweep the committed MNIST fixture (scripts/fixtures/make-cli-fixture.ts) into a fresh folder.
 */
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

export const FIXTURE = path.resolve('test/fixtures/cli');
export const MODEL = path.join(FIXTURE, 'model/model.json');
export const SAMPLES = path.join(FIXTURE, 'samples');
export const CLASSES = path.join(FIXTURE, 'classes.txt');
const TSX = path.resolve('node_modules/.bin/tsx');

export interface CliResult {
  readonly code: number | null;
  readonly stdout: string;
  readonly stderr: string;
}

/** Run `tsx src/cli/main.ts ...args` and collect its output. */
export function cli(args: readonly string[]): Promise<CliResult> {
  return new Promise((resolve, reject) => {
    const child = spawn(TSX, ['src/cli/main.ts', ...args], { stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d: Buffer) => (stdout += d.toString('utf8')));
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString('utf8')));
    child.on('error', reject);
    child.on('close', (code) => resolve({ code, stdout, stderr }));
  });
}

export const tmp = (prefix = 'brink-report-'): string => mkdtempSync(path.join(tmpdir(), prefix));

/** Sweep the fixture (FGSM and PGD, L∞, ε = 0, 0.05, 0.1 unless `args` says otherwise) into a new folder. */
export async function sweepFixture(extra: readonly string[] = [], model = MODEL): Promise<string> {
  const out = tmp();
  const r = await cli(['sweep', '--model', model, '--samples', SAMPLES, '--classes', CLASSES, '--attack', 'fgsm,pgd', '--norm', 'linf', '--eps', '0,0.05,0.1', ...extra, '--out', out]);
  if (r.code !== 0) throw new Error(`sweep failed (${r.code}): ${r.stderr}`);
  return out;
}

/** A CSV file's data rows split on commas (the fixture's files and budgets hold no commas or quotes). */
export function csvRows(file: string): string[][] {
  return readFileSync(file, 'utf8').trimEnd().split('\n').slice(1).map((line) => line.split(','));
}
