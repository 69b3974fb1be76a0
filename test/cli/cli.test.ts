/**
 * The command line end to end on the committed MNIST fixture (scripts/fixtures/make-cli-fixture.ts):
 * files and headers exact, and exit code 2 with a one-line message for each kind of bad input.
 */
import { describe, expect, it, beforeAll } from 'vitest';
import { spawnSync } from 'node:child_process';
import { cpSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

const FIXTURE = path.resolve('test/fixtures/cli');
const MODEL = path.join(FIXTURE, 'model/model.json');
const SAMPLES = path.join(FIXTURE, 'samples');
const CLASSES = path.join(FIXTURE, 'classes.txt');
const TSX = path.resolve('node_modules/.bin/tsx');

function cli(args: readonly string[]): { code: number | null; stdout: string; stderr: string } {
  const r = spawnSync(TSX, ['src/cli/main.ts', ...args], { encoding: 'utf8', timeout: 120_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

const tmp = (): string => mkdtempSync(path.join(tmpdir(), 'brink-cli-'));

describe('brink sweep (CLI end to end)', () => {
  let out = '';
  let run: ReturnType<typeof cli>;
  beforeAll(() => {
    out = tmp();
    run = cli(['sweep', '--model', MODEL, '--samples', SAMPLES, '--classes', CLASSES, '--attack', 'fgsm,pgd', '--norm', 'linf', '--eps', '0,0.05,0.1', '--steps', '5', '--seed', '3', '--out', out]);
  });

  it('exits 0 and writes the three files with the exact headers', () => {
    expect(run.stderr).not.toContain('internal error');
    expect(run.code).toBe(0);
    const curve = readFileSync(path.join(out, 'curve.csv'), 'utf8').trimEnd().split('\n');
    expect(curve[0]).toBe('attack,norm,eps,samples,clean_correct,robust,robust_accuracy,ci95_low,ci95_high');
    expect(curve).toHaveLength(1 + 2 * 3);
    expect(curve.slice(1).map((r) => r.split(',').slice(0, 3).join(','))).toEqual([
      'fgsm,linf,0', 'fgsm,linf,0.05', 'fgsm,linf,0.1', 'pgd,linf,0', 'pgd,linf,0.05', 'pgd,linf,0.1',
    ]);
    const samples = readFileSync(path.join(out, 'samples.csv'), 'utf8').trimEnd().split('\n');
    expect(samples[0]).toBe('file,label,clean_pred,clean_conf,attack,norm,eps,adv_pred,adv_conf,linf,l2,flipped');
    // 20 samples × 2 searches × 3 budgets (the fixture holds 20 digits).
    expect(samples).toHaveLength(1 + 20 * 2 * 3);
    const record = JSON.parse(readFileSync(path.join(out, 'run.json'), 'utf8')) as Record<string, unknown>;
    expect(JSON.stringify(record)).toMatch(/[0-9a-f]{64}/);
    expect(run.stderr).toMatch(/clean accuracy/);
  });

  it('reports at ε = 0 exactly the clean accuracy, and robust counts that never rise with ε', () => {
    const rows = readFileSync(path.join(out, 'curve.csv'), 'utf8').trimEnd().split('\n').slice(1).map((r) => r.split(','));
    for (const attack of ['fgsm', 'pgd']) {
      const mine = rows.filter((r) => r[0] === attack);
      expect(mine[0]![5]).toBe(mine[0]![4]); // robust = clean_correct at ε = 0 (definition of robust accuracy)
      const robust = mine.map((r) => Number(r[5]));
      for (let i = 1; i < robust.length; i++) expect(robust[i]!).toBeLessThanOrEqual(robust[i - 1]!);
    }
  });

  it('gives the same bytes for the same seed, via the manifest too', () => {
    const again = tmp();
    const r = cli(['sweep', '--model', MODEL, '--samples', path.join(SAMPLES, 'manifest.csv'), '--classes', CLASSES, '--attack', 'fgsm,pgd', '--norm', 'linf', '--eps', '0,0.05,0.1', '--steps', '5', '--seed', '3', '--out', again]);
    expect(r.code).toBe(0);
    for (const f of ['curve.csv', 'samples.csv']) {
      expect(readFileSync(path.join(again, f), 'utf8')).toBe(readFileSync(path.join(out, f), 'utf8'));
    }
  });
});

describe('brink sweep: bad usage and bad input exit 2 with one line naming the problem', () => {
  const base = ['--samples', SAMPLES, '--classes', CLASSES, '--attack', 'fgsm', '--norm', 'linf', '--eps', '0.1'];
  const cases: { what: string; args: () => string[]; message: RegExp }[] = [
    { what: 'missing model file', args: () => ['sweep', '--model', '/nonexistent/model.json', ...base, '--out', tmp()], message: /nonexistent\/model\.json/ },
    { what: 'bad JSON', args: () => ['sweep', '--model', badJson(), ...base, '--out', tmp()], message: /JSON|json/ },
    { what: 'unknown flag', args: () => ['sweep', '--model', MODEL, ...base, '--out', tmp(), '--bogus', '1'], message: /unknown flag --bogus/ },
    { what: 'unknown attack', args: () => ['sweep', '--model', MODEL, '--samples', SAMPLES, '--attack', 'nope', '--norm', 'linf', '--eps', '0.1', '--out', tmp()], message: /unknown search "nope"/ },
    { what: 'bad norm', args: () => ['sweep', '--model', MODEL, '--samples', SAMPLES, '--attack', 'fgsm', '--norm', 'l7', '--eps', '0.1', '--out', tmp()], message: /--norm/ },
    { what: 'bad budget', args: () => ['sweep', '--model', MODEL, '--samples', SAMPLES, '--attack', 'fgsm', '--norm', 'linf', '--eps', '0.1,x', '--out', tmp()], message: /--eps/ },
    { what: 'missing --out', args: () => ['sweep', '--model', MODEL, ...base], message: /missing --out/ },
    { what: 'label out of range', args: () => ['sweep', '--model', MODEL, '--samples', manifestWithLabel('12'), '--attack', 'fgsm', '--norm', 'linf', '--eps', '0.1', '--out', tmp()], message: /12/ },
    { what: 'missing sample folder', args: () => ['sweep', '--model', MODEL, '--samples', '/nonexistent/samples', '--attack', 'fgsm', '--norm', 'linf', '--eps', '0.1', '--out', tmp()], message: /nonexistent\/samples/ },
    { what: 'unknown command', args: () => ['sweeep'], message: /unknown command "sweeep"/ },
  ];
  for (const c of cases) {
    it(c.what, () => {
      const r = cli(c.args());
      expect(r.code).toBe(2);
      const lines = r.stderr.trim().split('\n');
      expect(lines).toHaveLength(1);
      expect(lines[0]).toMatch(/^brink: /);
      expect(lines[0]).toMatch(c.message);
    });
  }
});

function badJson(): string {
  const dir = tmp();
  writeFileSync(path.join(dir, 'model.json'), '{"modelTopology": ');
  return path.join(dir, 'model.json');
}

function manifestWithLabel(label: string): string {
  const dir = tmp();
  cpSync(SAMPLES, dir, { recursive: true });
  const rows = readFileSync(path.join(dir, 'manifest.csv'), 'utf8').trimEnd().split('\n');
  rows[1] = `${rows[1]!.split(',')[0]},${label}`;
  writeFileSync(path.join(dir, 'manifest.csv'), `${rows.join('\n')}\n`);
  return path.join(dir, 'manifest.csv');
}
