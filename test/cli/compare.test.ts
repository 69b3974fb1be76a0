/**
 * `brink compare` on two sweeps of the CLI fixture with the same settings: the fixture model and a
 * copy with perturbed weights (so like for like, but different models). The CSV's differences must
 * equal those recomputed from the two curve.csv files; mismatched settings must be flagged.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { copyFileSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { FIXTURE, cli, csvRows, sweepFixture, tmp, type CliResult } from '../report/cliRun.ts';
import { loadRun } from '../../src/core/savedRun/loadRun.ts';
import { SAVED_RUN_FILE, type SavedRun } from '../../src/core/savedRun/types.ts';
import { compareRuns } from '../../src/core/compare/compareRuns.ts';
import { COMPARE_CSV_HEADER } from '../../src/core/compare/compareCsv.ts';
import { parseArgs, UsageError } from '../../src/cli/args.ts';
import { COMPARE_FLAGS, compareCommand } from '../../src/cli/compareCommand.ts';

const SETTINGS = ['--steps', '5', '--seed', '3'];
let runA = '';
let runB = '';
let out = '';
let compared: CliResult;

/** The fixture model with every weight moved by 0.03·sin(i): a different model of the same shape. */
function perturbedModel(): string {
  const dir = tmp('brink-model-');
  copyFileSync(path.join(FIXTURE, 'model/model.json'), path.join(dir, 'model.json'));
  const bytes = readFileSync(path.join(FIXTURE, 'model/weights.bin'));
  const weights = new Float32Array(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength));
  for (let i = 0; i < weights.length; i++) weights[i] = weights[i]! + 0.03 * Math.sin(i);
  writeFileSync(path.join(dir, 'weights.bin'), new Uint8Array(weights.buffer));
  return path.join(dir, 'model.json');
}

beforeAll(async () => {
  [runA, runB] = await Promise.all([sweepFixture(SETTINGS), sweepFixture(SETTINGS, perturbedModel())]);
  out = tmp('brink-compare-');
  compared = await cli(['compare', runA, runB, '--labels', 'fixture,perturbed', '--out', out]);
});

const load = (dir: string): SavedRun => loadRun(readFileSync(path.join(dir, SAVED_RUN_FILE), 'utf8'));

describe('brink compare (CLI)', () => {
  it('writes comparison.csv whose differences equal those recomputed from the two curve.csv files', () => {
    expect(compared.stderr).not.toContain('internal error');
    expect(compared.code).toBe(0);
    const text = readFileSync(path.join(out, 'comparison.csv'), 'utf8');
    expect(text.split('\n')[0]).toBe(COMPARE_CSV_HEADER.join(','));
    const rows = csvRows(path.join(out, 'comparison.csv'));
    const curveA = csvRows(path.join(runA, 'curve.csv'));
    const curveB = csvRows(path.join(runB, 'curve.csv'));
    expect(rows).toHaveLength(curveA.length);
    let moved = 0;
    rows.forEach((row, i) => {
      const a = curveA[i]!;
      const b = curveB[i]!;
      const col = (name: string): string => row[COMPARE_CSV_HEADER.indexOf(name as never)]!;
      expect([col('baseline'), col('other'), col('attack'), col('norm'), col('eps')]).toEqual(['fixture', 'perturbed', a[0], a[1], a[2]]);
      // Each run's counts and Wilson interval are its own curve.csv's.
      expect([col('samples_a'), col('robust_a'), col('robust_accuracy_a'), col('ci95_low_a'), col('ci95_high_a')]).toEqual([a[3], a[5], a[6], a[7], a[8]]);
      expect([col('samples_b'), col('robust_b'), col('robust_accuracy_b'), col('ci95_low_b'), col('ci95_high_b')]).toEqual([b[3], b[5], b[6], b[7], b[8]]);
      // difference = robust_b/samples_b − robust_a/samples_a, recomputed from the counts in curve.csv.
      const difference = Number(b[5]) / Number(b[3]) - Number(a[5]) / Number(a[3]);
      expect(col('difference')).toBe(difference.toFixed(6));
      expect(Number(col('difference_ci95_low'))).toBeLessThanOrEqual(difference);
      expect(Number(col('difference_ci95_high'))).toBeGreaterThanOrEqual(difference);
      // Same samples, so paired counts: robust_b = robust_a − (robust only in a) + (robust only in b).
      expect(Number(b[5])).toBe(Number(a[5]) - Number(col('robust_only_a')) + Number(col('robust_only_b')));
      if (difference !== 0) moved++;
    });
    expect(moved).toBeGreaterThan(0); // the perturbed model really is different
  });

  it('reports no warning for like-for-like runs, and draws every run × search', () => {
    expect(compared.stderr).not.toMatch(/not like for like/);
    expect(compared.stderr).toMatch(/0 warnings/);
    const svg = readFileSync(path.join(out, 'comparison.svg'), 'utf8');
    expect(svg.startsWith('<svg xmlns="http://www.w3.org/2000/svg"')).toBe(true);
    expect(svg.match(/<polyline /g)).toHaveLength(4); // 2 runs × FGSM, PGD
    for (const label of ['fixture: FGSM', 'fixture: PGD', 'perturbed: FGSM', 'perturbed: PGD']) expect(svg).toContain(label);
  });

  it('exits 2 with one line for bad usage', async () => {
    const one = await cli(['compare', runA, '--out', tmp()]);
    expect(one.code).toBe(2);
    expect(one.stderr.trim().split('\n')).toHaveLength(1);
    expect(one.stderr).toMatch(/^brink: compare: give at least two run folders/);
    // The same path as the CLI, in this process: a missing folder is a usage error naming it.
    const missing = await compareCommand(parseArgs([runA, '/nonexistent/run', '--out', tmp()], COMPARE_FLAGS)).catch((e: unknown) => e);
    expect(missing).toBeInstanceOf(UsageError);
    expect((missing as Error).message).toMatch(/\/nonexistent\/run: no such file or folder/);
  });
});

