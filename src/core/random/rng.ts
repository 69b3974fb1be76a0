/**
 * Seeded pseudo-random numbers (xoshiro128**, seeded through splitmix32), so that the same seed
 * gives the same random starts and therefore the same results, byte for byte, on every platform.
 */
export interface Rng {
  /** Uniform in [0, 1). */
  next(): number;
  /** Standard normal (Box–Muller). */
  normal(): number;
  /** Integer in [0, n). */
  int(n: number): number;
  /** A new independent stream derived from this one and a label (e.g. attack and budget index). */
  fork(label: number): Rng;
  /** Fill a Float32Array with uniform values in [lo, hi). */
  uniformArray(length: number, lo: number, hi: number): Float32Array;
  /** Fill a Float32Array with standard normal values. */
  normalArray(length: number): Float32Array;
}

function splitmix32(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x9e3779b9) >>> 0;
    let z = s;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    return (z ^ (z >>> 16)) >>> 0;
  };
}

/** Create a generator from an integer seed. */
export function createRng(seed: number): Rng {
  const init = splitmix32(seed);
  const s = new Uint32Array([init(), init(), init(), init()]);
  if ((s[0]! | s[1]! | s[2]! | s[3]!) === 0) s[0] = 1;
  const nextU32 = (): number => {
    const result = Math.imul(rotl(Math.imul(s[1]!, 5) >>> 0, 7), 9) >>> 0;
    const t = (s[1]! << 9) >>> 0;
    s[2]! ^= s[0]!;
    s[3]! ^= s[1]!;
    s[1]! ^= s[2]!;
    s[0]! ^= s[3]!;
    s[2]! ^= t;
    s[3] = rotl(s[3]!, 11);
    return result;
  };
  let spareNormal: number | null = null;
  const rng: Rng = {
    next: () => nextU32() / 4294967296,
    normal: () => {
      if (spareNormal !== null) {
        const v = spareNormal;
        spareNormal = null;
        return v;
      }
      let u = 0;
      while (u === 0) u = rng.next();
      const v = rng.next();
      const r = Math.sqrt(-2 * Math.log(u));
      spareNormal = r * Math.sin(2 * Math.PI * v);
      return r * Math.cos(2 * Math.PI * v);
    },
    int: (n) => Math.floor(rng.next() * n),
    fork: (label) => createRng((Math.imul(nextU32(), 0x27d4eb2d) ^ Math.imul(label + 1, 0x165667b1)) >>> 0),
    uniformArray: (length, lo, hi) => {
      const out = new Float32Array(length);
      for (let i = 0; i < length; i++) out[i] = lo + (hi - lo) * rng.next();
      return out;
    },
    normalArray: (length) => {
      const out = new Float32Array(length);
      for (let i = 0; i < length; i++) out[i] = rng.normal();
      return out;
    },
  };
  return rng;
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}
