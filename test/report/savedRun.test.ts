/**
 * The saved run the sweep CLI writes (run.brink.json) loads back and gives the same curve and
 * per-sample records as the CSV files written beside it, the same run record as run.json, and
 * thumbnails that match the fixture's own image files; broken files are refused with a message
 * naming the problem.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { PNG } from 'pngjs';
import { loadRun, SavedRunError } from '../../src/core/savedRun/loadRun.ts';
import { serializeSavedRun, sweepResultOf } from '../../src/core/savedRun/saveRun.ts';
import { SAVED_RUN_FILE, type SavedRun } from '../../src/core/savedRun/types.ts';
import { curveCsv, samplesCsv } from '../../src/core/export/curveCsv.ts';
import { fromBase64 } from '../../src/core/savedRun/base64.ts';
import { SAMPLES, csvRows, sweepFixture } from './cliRun.ts';

let dir = '';
let text = '';
let saved: SavedRun;

beforeAll(async () => {
  dir = await sweepFixture(['--steps', '5', '--seed', '3']);
  text = readFileSync(path.join(dir, SAVED_RUN_FILE), 'utf8');
  saved = loadRun(text);
});

const decode = (base64: string): PNG => PNG.sync.read(Buffer.from(fromBase64(base64)));

describe('saved run written by the sweep CLI', () => {
  it('gives back exactly the curve.csv and samples.csv written beside it', () => {
    // Reference: the CSV files the same sweep wrote (issue 2's export formats).
    const result = sweepResultOf(saved);
    expect(curveCsv(result)).toBe(readFileSync(path.join(dir, 'curve.csv'), 'utf8'));
    expect(samplesCsv(result)).toBe(readFileSync(path.join(dir, 'samples.csv'), 'utf8'));
  });

  it('holds the same run record as run.json, and reads back to the same bytes', () => {
    expect(saved.run).toEqual(JSON.parse(readFileSync(path.join(dir, 'run.json'), 'utf8')));
    expect(saved.origin).toBe('cli');
    expect(serializeSavedRun(saved)).toBe(text);
  });

  it('stores thumbnails of flips at their flipping budget, matching the fixture images', () => {
    expect(saved.flips.length).toBeGreaterThan(0);
    const rows = csvRows(path.join(dir, 'samples.csv'));
    // 20 samples, 2 per class: below the limits (24 per search, 3 per class), so every flip in samples.csv has a thumbnail.
    const flippedPairs = new Set(rows.filter((r) => r[11] === '1').map((r) => `${r[4]} ${r[0]}`));
    expect(new Set(saved.flips.map((f) => `${f.attack} ${f.file}`))).toEqual(flippedPairs);
    for (const f of saved.flips) {
      // samples.csv: flipped at the thumbnail's budget, and not at any smaller one (smallest flipping budget).
      const mine = rows.filter((r) => r[0] === f.file && r[4] === f.attack).map((r) => ({ eps: Number(r[6]), flipped: r[11] === '1', advPred: Number(r[7]) }));
      expect(mine.find((r) => r.eps === f.eps)).toMatchObject({ flipped: true, advPred: f.advPred });
      expect(mine.filter((r) => r.eps < f.eps && r.flipped)).toEqual([]);
      // The clean thumbnail is the fixture PNG itself (28×28 greyscale, 8-bit: the [0,1] pixels round back exactly).
      const original = decode(f.originalPng);
      const source = PNG.sync.read(readFileSync(path.join(SAMPLES, f.file)));
      expect([original.width, original.height]).toEqual([source.width, source.height]);
      expect(Buffer.compare(original.data, source.data)).toBe(0);
      // The adversarial thumbnail stays within the L∞ budget, up to half a grey level of rounding.
      const adversarial = decode(f.adversarialPng);
      let linf = 0;
      for (let i = 0; i < adversarial.data.length; i += 4) linf = Math.max(linf, Math.abs(adversarial.data[i]! - original.data[i]!));
      expect(linf).toBeLessThanOrEqual(f.eps * 255 + 0.5 + 1e-9);
    }
  });
});

describe('loadRun refuses broken files with a message naming the problem', () => {
  // JSON.parse's own result type, so the cases can reach into the parsed file freely.
  type Parsed = ReturnType<typeof JSON.parse>;
  const edited = (edit: (o: Parsed) => void): string => {
    const o: Parsed = JSON.parse(text);
    edit(o);
    return JSON.stringify(o);
  };
  const cases: { what: string; input: () => string; message: RegExp }[] = [
    { what: 'not JSON', input: () => text.slice(0, 100), message: /not JSON/ },
    { what: 'another format', input: () => edited((o) => (o['format'] = 'something-else')), message: /not a Brink saved run.*something-else/ },
    { what: 'run.json instead', input: () => readFileSync(path.join(dir, 'run.json'), 'utf8'), message: /run record \(run\.json\), not a saved run/ },
    { what: 'a newer version', input: () => edited((o) => (o['formatVersion'] = 2)), message: /version 2 is newer/ },
    { what: 'a missing curve count', input: () => edited((o) => delete o['run']['curve'][2]['robust']), message: /run\.curve\[2\]\.robust is missing \(expected a number\)/ },
    { what: 'a missing record list', input: () => edited((o) => delete o['records']), message: /records is missing \(expected a list\)/ },
    { what: 'an unknown search', input: () => edited((o) => (o['run']['config']['attacks'][0]['id'] = 'nope')), message: /run\.config\.attacks\[0\]\.id: unknown search "nope"/ },
    { what: 'records out of step with the curve', input: () => edited((o) => o['records'][0]['outcomes'].pop()), message: /records\[0\]\.outcomes .*6 outcomes/ },
    { what: 'a thumbnail that is not a PNG', input: () => edited((o) => (o['flips'][0]['originalPng'] = 'aGVsbG8=')), message: /flips\[0\]\.originalPng .*base64 PNG/ },
  ];
  for (const c of cases) {
    it(c.what, () => {
      expect(() => loadRun(c.input())).toThrow(SavedRunError);
      expect(() => loadRun(c.input())).toThrow(c.message);
    });
  }
});
