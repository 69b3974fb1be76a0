/**
 * --resize on `sweep` and `flips`, end to end on the committed MNIST fixture (28×28 digits, a
 * 28×28 model). Closed form used throughout: padding every digit with 8 columns on each side gives
 * 28×44 images whose centred 1:1 box (crop.ts centreCropBox: width round(28·1/1) = 28, offset
 * floor(16/2) = 8) is exactly the original digit, and resizing 28×28 to 28×28 is the identity; so
 * `--resize crop` on the padded copy must give the very bytes of the plain run on the original.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { cpSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { PNG } from 'pngjs';
import { encodePngRgba } from '../samples/fixtures.ts';
import { CLASSES, MODEL, SAMPLES, cli, tmp, type CliResult } from '../report/cliRun.ts';
import { loadRun } from '../../src/core/savedRun/loadRun.ts';
import { SAVED_RUN_FILE } from '../../src/core/savedRun/types.ts';
import { reproduceCommand } from '../../src/core/report/commandLine.ts';
import { renderReport } from '../../src/core/report/renderReport.ts';
import { comparisonWarnings } from '../../src/core/compare/warnings.ts';

const PAD = 8;
const SWEEP = ['--classes', CLASSES, '--attack', 'fgsm', '--norm', 'linf', '--eps', '0,0.1', '--seed', '2'];
const FLIPS = ['--norm', 'linf', '--attack', 'deepfool', '--limit', '8'];

/** A copy of the fixture's samples with every digit padded left and right by PAD columns of a stripe pattern. */
function paddedSamples(): string {
  const dir = tmp('brink-resize-');
  cpSync(SAMPLES, dir, { recursive: true });
  for (const folder of readdirSync(dir, { withFileTypes: true }).filter((d) => d.isDirectory())) {
    for (const name of readdirSync(path.join(dir, folder.name)).filter((n) => n.endsWith('.png'))) {
      const file = path.join(dir, folder.name, name);
      const png = PNG.sync.read(readFileSync(file));
      const width = png.width + 2 * PAD;
      const rgba = new Uint8Array(png.height * width * 4);
      for (let y = 0; y < png.height; y++) {
        for (let x = 0; x < width; x++) {
          const inside = x >= PAD && x < PAD + png.width;
          const v = inside ? png.data[(y * png.width + x - PAD) * 4]! : x % 2 === 0 ? 255 : 128;
          rgba.set([v, v, v, 255], (y * width + x) * 4);
        }
      }
      writeFileSync(file, encodePngRgba(width, png.height, rgba));
    }
  }
  return dir;
}

const read = (dir: string, file: string): string => readFileSync(path.join(dir, file), 'utf8');

async function sweep(samples: string, extra: readonly string[] = []): Promise<{ out: string; run: CliResult }> {
  const out = tmp();
  const run = await cli(['sweep', '--model', MODEL, '--samples', samples, ...SWEEP, ...extra, '--out', out]);
  return { out, run };
}

async function flips(samples: string, extra: readonly string[] = []): Promise<{ out: string; run: CliResult }> {
  const out = tmp();
  const run = await cli(['flips', '--model', MODEL, '--samples', samples, ...FLIPS, ...extra, '--out', out]);
  return { out, run };
}

