/**
 * curve.csv and samples.csv from a real sweep (FGSM and PGD on MNIST digits from the `mnist` package),
 * read back with an RFC 4180 reader and compared with the sweep result they were written from.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { useBackend } from '../helpers/backend.ts';
import { runSweep } from '../../src/core/sweep/runSweep.ts';
import type { SweepConfig, SweepResult } from '../../src/core/sweep/types.ts';
import { curveCsv, samplesCsv } from '../../src/core/export/curveCsv.ts';
import { csvField } from '../../src/core/export/csvFormat.ts';
import { wilsonInterval } from '../../src/core/stats/wilson.ts';
import { meansPlusRandomReluModel, mnistSampleSet } from '../sweep/fixtures.ts';

const samples = mnistSampleSet(3, 40);
const CONFIG: SweepConfig = {
  attacks: [
    { id: 'fgsm', options: {} },
    { id: 'pgd', options: { steps: 3 } },
  ],
  norm: 'linf',
  eps: [8 / 255, 0, 2 / 255],
  epsLabels: ['8/255', '0', '0.00784'],
  seed: 1,
  batchSize: 8,
};

let result: SweepResult;
let unlabelled: SweepResult;
beforeAll(async () => {
  await useBackend('wasm');
  const model = meansPlusRandomReluModel(3);
  result = await runSweep({ logits: model.logits, samples, config: CONFIG });
  const { epsLabels: _drop, ...rest } = CONFIG;
  unlabelled = await runSweep({ logits: model.logits, samples, config: rest });
  model.dispose();
});

describe('curve.csv', () => {
  it('has the exact header and one row per curve point, budgets spelled as the user wrote them', () => {
    const rows = parseCsv(curveCsv(result));
    expect(rows[0]).toEqual(['attack', 'norm', 'eps', 'samples', 'clean_correct', 'robust', 'robust_accuracy', 'ci95_low', 'ci95_high']);
    expect(rows.slice(1).map((r) => `${r[0]} ${r[2]}`)).toEqual(['fgsm 0', 'fgsm 0.00784', 'fgsm 8/255', 'pgd 0', 'pgd 0.00784', 'pgd 8/255']);
  });

  it('prints counts, six-decimal accuracies and the Wilson interval of each point', () => {
    // Wilson 1927 interval of robust / samples (stats/wilson.ts, itself checked against a reference library).
    const rows = parseCsv(curveCsv(result)).slice(1);
    rows.forEach((r, i) => {
      const p = result.curve[i]!;
      expect(r.slice(0, 2)).toEqual([p.attack, 'linf']);
      expect(r.slice(3, 6).map(Number)).toEqual([30, result.cleanCorrect, p.robust]);
      const ci = wilsonInterval(p.robust, 30);
      expect(r.slice(6)).toEqual([(p.robust / 30).toFixed(6), ci.low.toFixed(6), ci.high.toFixed(6)]);
      expect(r[6]).toMatch(/^\d\.\d{6}$/);
    });
  });

  it('without labels prints budgets in a form that reads back to the same number', () => {
    // ECMAScript Number::toString gives the shortest decimal that round-trips.
    const eps = parseCsv(curveCsv(unlabelled)).slice(1).map((r) => r[2]!);
    expect(eps.slice(0, 3)).toEqual(['0', String(2 / 255), String(8 / 255)]);
    expect(eps.slice(0, 3).map(Number)).toEqual([0, 2 / 255, 8 / 255]);
  });
});

describe('samples.csv', () => {
  it('has the exact header and one row per sample × attack × budget matching the records', () => {
    const rows = parseCsv(samplesCsv(result));
    expect(rows[0]).toEqual(['file', 'label', 'clean_pred', 'clean_conf', 'attack', 'norm', 'eps', 'adv_pred', 'adv_conf', 'linf', 'l2', 'flipped']);
    expect(rows.length - 1).toBe(30 * 2 * 3);
    let n = 1;
    for (const r of result.records) {
      for (const o of r.outcomes) {
        const row = rows[n++]!;
        expect(row[0]).toBe(r.file); // file names hold a comma and quotes: they survive the round trip
        expect(row.slice(1, 3).map(Number)).toEqual([r.label, r.cleanPred]);
        expect(Math.abs(Number(row[3]) - r.cleanConf)).toBeLessThanOrEqual(5e-7);
        expect(row.slice(4, 6)).toEqual([o.attack, 'linf']);
        expect(Number(row[7])).toBe(o.advPred);
        expect([row[8], row[9], row[10]]).toEqual([o.advConf.toFixed(6), o.linf.toFixed(6), o.l2.toFixed(6)]);
        expect(row[11]).toBe(o.flipped ? '1' : '0');
      }
    }
  });

  it('quotes fields by RFC 4180: commas, quotes and line breaks', () => {
    // RFC 4180 §2 rules 6 and 7: such fields are enclosed in double quotes, inner quotes doubled.
    expect(csvField('plain.png')).toBe('plain.png');
    expect(csvField('a,b.png')).toBe('"a,b.png"');
    expect(csvField('say "hi".png')).toBe('"say ""hi"".png"');
    expect(csvField('two\nlines')).toBe('"two\nlines"');
    expect(samplesCsv(result).split('\n')[1]).toMatch(/^"digits\/0\/img 0, ""mnist"".png",0,/);
  });
});

/** RFC 4180 reader (quoted fields, doubled quotes, CRLF or LF line ends), for reading the exports back. */
function parseCsv(text: string): string[][] {
  const rows: string[][] = [];
  let row: string[] = [];
  let field = '';
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i]!;
    if (quoted) {
      if (ch === '"' && text[i + 1] === '"') {
        field += '"';
        i++;
      } else if (ch === '"') quoted = false;
      else field += ch;
    } else if (ch === '"') quoted = true;
    else if (ch === ',') {
      row.push(field);
      field = '';
    } else if (ch === '\n' || ch === '\r') {
      if (ch === '\r' && text[i + 1] === '\n') i++;
      row.push(field);
      rows.push(row);
      row = [];
      field = '';
    } else field += ch;
  }
  if (field !== '' || row.length > 0) rows.push([...row, field]);
  return rows;
}
