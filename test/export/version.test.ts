import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { BRINK_VERSION } from '../../src/core/version.ts';

describe('BRINK_VERSION', () => {
  it('equals the version in package.json', () => {
    // Source of truth: the package manifest.
    const manifest = JSON.parse(readFileSync('package.json', 'utf8')) as { version: string };
    expect(BRINK_VERSION).toBe(manifest.version);
  });
});