describe('--resize crop (CLI end to end)', () => {
  let padded = '';
  let plain: Awaited<ReturnType<typeof sweep>>;
  let cropped: Awaited<ReturnType<typeof sweep>>;
  let stretched: Awaited<ReturnType<typeof sweep>>;
  let flipsPlain: Awaited<ReturnType<typeof flips>>;
  let flipsCropped: Awaited<ReturnType<typeof flips>>;
  beforeAll(async () => {
    padded = paddedSamples();
    [plain, cropped, stretched, flipsPlain, flipsCropped] = await Promise.all([
      sweep(SAMPLES),
      sweep(padded, ['--resize', 'crop']),
      sweep(padded),
      flips(SAMPLES),
      flips(padded, ['--resize', 'crop']),
    ]);
    for (const r of [plain, cropped, stretched, flipsPlain, flipsCropped]) {
      if (r.run.code !== 0) throw new Error(`the CLI exited with ${r.run.code}: ${r.run.stderr}`);
    }
  }, 180_000);

  it('sweep: cropping the padded digits gives the bytes of the plain run on the originals', () => {
    for (const f of ['curve.csv', 'samples.csv']) expect(read(cropped.out, f)).toBe(read(plain.out, f));
  });

  it('sweep: stretching the padded digits does not (the padding reaches the model)', () => {
    expect(read(stretched.out, 'samples.csv')).not.toBe(read(plain.out, 'samples.csv'));
  });

  it('flips: cropping the padded digits gives the flips.csv of the originals', () => {
    expect(read(flipsCropped.out, 'flips.csv')).toBe(read(flipsPlain.out, 'flips.csv'));
  });

  it('run.json records crop in samples.resize and the command line; the default run records nothing new', () => {
    const record = JSON.parse(read(cropped.out, 'run.json')) as { samples: Record<string, unknown>; commandLine: string[] };
    expect(record.samples['resize']).toBe('crop');
    expect(record.commandLine.join(' ')).toContain('--resize crop');
    const defaults = JSON.parse(read(plain.out, 'run.json')) as { samples: Record<string, unknown> };
    expect('resize' in defaults.samples).toBe(false);
    expect(Object.keys(defaults.samples)).toEqual(['sha256', 'files', 'count', 'cleanCorrect', 'cleanAccuracy', 'classNames']);
  });

  it('the saved run carries it, and the report command rebuilt for a workbench run recreates the numbers', async () => {
    const saved = loadRun(read(cropped.out, SAVED_RUN_FILE));
    expect(saved.run.samples.resize).toBe('crop');
    expect(reproduceCommand(saved).command).toContain('--resize crop');
    const { commandLine: _recorded, ...record } = saved.run;
    const command = reproduceCommand({ ...saved, origin: 'workbench', run: record });
    expect(command.command).toContain(' --resize crop ');
    const out = tmp();
    const classes = path.join(out, 'classes.txt');
    writeFileSync(classes, `${(saved.run.samples.classNames ?? []).join('\n')}\n`);
    const swap: Record<string, string> = { 'model/model.json': MODEL, 'samples/': padded, 'classes.txt': classes, 'brink-rerun': path.join(out, 'rerun') };
    const r = await cli(command.command.split(' ').slice(5).map((a) => swap[a] ?? a));
    expect(r.code, r.stderr).toBe(0);
    for (const f of ['curve.csv', 'samples.csv']) expect(read(path.join(out, 'rerun'), f)).toBe(read(cropped.out, f));
    // Without a resize mode in the record the rebuilt command has no --resize (the default).
    expect(reproduceCommand(loadRun(read(plain.out, SAVED_RUN_FILE))).command).not.toContain('--resize');
  }, 120_000);
});

describe('--resize in the report and the comparison', () => {
  it('the report names the mode, and comparing a stretch run with a crop run warns about the samples', async () => {
    const padded = paddedSamples();
    const [a, b] = await Promise.all([sweep(padded), sweep(padded, ['--resize', 'crop'])]);
    expect([a.run.code, b.run.code]).toEqual([0, 0]);
    const stretchRun = loadRun(read(a.out, SAVED_RUN_FILE));
    const cropRun = loadRun(read(b.out, SAVED_RUN_FILE));
    expect(renderReport(cropRun)).toContain('<dt>Resizing</dt><dd>centre cropped to the model');
    expect(renderReport(stretchRun)).toContain('<dt>Resizing</dt><dd>stretched to the model');
    const warnings = comparisonWarnings({ label: 'A', run: stretchRun }, { label: 'B', run: cropRun });
    expect(warnings.filter((w) => w.kind === 'samples').map((w) => w.message)).toEqual([
      "A and B brought the images to the model's size differently (stretch vs crop), so the models saw different pixels.",
    ]);
  }, 120_000);
});

describe('--resize: a bad value exits 2 with one line naming the flag', () => {
  it('on sweep and on flips', async () => {
    const runs = await Promise.all([
      cli(['sweep', '--model', MODEL, '--samples', SAMPLES, ...SWEEP, '--resize', 'squash', '--out', tmp()]),
      cli(['flips', '--model', MODEL, '--samples', SAMPLES, ...FLIPS, '--resize', 'squash', '--out', tmp()]),
    ]);
    for (const r of runs) {
      expect(r.code).toBe(2);
      const lines = r.stderr.trim().split('\n');
      expect(lines).toHaveLength(1);
      expect(lines[0]).toBe('brink: --resize: "squash" is not one of stretch, crop');
    }
  });
});
