/**
 * Folder-per-class sample sets. Every image is a 2×2 gray PNG (pngjs) whose gray level
 * identifies it, so order and labels can be read back from the decoded pixels.
 */
import { describe, expect, it } from 'vitest';
import { buildSampleSet } from '../../src/core/samples/buildSampleSet.ts';
import { decodeImageNode } from '../../src/cli/decodeImageNode.ts';
import type { NamedBytes } from '../../src/core/types.ts';
import { levelPng, textFile } from './fixtures.ts';

const options = { height: 2, width: 2, channels: 1 as const, decoder: decodeImageNode };

function levels(pixels: Float32Array, count: number): number[] {
  return Array.from({ length: count }, (_, i) => Math.round(pixels[i * 4]! * 255));
}

function image(name: string, level: number): NamedBytes {
  return { name, bytes: levelPng(level) };
}

const pets: NamedBytes[] = [
  image('samples/dog/1.png', 30),
  image('samples/cat/2.JPG.png', 20),
  image('samples/cat/1.png', 10),
  textFile('samples/README.md', 'about'),
  textFile('samples/.DS_Store', 'x'),
  textFile('samples/cat/notes.txt', 'x'),
  image('samples/dog/._1.png', 99),
  image('__MACOSX/samples/dog/1.png', 99),
];

describe('folder-per-class sample sets', () => {
  it('numbers classes by sorted folder name, sorts samples by path, ignores other and hidden files', async () => {
    // Expected: the layout above — cat < dog; paths sorted by code unit; levels 10, 20, 30.
    const built = await buildSampleSet(pets, options);
    expect(built.source).toBe('folders');
    expect(built.set.classNames).toEqual(['cat', 'dog']);
    expect(built.set.files).toEqual(['samples/cat/1.png', 'samples/cat/2.JPG.png', 'samples/dog/1.png']);
    expect(Array.from(built.set.labels)).toEqual([0, 0, 1]);
    expect(levels(built.set.pixels, 3)).toEqual([10, 20, 30]);
    expect(built.classMapping).toEqual([
      { name: 'cat', index: 0, count: 2 },
      { name: 'dog', index: 1, count: 1 },
    ]);
  });

  it('gives the same set whatever order the files arrive in', async () => {
    // Expected: identical output for the reversed input (deterministic order).
    const a = await buildSampleSet(pets, options);
    const b = await buildSampleSet([...pets].reverse(), options);
    expect(b.set.files).toEqual(a.set.files);
    expect(Array.from(b.set.pixels)).toEqual(Array.from(a.set.pixels));
  });

  it('works without a common root and with upper-case .PNG/.JPG/.JPEG names', async () => {
    const files = [image('cat/A.PNG', 1), image('dog/B.Png', 2), image('eel/c.png', 3)];
    const built = await buildSampleSet(files, options);
    expect(built.set.classNames).toEqual(['cat', 'dog', 'eel']);
    expect(Array.from(built.set.labels)).toEqual([0, 1, 2]);
  });

  it('accepts a single class folder', async () => {
    const built = await buildSampleSet([image('data/samples/cat/1.png', 5), image('data/samples/cat/2.png', 6)], options);
    expect(built.set.classNames).toEqual(['cat']);
    expect(Array.from(built.set.labels)).toEqual([0, 0]);
  });

  it('maps folders to given class names, allowing classes without samples', async () => {
    // Expected: dog is index 0 and cat index 1 because the given names say so.
    const built = await buildSampleSet(pets, { ...options, classNames: ['dog', 'cat', 'bird'] });
    expect(Array.from(built.set.labels)).toEqual([1, 1, 0]);
    expect(built.classMapping.map((c) => c.count)).toEqual([1, 2, 0]);
  });

  it('reads a class-names file at the root of the class folders', async () => {
    const built = await buildSampleSet([...pets, textFile('samples/classes.txt', 'dog\ncat\n')], options);
    expect(built.set.classNames).toEqual(['dog', 'cat']);
    expect(Array.from(built.set.labels)).toEqual([1, 1, 0]);
  });

  it('lets given class names win over a class-names file', async () => {
    const built = await buildSampleSet([...pets, textFile('samples/classes.txt', 'dog\ncat\n')], { ...options, classNames: ['cat', 'dog'] });
    expect(Array.from(built.set.labels)).toEqual([0, 0, 1]);
  });

  it('takes integer folder names as class indices, with or without class names', async () => {
    // Expected: folder "7" is class 7 (not the 2nd sorted folder), so a subset of digits keeps its labels.
    const digits = [image('mnist/7/a.png', 70), image('mnist/3/a.png', 30), image('mnist/10/a.png', 100)];
    const plain = await buildSampleSet(digits, options);
    expect(Array.from(plain.set.labels)).toEqual([10, 3, 7]);
    expect(plain.set.classNames).toHaveLength(11);
    const named = await buildSampleSet(digits, { ...options, classNames: Array.from({ length: 11 }, (_, i) => `digit ${i}`) });
    expect(Array.from(named.set.labels)).toEqual([10, 3, 7]);
  });
});

