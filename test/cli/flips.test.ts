/**
 * `brink flips` end to end on the committed fixture test/fixtures/cli (a softmax-regression model,
 * i.e. an affine classifier, and 20 MNIST digits as PNG). Because the model is affine, every
 * sample's exact minimal budget is known in closed form (test/flips/closedForm.ts): the CLI's flip
 * budgets are checked against it, computed here from weights.bin and the PNGs themselves.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { PNG } from 'pngjs';
import { logits64, medianOf, minimalL2, minimalLinf, type AffineWeights, type Sample } from '../flips/closedForm.ts';

const FIXTURE = path.resolve('test/fixtures/cli');
const MODEL = path.join(FIXTURE, 'model/model.json');
const SAMPLES = path.join(FIXTURE, 'samples');
const CLASSES = path.join(FIXTURE, 'classes.txt');
const TSX = path.resolve('node_modules/.bin/tsx');
const CLASS_NAMES = readFileSync(CLASSES, 'utf8').trim().split('\n');

interface Run {
  readonly code: number | null;
  readonly stdout: string;
  readonly stderr: string;
}

/** Runs the CLI without blocking, so that independent runs overlap. */
function cliAsync(args: readonly string[]): Promise<Run> {
  return new Promise((resolve) => {
    const child = spawn(TSX, ['src/cli/main.ts', ...args]);
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d: Buffer) => (stdout += d.toString()));
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
    child.on('close', (code) => resolve({ code, stdout, stderr }));
  });
}

const tmp = (): string => mkdtempSync(path.join(tmpdir(), 'brink-flips-'));

/** The fixture's Dense layer read from weights.bin (kernel [784, 10] then bias [10], float32 little-endian, per model.json). */
function fixtureWeights(): AffineWeights {
  const bytes = readFileSync(path.join(FIXTURE, 'model/weights.bin'));
  const all = new Float32Array(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength));
  return { w: all.subarray(0, 7840), b: all.subarray(7840, 7850), d: 784, k: 10 };
}

/** The fixture's samples from its manifest: grey PNG values / 255 and the class index of the label name. */
function fixtureSamples(): Map<string, Sample> {
  const rows = readFileSync(path.join(SAMPLES, 'manifest.csv'), 'utf8').trim().split('\n').slice(1);
  return new Map(
    rows.map((row) => {
      const [file, label] = row.split(',') as [string, string];
      const png = PNG.sync.read(readFileSync(path.join(SAMPLES, file)));
      const x = Float32Array.from({ length: 784 }, (_, i) => png.data[i * 4]! / 255);
      return [file, { x, y: CLASS_NAMES.indexOf(label) }];
    }),
  );
}

function parseFlips(dir: string): string[][] {
  return readFileSync(path.join(dir, 'flips.csv'), 'utf8').trimEnd().split('\n').map((line) => line.split(','));
}

