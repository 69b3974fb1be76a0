/**
 * Seeded generator of the invented warehouse floor-marker images (RGB, 32×32, values in [0,1]).
 * Every image is drawn in plain TypeScript: the marker shape is anti-aliased by 4×4 supersampling,
 * then worn (missing paint, speckle, scratches), lit unevenly and given sensor noise.
 */
import { createRng, type Rng } from '../../src/core/random/rng.ts';
import { MARKER_CLASSES, MARKER_SHAPES, type ShapeTest } from './marker-shapes.ts';

export { MARKER_CLASSES } from './marker-shapes.ts';

/** Side length of every image in pixels. */
export const MARKER_SIZE = 32;
/** Floats per image (H·W·3, HWC order). */
export const MARKER_PIXELS = MARKER_SIZE * MARKER_SIZE * 3;

const SUPERSAMPLE = 4;
type Rgb = readonly [number, number, number];

const PAINTS: readonly Rgb[] = [
  [0.95, 0.82, 0.12], // safety yellow
  [0.93, 0.93, 0.9], // white
  [0.95, 0.45, 0.1], // orange
  [0.15, 0.4, 0.85], // blue
  [0.2, 0.7, 0.3], // green
  [0.85, 0.15, 0.15], // red
];

/** A labelled batch of generated images, NHWC. */
export interface MarkerSet {
  readonly pixels: Float32Array;
  readonly labels: Int32Array;
}

function uniform(rng: Rng, lo: number, hi: number): number {
  return lo + (hi - lo) * rng.next();
}

function luminance(c: Rgb): number {
  return 0.299 * c[0] + 0.587 * c[1] + 0.114 * c[2];
}

function jitter(rng: Rng, c: Rgb, amount: number): Rgb {
  return [c[0] + uniform(rng, -amount, amount), c[1] + uniform(rng, -amount, amount), c[2] + uniform(rng, -amount, amount)];
}

/** Smooth random field on [0,1]² with values in [0,1]: bilinear interpolation of a cells×cells grid. */
function makeValueNoise(rng: Rng, cells: number): (x: number, y: number) => number {
  const grid = rng.uniformArray((cells + 1) * (cells + 1), 0, 1);
  return (x, y) => {
    const gx = x * cells;
    const gy = y * cells;
    const ix = Math.min(cells - 1, Math.floor(gx));
    const iy = Math.min(cells - 1, Math.floor(gy));
    const fx = gx - ix;
    const fy = gy - iy;
    const sx = fx * fx * (3 - 2 * fx);
    const sy = fy * fy * (3 - 2 * fy);
    const at = (i: number, j: number): number => grid[j * (cells + 1) + i]!;
    const top = at(ix, iy) * (1 - sx) + at(ix + 1, iy) * sx;
    const bottom = at(ix, iy + 1) * (1 - sx) + at(ix + 1, iy + 1) * sx;
    return top * (1 - sy) + bottom * sy;
  };
}

/** Fraction of each pixel covered by the shape after a random rotation, scale and shift. */
function shapeCoverage(shape: ShapeTest, rng: Rng): Float32Array {
  // Small rotations only, so the left and right turn arrows stay distinguishable.
  const angle = uniform(rng, -0.3, 0.3);
  const scale = uniform(rng, 0.7, 1.05);
  const tx = uniform(rng, -0.12, 0.12);
  const ty = uniform(rng, -0.12, 0.12);
  const cos = Math.cos(angle);
  const sin = Math.sin(angle);
  const coverage = new Float32Array(MARKER_SIZE * MARKER_SIZE);
  const step = 1 / SUPERSAMPLE;
  for (let py = 0; py < MARKER_SIZE; py++) {
    for (let px = 0; px < MARKER_SIZE; px++) {
      let hits = 0;
      for (let sy = 0; sy < SUPERSAMPLE; sy++) {
        for (let sx = 0; sx < SUPERSAMPLE; sx++) {
          const x = (2 * (px + (sx + 0.5) * step)) / MARKER_SIZE - 1 - tx;
          const y = (2 * (py + (sy + 0.5) * step)) / MARKER_SIZE - 1 - ty;
          if (shape((cos * x + sin * y) / scale, (-sin * x + cos * y) / scale)) hits++;
        }
      }
      coverage[py * MARKER_SIZE + px] = hits / (SUPERSAMPLE * SUPERSAMPLE);
    }
  }
  return coverage;
}

/** Paint and floor colours with enough brightness difference that the marker stays visible. */
function pickColours(rng: Rng): { paint: Rgb; floor: Rgb } {
  const paint = jitter(rng, PAINTS[rng.int(PAINTS.length)]!, 0.05);
  let floor: Rgb = [0.5, 0.5, 0.5];
  for (let attempt = 0; attempt < 20; attempt++) {
    const grey = uniform(rng, 0.22, 0.72);
    floor = jitter(rng, [grey, grey * uniform(rng, 0.95, 1.03), grey * uniform(rng, 0.9, 1.05)], 0.03);
    if (Math.abs(luminance(floor) - luminance(paint)) >= 0.15) break;
  }
  return { paint, floor };
}