describe('folder errors are one line and name the problem', () => {
  it('no images found', async () => {
    await expect(buildSampleSet([textFile('a/readme.txt', 'x')], options)).rejects.toThrow(/^no images found: expected \.png\/\.jpg\/\.jpeg files/);
    await expect(buildSampleSet([], options)).rejects.toThrow(/^no images found/);
  });
  it('images at the top level', async () => {
    await expect(buildSampleSet([image('1.png', 1), image('2.png', 2)], options)).rejects.toThrow(/^no class folders: 1\.png sits at the top level/);
  });
  it('mixed folder layout: an image beside the class folders', async () => {
    const files = [image('samples/cat/1.png', 1), image('samples/2.png', 2)];
    await expect(buildSampleSet(files, options)).rejects.toThrow(
      'mixed folder layout: expected every image directly inside one class folder under samples, but found samples/2.png and samples/cat/1.png',
    );
  });
  it('mixed folder layout: images nested below class folders or without a common root', async () => {
    await expect(buildSampleSet([image('cat/1.png', 1), image('dog/x/2.png', 2)], options)).rejects.toThrow(/^mixed folder layout/);
    await expect(buildSampleSet([image('a/cat/1.png', 1), image('b/dog/2.png', 2)], options)).rejects.toThrow(
      /^mixed folder layout: .* under the top level/,
    );
  });
  it('empty class', async () => {
    const files = [...pets, textFile('samples/eel/readme.txt', 'no images yet')];
    await expect(buildSampleSet(files, options)).rejects.toThrow('empty class: the folder samples/eel holds no .png/.jpg/.jpeg images');
  });
  it('unknown class name', async () => {
    await expect(buildSampleSet(pets, { ...options, classNames: ['cat', 'bird'] })).rejects.toThrow(
      'folder samples/dog: unknown class name "dog" (known: "cat", "bird")',
    );
  });
  it('integer folder out of range of the given names', async () => {
    await expect(buildSampleSet([image('d/0/a.png', 1), image('d/12/a.png', 1)], { ...options, classNames: ['a', 'b'] })).rejects.toThrow(
      'folder d/12: label 12 is out of range (allowed 0–1)',
    );
  });
  it('unreadable image names the file and includes the decoder reason', async () => {
    const files = [...pets, { name: 'samples/dog/2.png', bytes: new Uint8Array([0x47, 0x49, 0x46, 0x38]) }];
    await expect(buildSampleSet(files, options)).rejects.toThrow(
      'unreadable image samples/dog/2.png: not a PNG or JPEG file (first bytes: 47 49 46 38)',
    );
  });
  it('two class-names files in one folder', async () => {
    const files = [...pets, textFile('samples/classes.txt', 'cat\ndog\n'), textFile('samples/labels.txt', 'dog\ncat\n')];
    await expect(buildSampleSet(files, options)).rejects.toThrow(
      'several class-names files found (samples/classes.txt, samples/labels.txt); keep one',
    );
  });
  it('bad options', async () => {
    await expect(buildSampleSet(pets, { ...options, height: 0 })).rejects.toThrow('sample size must be positive integers, got 0×2');
    await expect(buildSampleSet(pets, { ...options, classNames: ['cat', 'dog', 'cat'] })).rejects.toThrow(
      'class name "cat" appears twice in the class-names list',
    );
  });
});
