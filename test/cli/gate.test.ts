/**
 * `brink gate` on a sweep of the CLI fixture: exit 0 when every threshold holds, 1 with one line
 * naming the first that fails, 2 for bad usage. Thresholds are set from the run's own curve.csv.
 * Exit codes are checked on the real CLI; the many message cases call the command in-process.
 */
import { afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import path from 'node:path';
import { cli, csvRows, sweepFixture } from '../report/cliRun.ts';
import { parseArgs, UsageError } from '../../src/cli/args.ts';
import { GATE_FLAGS, gateCommand } from '../../src/cli/gateCommand.ts';

let run = '';
/** curve.csv rows by "attack eps". */
const point = new Map<string, { robust: number; samples: number; accuracy: string; low: string }>();

beforeAll(async () => {
  run = await sweepFixture(['--steps', '5', '--seed', '3']);
  for (const r of csvRows(path.join(run, 'curve.csv'))) point.set(`${r[0]} ${r[2]}`, { robust: Number(r[5]), samples: Number(r[3]), accuracy: r[6]!, low: r[7]! });
});

afterEach(() => {
  vi.restoreAllMocks();
});

function oneLine(text: string): string {
  const lines = text.trim().split('\n');
  expect(lines).toHaveLength(1);
  return lines[0]!;
}

/** Run the gate in this process: its exit code (or the usage error) and what it wrote to stderr. */
async function gateHere(...args: string[]): Promise<{ code: number | UsageError; stderr: string }> {
  let stderr = '';
  vi.spyOn(process.stderr, 'write').mockImplementation((chunk: string | Uint8Array) => ((stderr += String(chunk)), true));
  vi.spyOn(process.stdout, 'write').mockImplementation(() => true);
  try {
    return { code: await gateCommand(parseArgs(['--run', run, ...args], GATE_FLAGS)), stderr };
  } catch (err) {
    if (err instanceof UsageError) return { code: err, stderr };
    throw err;
  } finally {
    vi.restoreAllMocks();
  }
}

/** Half a sample above the measured accuracy: just too much. */
const above = (p: { robust: number; samples: number }): string => ((p.robust + 0.5) / p.samples).toFixed(4);

describe('brink gate exit codes (CLI)', () => {
  it('0 when the thresholds hold, 1 naming the one that fails, 2 for bad usage', async () => {
    const pgd = point.get('pgd 0.1')!;
    const [pass, fail, usage] = await Promise.all([
      // A threshold equal to the measured accuracy holds (≥); the second one is trivially met.
      cli(['gate', '--run', run, '--min-accuracy', `${pgd.robust / pgd.samples}@0.1`, '--min-accuracy', '0@0.05', '--attack', 'pgd', '--norm', 'linf']),
      cli(['gate', '--run', run, '--min-accuracy', '0@0.05', '--min-accuracy', `${above(pgd)}@0.1`, '--attack', 'pgd']),
      cli(['gate', '--run', run, '--min-accuracy', '0.5']),
    ]);
    expect(pass.code).toBe(0);
    expect(pass.stdout).toMatch(/gate passed/);
    expect(fail.code).toBe(1);
    expect(oneLine(fail.stderr)).toBe(`brink: gate failed: ${above(pgd)}@0.1: pgd linf eps=0.1: robust accuracy ${pgd.accuracy} is below the required ${Number(above(pgd))} (${pgd.robust} of ${pgd.samples} samples robust)`);
    expect(usage.code).toBe(2);
    expect(oneLine(usage.stderr)).toMatch(/^brink: --min-accuracy: "0\.5" is not <accuracy>@<eps>/);
  });
});

describe('brink gate thresholds', () => {
  it('without --attack, every search must hold: the first one below the threshold is named', async () => {
    const fgsm = point.get('fgsm 0.05')!;
    const pgd = point.get('pgd 0.05')!;
    const threshold = above(fgsm.robust <= pgd.robust ? fgsm : pgd);
    // The run's order is fgsm, pgd: the first search whose accuracy is below the threshold fails the gate.
    const expected = fgsm.robust / fgsm.samples < Number(threshold) ? 'fgsm' : 'pgd';
    const r = await gateHere('--min-accuracy', `${threshold}@0.05`);
    expect(r.code).toBe(1);
    expect(oneLine(r.stderr)).toContain(`: ${expected} linf eps=0.05: `);
    expect((await gateHere('--min-accuracy', `${100 * Math.min(fgsm.robust, pgd.robust) / 20}%@0.05`)).code).toBe(0);
  });

  it('--lower-bound compares the Wilson lower bound, which is below the measured accuracy', async () => {
    const pgd = point.get('pgd 0.1')!;
    expect((await gateHere('--min-accuracy', `${pgd.robust / pgd.samples}@0.1`, '--attack', 'pgd')).code).toBe(0);
    const r = await gateHere('--min-accuracy', `${pgd.robust / pgd.samples}@0.1`, '--attack', 'pgd', '--lower-bound');
    expect(r.code).toBe(1);
    expect(oneLine(r.stderr)).toContain(`Wilson 95 % lower bound ${pgd.low}`);
  });

  it('takes a run budget just above the required one (never below)', async () => {
    const fgsm = point.get('fgsm 0.05')!;
    // 0.05 lies 5e-5 above 0.04995: a larger budget can only lower robust accuracy (nested budgets), so it may stand in.
    expect((await gateHere('--min-accuracy', `${fgsm.robust / fgsm.samples}@0.04995`, '--attack', 'fgsm')).code).toBe(0);
    const below = await gateHere('--min-accuracy', `${fgsm.robust / fgsm.samples}@0.05005`, '--attack', 'fgsm');
    expect(below.code).toBe(1);
    expect(oneLine(below.stderr)).toMatch(/no fgsm point at eps=0\.05005/);
  });

  it('fails (1) when the run lacks the budget, search or norm asked for', async () => {
    const cases: [string[], RegExp][] = [
      [['--min-accuracy', '0.1@0.07'], /no fgsm point at eps=0\.07 .*budgets: 0, 0\.05, 0\.1/],
      [['--min-accuracy', '0.1@0.1', '--attack', 'apgd-ce'], /no apgd-ce point/],
      [['--min-accuracy', '0.1@0.1', '--norm', 'l2'], /thresholds are for l2 but the run used linf/],
    ];
    for (const [args, message] of cases) {
      const r = await gateHere(...args);
      expect(r.code).toBe(1);
      expect(oneLine(r.stderr)).toMatch(message);
    }
  });

  it('rejects bad usage (exit 2 in the CLI) with a message naming the problem', async () => {
    const cases: [string[], RegExp][] = [
      [[], /missing --min-accuracy/],
      [['--min-accuracy', '1.5@0.1'], /above 1/],
      [['--min-accuracy', '0.5@x'], /budget: "x" is not a number/],
      [['--min-accuracy', '0.5@0.1', '--attack', 'nope'], /unknown search "nope"/],
      [['--min-accuracy', '0.5@0.1', '--norm', 'l7'], /--norm/],
      [['--min-accuracy', '0.5@0.1', '--run', '/nonexistent/run'], /given twice/],
    ];
    for (const [args, message] of cases) {
      const r = await gateHere(...args);
      expect(r.code).toBeInstanceOf(UsageError);
      expect((r.code as UsageError).message).toMatch(message);
    }
    const missing = await gateCommand(parseArgs(['--run', '/nonexistent/run', '--min-accuracy', '0.5@0.1'], GATE_FLAGS)).catch((e: unknown) => e);
    expect(missing).toBeInstanceOf(UsageError);
    expect((missing as UsageError).message).toMatch(/\/nonexistent\/run: no such file or folder/);
  });
});
