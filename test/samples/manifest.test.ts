/**
 * CSV manifests and class-names files. Every image is a 2×2 gray PNG (pngjs) whose gray level
 * identifies it, so order and labels can be read back from the decoded pixels.
 */
import { describe, expect, it } from 'vitest';
import { parseCsv } from '../../src/core/samples/csv.ts';
import { buildSampleSet, parseClassNames } from '../../src/core/samples/buildSampleSet.ts';
import { decodeImageNode } from '../../src/cli/decodeImageNode.ts';
import type { NamedBytes } from '../../src/core/types.ts';
import { levelPng, textFile } from './fixtures.ts';

const options = { height: 2, width: 2, channels: 1 as const, decoder: decodeImageNode };

/** Gray level of each sample's first pixel, back in 0–255. */
function levels(pixels: Float32Array, count: number): number[] {
  return Array.from({ length: count }, (_, i) => Math.round(pixels[i * 4]! * 255));
}

const images: NamedBytes[] = [
  { name: 'data/img/a.png', bytes: levelPng(10) },
  { name: 'data/img/b, "quoted".png', bytes: levelPng(20) },
  { name: 'data/img/c.PNG', bytes: levelPng(30) },
  { name: 'shared/d.jpg.png', bytes: levelPng(40) },
];

describe('CSV reader', () => {
  it('reads quoted fields, doubled quotes, embedded newlines and CRLF as RFC 4180 defines them', () => {
    // Source: RFC 4180 §2 (fields with commas, quotes or line breaks are enclosed in double quotes; "" is a quote).
    const text = 'a,b\r\n"x, y","say ""hi"""\n"multi\nline",z\n\n  c , d ';
    expect(parseCsv(text, 't.csv')).toEqual([
      { row: 1, fields: ['a', 'b'] },
      { row: 2, fields: ['x, y', 'say "hi"'] },
      { row: 3, fields: ['multi\nline', 'z'] },
      { row: 6, fields: ['c', 'd'] },
    ]);
  });
  it('refuses an unclosed quote and text after a closing quote, naming the row', () => {
    // Source: RFC 4180 §2 rules 5–7 (a quoted field runs to its closing quote, then a comma or line end).
    expect(() => parseCsv('a,b\n"open,1\n', 'm.csv')).toThrow('m.csv row 2: a quoted field is not closed');
    expect(() => parseCsv('"a"x,1', 'm.csv')).toThrow('m.csv row 1: unexpected text after a closing quote');
  });
});

describe('manifest sample sets', () => {
  it('keeps manifest order, resolves paths against the manifest folder and reads index labels', async () => {
    // Expected values: the rows written below (labels are class indices into the given names).
    const manifest = textFile(
      'data/list.csv',
      'file,label\nimg/c.PNG,2\n"img/b, ""quoted"".png",0\n./img/a.png, 1 \n../shared/d.jpg.png,2\n',
    );
    const built = await buildSampleSet([...images, manifest], { ...options, classNames: ['zero', 'one', 'two'] });
    expect(built.source).toBe('manifest');
    expect(built.set.files).toEqual(['data/img/c.PNG', 'data/img/b, "quoted".png', 'data/img/a.png', 'shared/d.jpg.png']);
    expect(Array.from(built.set.labels)).toEqual([2, 0, 1, 2]);
    expect(levels(built.set.pixels, 4)).toEqual([30, 20, 10, 40]);
    expect(built.classMapping).toEqual([
      { name: 'zero', index: 0, count: 1 },
      { name: 'one', index: 1, count: 1 },
      { name: 'two', index: 2, count: 2 },
    ]);
  });

  it('reads name labels through a class-names file beside the manifest, without a header row', async () => {
    // Expected values: classes.txt below lists dog as class 0 and cat as class 1.
    const files = [...images, textFile('data/list.csv', 'img/a.png,cat\nimg/c.PNG,dog\n'), textFile('data/classes.txt', 'dog\ncat\n\n')];
    const built = await buildSampleSet(files, options);
    expect(Array.from(built.set.labels)).toEqual([1, 0]);
    expect(built.set.classNames).toEqual(['dog', 'cat']);
    expect(levels(built.set.pixels, 2)).toEqual([10, 30]);
  });

  it('numbers name labels in sorted order and index labels as themselves when no names are given', async () => {
    // Expected values: sorted("zebra","ant") = ["ant","zebra"]; indices 3 and 1 give names "0"…"3".
    const byName = await buildSampleSet([...images, textFile('data/m.csv', 'img/a.png,zebra\nimg/c.PNG,ant\n')], options);
    expect(byName.set.classNames).toEqual(['ant', 'zebra']);
    expect(Array.from(byName.set.labels)).toEqual([1, 0]);
    const byIndex = await buildSampleSet([...images, textFile('data/m.csv', 'img/a.png,3\nimg/c.PNG,1\n')], options);
    expect(byIndex.set.classNames).toEqual(['0', '1', '2', '3']);
    expect(Array.from(byIndex.set.labels)).toEqual([3, 1]);
    expect(byIndex.classMapping.map((c) => c.count)).toEqual([0, 1, 0, 1]);
  });

  it('ignores files the manifest does not list', async () => {
    // Expected: only the one listed row becomes a sample.
    const built = await buildSampleSet([...images, textFile('data/m.csv', 'img/a.png,0\n'), textFile('data/notes.md', '#')], options);
    expect(built.set.files).toEqual(['data/img/a.png']);
  });
});

