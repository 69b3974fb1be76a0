/**
 * `brink sweep --health` end to end on the committed fixture test/fixtures/cli (an affine classifier
 * and 20 MNIST digits): health.csv's header and rows, the statuses the affine model's closed form
 * settles, and the sweep's own files unchanged by the option.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { PNG } from 'pngjs';
import { logits64, minimalLinf, type AffineWeights, type Sample } from '../flips/closedForm.ts';

const FIXTURE = path.resolve('test/fixtures/cli');
const MODEL = path.join(FIXTURE, 'model/model.json');
const SAMPLES = path.join(FIXTURE, 'samples');
const CLASSES = path.join(FIXTURE, 'classes.txt');
const TSX = path.resolve('node_modules/.bin/tsx');

interface Run {
  readonly code: number | null;
  readonly stderr: string;
}

function cliAsync(args: readonly string[]): Promise<Run> {
  return new Promise((resolve) => {
    const child = spawn(TSX, ['src/cli/main.ts', ...args]);
    let stderr = '';
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
    child.on('close', (code) => resolve({ code, stderr }));
  });
}

const tmp = (): string => mkdtempSync(path.join(tmpdir(), 'brink-health-'));

/** The fixture's affine model and digits, read from weights.bin and the PNGs (see test/cli/flips.test.ts). */
function fixture(): { model: AffineWeights; samples: Sample[] } {
  const bytes = readFileSync(path.join(FIXTURE, 'model/weights.bin'));
  const all = new Float32Array(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength));
  const names = readFileSync(CLASSES, 'utf8').trim().split('\n');
  const rows = readFileSync(path.join(SAMPLES, 'manifest.csv'), 'utf8').trim().split('\n').slice(1);
  const samples = rows.map((row) => {
    const [file, label] = row.split(',') as [string, string];
    const png = PNG.sync.read(readFileSync(path.join(SAMPLES, file)));
    return { x: Float32Array.from({ length: 784 }, (_, i) => png.data[i * 4]! / 255), y: names.indexOf(label) };
  });
  return { model: { w: all.subarray(0, 7840), b: all.subarray(7840, 7850), d: 784, k: 10 }, samples };
}

const IDS = ['monotone', 'large-budget', 'iterative-vs-single-step', 'gradient-free-vs-gradient', 'convergence', 'gradients', 'noise', 'saturation'];

describe('brink sweep --health (CLI end to end)', () => {
  const sweep = ['sweep', '--model', MODEL, '--samples', SAMPLES, '--classes', CLASSES, '--attack', 'fgsm,pgd', '--norm', 'linf', '--eps', '0,0.05,0.1', '--steps', '5', '--seed', '3'];
  const withHealth = tmp();
  const without = tmp();
  let runs: Run[] = [];
  beforeAll(async () => {
    runs = await Promise.all([
      cliAsync([...sweep, '--health', '--queries', '300', '--draws', '20', '--out', withHealth]),
      cliAsync([...sweep, '--out', without]),
      cliAsync([...sweep, '--health=yes', '--out', tmp()]),
    ]);
  });

  it('writes health.csv with the exact header, one row per check, and leaves the other files unchanged', () => {
    const [health, plain] = runs as [Run, Run];
    expect(health.stderr).not.toContain('internal error');
    expect(health.code).toBe(0);
    expect(plain.code).toBe(0);
    const lines = readFileSync(path.join(withHealth, 'health.csv'), 'utf8').trimEnd().split('\n');
    expect(lines[0]).toBe('check,status,detail');
    const rows = lines.slice(1).map((l) => /^([a-z-]+),(pass|warn|skip),(.+)$/.exec(l));
    expect(rows.every((r) => r !== null)).toBe(true);
    expect(rows.map((r) => r![1])).toEqual(IDS);
    // Issue 5: the option adds health.csv and changes nothing else.
    for (const f of ['curve.csv', 'samples.csv']) {
      expect(readFileSync(path.join(withHealth, f), 'utf8')).toBe(readFileSync(path.join(without, f), 'utf8'));
    }
    expect(health.stderr).toMatch(/health\.csv/);
  });

  it('gives the statuses the affine model settles in closed form', () => {
    const { model, samples } = fixture();
    const status = new Map(
      readFileSync(path.join(withHealth, 'health.csv'), 'utf8').trimEnd().split('\n').slice(1).map((l) => l.split(',').slice(0, 2) as [string, string]),
    );
    // Closed form: the cross-entropy gradient of z = Wᵀx + b is W(softmax(z) − e_y), which is exactly zero only if
    // softmax(z) rounds to e_y, i.e. for logit margins beyond about 100 in float32; this fixture's are far smaller.
    const margins = samples.map((s) => {
      const z = logits64(model, s.x);
      return Math.max(...z) - Math.min(...z);
    });
    expect(Math.max(...margins)).toBeLessThan(50);
    expect(status.get('gradients')).toBe('pass');
    // Definition of the check: a logit output has no probabilities to saturate.
    expect(status.get('saturation')).toBe('pass');
    // Closed form (box-aware L∞, test/flips/closedForm.ts): every correct digit can be flipped within 0.5, so a
    // working search leaves none robust there, below the 10 % of a constant prediction (2 digits per class).
    const correct = samples.filter((s) => {
      const z = logits64(model, s.x);
      return z.indexOf(Math.max(...z)) === s.y;
    });
    expect(Math.max(...correct.map((s) => minimalLinf(model, s)))).toBeLessThan(0.5);
    expect(status.get('large-budget')).toBe('pass');
  });

  it('refuses a value for the boolean flag with exit code 2', () => {
    const bad = runs[2]!;
    expect(bad.code).toBe(2);
    expect(bad.stderr.trim()).toBe('brink: --health takes no value');
  });
});