describe('compareRuns flags runs that are not like for like', () => {
  const variants: { what: string; kind: string; edit: (run: SavedRun['run']) => SavedRun['run']; message: RegExp }[] = [
    { what: 'other samples', kind: 'samples', edit: (r) => ({ ...r, samples: { ...r.samples, sha256: '0'.repeat(64) } }), message: /different samples/ },
    { what: 'other preprocessing', kind: 'preprocessing', edit: (r) => ({ ...r, preprocessing: { ...r.preprocessing, mean: [0.5] } }), message: /different preprocessing/ },
    { what: 'another norm', kind: 'threat-model', edit: (r) => ({ ...r, config: { ...r.config, norm: 'l2' } }), message: /different norms/ },
    { what: 'other budgets', kind: 'threat-model', edit: (r) => ({ ...r, config: { ...r.config, eps: [0, 0.05, 0.2] } }), message: /only in b: 0\.2/ },
    { what: 'other search options', kind: 'search', edit: (r) => ({ ...r, config: { ...r.config, attacks: r.config.attacks.map((a) => (a.id === 'pgd' ? { ...a, options: { ...a.options, steps: 50 } } : a)) } }), message: /pgd ran with different settings.*steps 5 vs 50/ },
    { what: 'another seed', kind: 'search', edit: (r) => ({ ...r, config: { ...r.config, seed: 4 } }), message: /different seeds \(3 vs 4\)/ },
    { what: 'another batch size', kind: 'search', edit: (r) => ({ ...r, config: { ...r.config, batchSize: 8 } }), message: /different batch sizes/ },
    { what: 'a cancelled run', kind: 'incomplete', edit: (r) => ({ ...r, complete: false }), message: /b was cancelled/ },
  ];
  for (const v of variants) {
    it(v.what, () => {
      const a = load(runA);
      const c = compareRuns([{ label: 'a', run: a }, { label: 'b', run: { ...a, run: v.edit(a.run) } }]);
      const warnings = c.warnings.filter((w) => w.level === 'warning');
      expect(warnings.map((w) => w.kind)).toContain(v.kind);
      expect(warnings.map((w) => w.message).join('\n')).toMatch(v.message);
    });
  }

  it('none for the two like-for-like sweeps; a note when the model is the same', () => {
    expect(compareRuns([{ label: 'a', run: load(runA) }, { label: 'b', run: load(runB) }]).warnings).toEqual([]);
    const same = compareRuns([{ label: 'a', run: load(runA) }, { label: 'a again', run: load(runA) }]).warnings;
    expect(same.map((w) => [w.level, w.kind])).toEqual([['note', 'model']]);
  });
});
