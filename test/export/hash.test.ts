/** SHA-256 helpers checked against the published test vectors and Node's own crypto module. */
import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { fileListing, hashFileSet, hashFiles, sha256Hex } from '../../src/core/export/hash.ts';
import { createRng } from '../../src/core/random/rng.ts';

const nodeSha256 = (bytes: Uint8Array | string): string => createHash('sha256').update(bytes).digest('hex');
const text = (s: string): Uint8Array => new TextEncoder().encode(s);

describe('sha256Hex', () => {
  it('matches the FIPS 180-2 example "abc" and the empty message', async () => {
    // FIPS 180-2, Appendix B.1 (from memory; also checked against node:crypto below).
    expect(await sha256Hex(text('abc'))).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    expect(await sha256Hex(new Uint8Array(0))).toBe(nodeSha256(''));
  });

  it('matches node:crypto on random bytes of several lengths, including a view into a larger buffer', async () => {
    // Reference: Node's OpenSSL-backed createHash('sha256').
    const rng = createRng(5);
    for (const length of [1, 55, 56, 64, 1000, 100_000]) {
      const bytes = Uint8Array.from(rng.uniformArray(length, 0, 256), Math.floor);
      expect(await sha256Hex(bytes)).toBe(nodeSha256(bytes));
      const view = bytes.subarray(1, length);
      expect(await sha256Hex(view)).toBe(nodeSha256(view));
    }
  });
});

describe('hashFileSet', () => {
  const files = [
    { name: 'weights.bin', bytes: text('\u0001\u0002\u0003') },
    { name: 'model.json', bytes: text('{"format":"layers-model"}') },
    { name: 'a/b c.png', bytes: text('png bytes') },
  ];

  it('is the SHA-256 of a sha256sum-style listing sorted by name', async () => {
    // Reference: node:crypto over the listing built by hand ("<hex>  <name>\n" lines, GNU coreutils sha256sum layout).
    const sorted = [...files].sort((a, b) => (a.name < b.name ? -1 : 1));
    const listing = sorted.map((f) => `${nodeSha256(f.bytes)}  ${f.name}\n`).join('');
    expect(fileListing(await hashFiles(files))).toBe(listing);
    expect(await hashFileSet(files)).toBe(nodeSha256(listing));
  });

  it('does not depend on the order of the files but on every name and byte', async () => {
    const base = await hashFileSet(files);
    expect(await hashFileSet([...files].reverse())).toBe(base);
    expect(await hashFileSet([{ ...files[0]!, name: 'weights2.bin' }, files[1]!, files[2]!])).not.toBe(base);
    expect(await hashFileSet([{ ...files[0]!, bytes: text('\u0001\u0002\u0004') }, files[1]!, files[2]!])).not.toBe(base);
  });
});