/** Per-pixel paint opacity after wear: blotches of missing paint and fine speckle. */
function paintAlpha(coverage: Float32Array, rng: Rng): Float32Array {
  const opacity = uniform(rng, 0.55, 1);
  const wear = uniform(rng, 0, 0.35);
  const speckle = uniform(rng, 0, 0.08);
  const blotches = makeValueNoise(rng, 6);
  const threshold = 1 - wear;
  const alpha = new Float32Array(coverage.length);
  for (let i = 0; i < coverage.length; i++) {
    const x = (i % MARKER_SIZE) / MARKER_SIZE;
    const y = Math.floor(i / MARKER_SIZE) / MARKER_SIZE;
    const n = blotches(x, y);
    const missing = Math.min(1, Math.max(0, (n - threshold + 0.08) / 0.16));
    const speckled = rng.next() < speckle ? 0.2 : 1;
    alpha[i] = coverage[i]! * opacity * (1 - missing) * speckled;
  }
  return alpha;
}

/** Floor colour per pixel: a stained, grainy concrete surface. */
function floorTexture(floor: Rgb, rng: Rng): Float32Array {
  const stains = makeValueNoise(rng, 3);
  const grain = makeValueNoise(rng, 12);
  const stainDepth = uniform(rng, 0, 0.25);
  const grainDepth = uniform(rng, 0.02, 0.08);
  const out = new Float32Array(MARKER_PIXELS);
  for (let i = 0; i < MARKER_SIZE * MARKER_SIZE; i++) {
    const x = (i % MARKER_SIZE) / MARKER_SIZE;
    const y = Math.floor(i / MARKER_SIZE) / MARKER_SIZE;
    const shade = 1 - stainDepth * stains(x, y) + grainDepth * (grain(x, y) - 0.5);
    for (let c = 0; c < 3; c++) out[i * 3 + c] = floor[c]! * shade;
  }
  return out;
}

/** Thin straight scratches across floor and paint alike, darker or lighter than the surface. */
function addScratches(image: Float32Array, rng: Rng): void {
  const count = rng.int(4);
  for (let s = 0; s < count; s++) {
    const angle = uniform(rng, 0, Math.PI);
    const nx = -Math.sin(angle);
    const ny = Math.cos(angle);
    const offset = uniform(rng, -10, 10);
    const halfWidth = uniform(rng, 0.4, 0.9);
    const tone = rng.next() < 0.5 ? uniform(rng, 0.05, 0.2) : uniform(rng, 0.7, 0.9);
    const strength = uniform(rng, 0.4, 0.9);
    for (let i = 0; i < MARKER_SIZE * MARKER_SIZE; i++) {
      const x = (i % MARKER_SIZE) + 0.5 - MARKER_SIZE / 2;
      const y = Math.floor(i / MARKER_SIZE) + 0.5 - MARKER_SIZE / 2;
      const distance = Math.abs(x * nx + y * ny - offset);
      const w = strength * Math.max(0, 1 - distance / (halfWidth + 0.5));
      for (let c = 0; c < 3; c++) image[i * 3 + c] = image[i * 3 + c]! * (1 - w) + tone * w;
    }
  }
}

/** Uneven lighting (brightness and a linear gradient), sensor noise, clipping and 8-bit rounding. */
function lightAndQuantise(image: Float32Array, rng: Rng): void {
  const brightness = uniform(rng, 0.6, 1.15);
  const gx = uniform(rng, -0.25, 0.25);
  const gy = uniform(rng, -0.25, 0.25);
  const sigma = uniform(rng, 0.002, 0.015);
  for (let i = 0; i < MARKER_SIZE * MARKER_SIZE; i++) {
    const x = (i % MARKER_SIZE) / (MARKER_SIZE - 1) - 0.5;
    const y = Math.floor(i / MARKER_SIZE) / (MARKER_SIZE - 1) - 0.5;
    const light = brightness * (1 + gx * x + gy * y);
    for (let c = 0; c < 3; c++) {
      const v = image[i * 3 + c]! * light + sigma * rng.normal();
      // Rounded to what an 8-bit PNG stores, so the saved samples are exactly the generated floats.
      image[i * 3 + c] = Math.round(Math.min(1, Math.max(0, v)) * 255) / 255;
    }
  }
}

/** Draw one image of class `classIndex` (index into MARKER_CLASSES); HWC floats in [0,1]. */
export function drawMarker(classIndex: number, rng: Rng): Float32Array {
  const shape = MARKER_SHAPES[classIndex];
  if (shape === undefined) throw new Error(`no marker class ${classIndex} (there are ${MARKER_CLASSES.length})`);
  const { paint, floor } = pickColours(rng);
  const alpha = paintAlpha(shapeCoverage(shape, rng), rng);
  const image = floorTexture(floor, rng);
  for (let i = 0; i < alpha.length; i++) {
    const a = alpha[i]!;
    for (let c = 0; c < 3; c++) image[i * 3 + c] = image[i * 3 + c]! * (1 - a) + paint[c]! * a;
  }
  addScratches(image, rng);
  lightAndQuantise(image, rng);
  return image;
}

/**
 * Draw `count` images from `seed`, classes in turn (label = index mod class count), so every
 * prefix is balanced. The first n images of a seed do not depend on `count`.
 */
export function generateMarkers(seed: number, count: number): MarkerSet {
  const rng = createRng(seed);
  const pixels = new Float32Array(count * MARKER_PIXELS);
  const labels = new Int32Array(count);
  for (let i = 0; i < count; i++) {
    const label = i % MARKER_CLASSES.length;
    labels[i] = label;
    pixels.set(drawMarker(label, rng.fork(i)), i * MARKER_PIXELS);
  }
  return { pixels, labels };
}