describe('manifest errors are one line and name the problem', () => {
  const names = { ...options, classNames: ['zero', 'one', 'two'] };
  const cases: [string, string, RegExp][] = [
    ['file,label\nimg/a.png,0\nimg/missing.png,1\n', 'missing file', /^data\/m\.csv row 3: missing file img\/missing\.png$/],
    ['img/a.png,7\n', 'label out of range', /^data\/m\.csv row 1: label 7 is out of range \(allowed 0–2\)$/],
    ['img/a.png,-1\n', 'negative label', /row 1: label -1 is out of range \(allowed 0–2\)/],
    ['img/a.png,horse\n', 'unknown class name', /^data\/m\.csv row 1: unknown class name "horse" \(known: "zero", "one", "two"\)$/],
    ['img/a.png,0,extra\n', 'field count', /row 1: expected 2 fields \(file,label\), found 3/],
    ['img/a.png,0\n./img/a.png,1\n', 'duplicate', /row 2: \.\/img\/a\.png is already listed in row 1/],
    ['/abs/a.png,0\n', 'absolute path', /row 1: \/abs\/a\.png is an absolute path/],
    ['file,label\n', 'no rows', /^no images found: the manifest data\/m\.csv lists no rows$/],
    ['img/a.png,\n', 'empty label', /row 1: the label field is empty/],
  ];
  for (const [text, what, message] of cases) {
    it(what, async () => {
      // Expected: the spec's error list (each message names file, row and value).
      await expect(buildSampleSet([...images, textFile('data/m.csv', text)], names)).rejects.toThrow(message);
    });
  }

  it('a listed file that is not an image', async () => {
    const files = [...images, textFile('data/notes.txt', 'x'), textFile('data/m.csv', 'notes.txt,0\n')];
    await expect(buildSampleSet(files, names)).rejects.toThrow('data/m.csv row 1: notes.txt is not a .png/.jpg/.jpeg image');
  });
  it('negative index without class names', async () => {
    await expect(buildSampleSet([...images, textFile('data/m.csv', 'img/a.png,-2\n')], options)).rejects.toThrow(
      'data/m.csv row 1: label -2 is out of range (must be ≥ 0)',
    );
  });
  it('indices and names mixed without class names', async () => {
    await expect(buildSampleSet([...images, textFile('data/m.csv', 'img/a.png,3\nimg/c.PNG,cat\n')], options)).rejects.toThrow(
      /labels mix class indices \(data\/m\.csv row 1: 3\) and class names \(data\/m\.csv row 2: cat\)/,
    );
  });
  it('two manifests', async () => {
    const files = [...images, textFile('data/m.csv', 'img/a.png,0\n'), textFile('n.csv', 'data/img/a.png,0\n')];
    await expect(buildSampleSet(files, options)).rejects.toThrow('several .csv manifests found (data/m.csv, n.csv)');
  });
  it('an unreadable listed image names the file and the decoder reason', async () => {
    const broken = { name: 'data/img/bad.png', bytes: new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 1, 2, 3]) };
    const files = [...images, broken, textFile('data/m.csv', 'img/a.png,0\nimg/bad.png,1\n')];
    await expect(buildSampleSet(files, names)).rejects.toThrow(/^unreadable image data\/img\/bad\.png: \S.*$/);
  });
});

describe('parseClassNames', () => {
  it('trims names, accepts CRLF and a byte-order mark, drops empty trailing lines', () => {
    // Expected: the lines written below, in order.
    expect(parseClassNames(textFile('c.txt', '\uFEFF cat \r\ndog\r\n\r\n\n'))).toEqual(['cat', 'dog']);
  });
  it('rejects duplicates, empty inner lines and empty files', () => {
    expect(() => parseClassNames(textFile('c.txt', 'cat\ndog\ncat\n'))).toThrow('c.txt: class name "cat" appears twice (lines 1 and 3)');
    expect(() => parseClassNames(textFile('c.txt', 'cat\n\ndog\n'))).toThrow('c.txt line 2 is empty');
    expect(() => parseClassNames(textFile('c.txt', '\n \n'))).toThrow('c.txt lists no class names');
  });
});