describe('brink flips (CLI end to end, against the closed form of the affine fixture)', () => {
  const model = fixtureWeights();
  const samples = fixtureSamples();
  interface Case {
    readonly name: string;
    readonly args: readonly string[];
    readonly norm: 'linf' | 'l2';
    readonly maxEps: number;
    /**
     * L∞: the box-aware closed form is the exact minimum, so the median must be within 3 % of it
     * (issue 5, test 1). L2: the closed form ignores the [0,1] box, which binds on MNIST digits (most
     * pixels are 0 or 1), so it is only a lower bound; DeepFool linearises without the box and may give
     * up on such digits (empty flip_eps), which is allowed here.
     */
    readonly exactMedian: boolean;
    readonly allowEmpty: boolean;
  }
  const cases: readonly Case[] = [
    { name: 'pgd linf', args: ['--norm', 'linf', '--max-eps', '0.3'], norm: 'linf', maxEps: 0.3, exactMedian: true, allowEmpty: false },
    // Without --max-eps: the L2 default is 0.5·√784 = 14.
    { name: 'deepfool l2', args: ['--norm', 'l2', '--attack', 'deepfool'], norm: 'l2', maxEps: 14, exactMedian: false, allowEmpty: true },
  ];
  const runs = new Map<string, { run: Run; out: string }>();
  beforeAll(async () => {
    const common = ['--model', MODEL, '--samples', SAMPLES, '--classes', CLASSES, '--seed', '2'];
    // The first case twice, to check that one seed gives the same bytes.
    await Promise.all(
      [...cases, { ...cases[0]!, name: 'again' }].map(async (c) => {
        const out = tmp();
        runs.set(c.name, { run: await cliAsync(['flips', ...common, ...c.args, '--out', out]), out });
      }),
    );
  });

  for (const c of cases) {
    const { name, maxEps } = c;
    it(`${name}: header, clean predictions, 0 for misclassified, and budgets between the exact minimum and --max-eps`, () => {
      const { run, out } = runs.get(name)!;
      expect(run.stderr).not.toContain('internal error');
      expect(run.code).toBe(0);
      const rows = parseFlips(out);
      expect(rows[0]!.join(',')).toBe('file,label,clean_pred,flip_eps,adv_pred');
      expect(rows).toHaveLength(1 + 20);
      const ratios: number[] = [];
      let empty = 0;
      for (const [file, label, cleanPred, flipEps, advPred] of rows.slice(1) as [string, string, string, string, string][]) {
        const s = samples.get(file)!;
        const z = logits64(model, s.x);
        expect(Number(label)).toBe(s.y);
        // Closed form: the clean prediction is the argmax of Wᵀx + b.
        expect(Number(cleanPred)).toBe(z.indexOf(Math.max(...z)));
        if (s.y !== Number(cleanPred)) {
          // Issue 5: flip_eps is 0 for a sample misclassified clean.
          expect(flipEps).toBe('0');
          expect(advPred).toBe(cleanPred);
          continue;
        }
        const exact = c.norm === 'linf' ? minimalLinf(model, s) : minimalL2(model, s);
        if (flipEps === '' && c.allowEmpty) {
          empty++;
          continue;
        }
        expect(flipEps, file).not.toBe('');
        const f = Number(flipEps);
        expect(f).toBeLessThanOrEqual(maxEps);
        // Closed form: no misclassified point lies closer than the exact minimal budget (float32 and 6-decimal rounding slack).
        expect(f).toBeGreaterThanOrEqual(exact * (1 - 1e-4) - 1e-6);
        expect(Number(advPred)).not.toBe(s.y);
        ratios.push(f / exact);
      }
      console.log(`${name}: flip budget / closed form per correct sample: median ${medianOf(ratios).toFixed(4)}, max ${Math.max(...ratios).toFixed(4)}, ${empty} empty`);
      // Issue 5, test 1, on the fixture: the median within 3 % of the closed form.
      if (c.exactMedian) expect(medianOf(ratios)).toBeLessThanOrEqual(1.03);
      expect(run.stderr).toMatch(/median flip budget/);
    });
  }

  it('gives the same bytes for the same seed', () => {
    const again = runs.get('again')!;
    expect(again.run.code).toBe(0);
    expect(readFileSync(path.join(again.out, 'flips.csv'), 'utf8')).toBe(readFileSync(path.join(runs.get('pgd linf')!.out, 'flips.csv'), 'utf8'));
  });
});

describe('brink flips: bad usage exits 2 with one line naming the problem', () => {
  const base = ['flips', '--model', MODEL, '--samples', SAMPLES, '--norm', 'linf'];
  const cases: { what: string; args: string[]; message: RegExp }[] = [
    { what: 'a search that has no flip budgets', args: [...base, '--attack', 'fgsm', '--out', '/tmp/x'], message: /--attack: "fgsm"/ },
    { what: 'targets are not for flip budgets', args: [...base, '--target', '3', '--out', '/tmp/x'], message: /unknown flag --target/ },
    { what: 'tolerance not below the largest budget', args: [...base, '--max-eps', '0.01', '--tol', '0.02', '--out', tmp()], message: /tol/ },
  ];
  it('for each kind of mistake', async () => {
    const runs = await Promise.all(cases.map((c) => cliAsync(c.args)));
    runs.forEach((r, i) => {
      const c = cases[i]!;
      expect(r.code, c.what).toBe(2);
      const lines = r.stderr.trim().split('\n');
      expect(lines, c.what).toHaveLength(1);
      expect(lines[0]).toMatch(/^brink: /);
      expect(lines[0], c.what).toMatch(c.message);
    });
  });
});
