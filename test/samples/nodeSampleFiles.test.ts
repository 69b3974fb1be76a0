/**
 * readSampleFiles (CLI): folders and manifests read from a temporary directory, then built into
 * sample sets with the Node decoder. Expected names and labels are the files written here.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdir, mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { readSampleFiles } from '../../src/cli/nodeSampleFiles.ts';
import { decodeImageNode } from '../../src/cli/decodeImageNode.ts';
import { buildSampleSet } from '../../src/core/samples/buildSampleSet.ts';
import { levelPng } from './fixtures.ts';

let dir = '';

async function put(relative: string, content: Uint8Array | string): Promise<void> {
  const full = path.join(dir, ...relative.split('/'));
  await mkdir(path.dirname(full), { recursive: true });
  await writeFile(full, content);
}

beforeAll(async () => {
  dir = await mkdtemp(path.join(tmpdir(), 'brink-samples-'));
  await put('folders/cat/1.png', levelPng(10));
  await put('folders/dog/deep name/../2.PNG', levelPng(20));
  await put('folders/.git/x.png', levelPng(99));
  await put('folders/cat/.DS_Store', 'x');
  await put('folders/notes.md', '# ignored');
  await put('folders/classes.txt', 'dog\ncat\n');
  await put('set/list.csv', 'file,label\nimg/b.png,dog\n../shared/a.png,cat\n');
  await put('set/classes.txt', 'cat\ndog\n');
  await put('set/img/b.png', levelPng(30));
  await put('set/img/unlisted.png', levelPng(40));
  await put('shared/a.png', levelPng(50));
  await put('broken/list.csv', 'img/b.png,0\nimg/gone.png,1\n');
  await put('broken/img/b.png', levelPng(30));
});

afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

describe('readSampleFiles', () => {
  it('walks a folder: sorted names relative to it, hidden and unrelated files skipped', async () => {
    const files = await readSampleFiles(path.join(dir, 'folders'));
    expect(files.map((f) => f.name)).toEqual(['cat/1.png', 'classes.txt', 'dog/2.PNG']);
    const built = await buildSampleSet(files, { height: 2, width: 2, channels: 1, decoder: decodeImageNode });
    expect(built.set.classNames).toEqual(['dog', 'cat']);
    expect(Array.from(built.set.labels)).toEqual([1, 0]);
  });

  it('reads a manifest, exactly the files it lists and the class-names file beside it', async () => {
    const files = await readSampleFiles(path.join(dir, 'set', 'list.csv'));
    expect(files.map((f) => f.name)).toEqual(['list.csv', 'img/b.png', '../shared/a.png', 'classes.txt']);
    const built = await buildSampleSet(files, { height: 2, width: 2, channels: 1, decoder: decodeImageNode });
    expect(built.source).toBe('manifest');
    expect(built.set.files).toEqual(['img/b.png', '../shared/a.png']);
    expect(Array.from(built.set.labels)).toEqual([1, 0]);
    expect(Math.round(built.set.pixels[4]! * 255)).toBe(50);
  });

  it('names the missing path', async () => {
    const missing = path.join(dir, 'nowhere');
    await expect(readSampleFiles(missing)).rejects.toThrow(`sample path not found: ${missing}`);
    await expect(readSampleFiles(path.join(dir, 'broken', 'list.csv'))).rejects.toThrow(
      `list.csv row 2: missing file img/gone.png (${path.join(dir, 'broken', 'img', 'gone.png')})`,
    );
    await expect(readSampleFiles(path.join(dir, 'shared', 'a.png'))).rejects.toThrow('samples must be a folder or a .csv manifest');
  });
});
