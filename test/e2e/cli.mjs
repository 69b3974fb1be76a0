/**
 * Runs Brink's command line on the same model, samples and settings as a browser run (read from
 * the run.json the browser exported), so the suite can compare the two sets of files byte for byte.
 */
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';

/** CLI flags equivalent to a run record's configuration (one option set shared by the attacks, as both front ends use). */
export function cliArgsFor(record, { model, samples, out }) {
  const { config, preprocessing } = record;
  const args = ['sweep', '--model', model, '--samples', samples, '--out', out];
  args.push('--attack', config.attacks.map((a) => a.id).join(','));
  args.push('--norm', config.norm);
  // String(x) is the shortest text that reads back to the same double, so the CLI gets the very same budgets.
  args.push('--eps', config.eps.map((e) => String(e)).join(','));
  args.push('--seed', String(config.seed), '--batch', String(config.batchSize));
  const options = Object.assign({}, ...config.attacks.map((a) => a.options));
  if (options.steps !== undefined) args.push('--steps', String(options.steps));
  if (typeof options.stepSize === 'number') args.push('--step-size', String(options.stepSize));
  if (options.restarts !== undefined) args.push('--restarts', String(options.restarts));
  if (options.randomStart === false) args.push('--no-random-start');
  if (options.loss !== undefined) args.push('--loss', options.loss);
  if (options.target?.kind === 'least-likely') args.push('--target', 'least-likely');
  if (options.target?.kind === 'class') args.push('--target', String(options.target.classIndex));
  // The resize mode is recorded only when it is not the default (stretch), and so passed only then.
  if (record.samples?.resize !== undefined && record.samples.resize !== 'stretch') args.push('--resize', record.samples.resize);
  args.push('--input-range', preprocessing.inputRange, '--mean', preprocessing.mean.join(','), '--std', preprocessing.std.join(','), '--layout', preprocessing.layout);
  return args;
}

/** Run `npm run -s cli -- …`; resolves with { code, stderr, ms }. */
export function runCli(args, cwd) {
  return new Promise((resolve, reject) => {
    const started = Date.now();
    const child = spawn('npm', ['run', '-s', 'cli', '--', ...args], { cwd, stdio: ['ignore', 'ignore', 'pipe'] });
    let stderr = '';
    child.stderr.on('data', (chunk) => (stderr += chunk));
    child.on('error', reject);
    child.on('close', (code) => resolve({ code, stderr, ms: Date.now() - started }));
  });
}

/**
 * Run the CLI for this run record on the demo files exactly as the browser was served them (the
 * built copies in dist/, so a demo asset rewritten after the build cannot skew the comparison) and
 * return its files' bytes.
 */
export async function cliFilesFor(record, repoRoot) {
  const out = mkdtempSync(path.join(os.tmpdir(), 'brink-e2e-cli-'));
  const args = cliArgsFor(record, {
    model: 'dist/demo/models/standard/model.json',
    samples: 'dist/demo/samples',
    out,
  });
  const result = await runCli(args, repoRoot);
  if (result.code !== 0) {
    throw new Error(`the CLI exited with ${result.code}: ${result.stderr.trim().split('\n').slice(-3).join(' | ')}\n  command: npm run -s cli -- ${args.join(' ')}`);
  }
  return {
    args,
    ms: result.ms,
    curveCsv: readFileSync(path.join(out, 'curve.csv')),
    samplesCsv: readFileSync(path.join(out, 'samples.csv')),
    runJson: JSON.parse(readFileSync(path.join(out, 'run.json'), 'utf8')),
  };
}
