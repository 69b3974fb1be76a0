/**
 * The painted floor markers of the invented warehouse scenario, as inside-tests in marker-local
 * coordinates: u to the right, v downwards, the marker filling roughly [-0.85, 0.85]².
 */

/** Class names in index order (the models' output order). */
export const MARKER_CLASSES = [
  'stop-bar',
  'slow-chevron',
  'turn-left',
  'turn-right',
  'dock-square',
  'crossing-hatch',
] as const;

export type MarkerClass = (typeof MARKER_CLASSES)[number];

/** True where the marker has paint at local point (u, v). */
export type ShapeTest = (u: number, v: number) => boolean;

/** Distance from (u, v) to the segment (ax, ay)–(bx, by). */
function segmentDistance(u: number, v: number, ax: number, ay: number, bx: number, by: number): number {
  const dx = bx - ax;
  const dy = by - ay;
  const t = Math.min(1, Math.max(0, ((u - ax) * dx + (v - ay) * dy) / (dx * dx + dy * dy)));
  const ex = u - (ax + t * dx);
  const ey = v - (ay + t * dy);
  return Math.sqrt(ex * ex + ey * ey);
}

/** Inside the triangle a, b, c (either winding). */
function inTriangle(u: number, v: number, a: readonly [number, number], b: readonly [number, number], c: readonly [number, number]): boolean {
  const side = (p: readonly [number, number], q: readonly [number, number]): number => (q[0] - p[0]) * (v - p[1]) - (q[1] - p[1]) * (u - p[0]);
  const s1 = side(a, b);
  const s2 = side(b, c);
  const s3 = side(c, a);
  return (s1 >= 0 && s2 >= 0 && s3 >= 0) || (s1 <= 0 && s2 <= 0 && s3 <= 0);
}

/** One thick horizontal bar across the lane. */
const stopBar: ShapeTest = (u, v) => Math.abs(u) <= 0.85 && Math.abs(v) <= 0.2;

/** Two stacked chevrons pointing up (the direction of travel). */
const slowChevron: ShapeTest = (u, v) => {
  const halfWidth = 0.11;
  for (const apex of [-0.62, 0.02]) {
    if (segmentDistance(u, v, -0.68, apex + 0.55, 0, apex) <= halfWidth) return true;
    if (segmentDistance(u, v, 0, apex, 0.68, apex + 0.55) <= halfWidth) return true;
  }
  return false;
};

/** A bent arrow: a shaft coming up from the bottom, turning left, with its head at the left. */
const turnLeft: ShapeTest = (u, v) => {
  const half = 0.13;
  if (Math.abs(u - 0.4) <= half && v >= -0.28 - half && v <= 0.85) return true;
  if (Math.abs(v + 0.28) <= half && u >= -0.3 && u <= 0.4 + half) return true;
  return inTriangle(u, v, [-0.85, -0.28], [-0.3, -0.72], [-0.3, 0.16]);
};

/** The mirror image of the left turn. */
const turnRight: ShapeTest = (u, v) => turnLeft(-u, v);

/** A square outline marking a docking position. */
const dockSquare: ShapeTest = (u, v) => {
  const r = Math.max(Math.abs(u), Math.abs(v));
  return r >= 0.56 && r <= 0.8;
};

/** A square area of diagonal stripes where pedestrians cross. */
const crossingHatch: ShapeTest = (u, v) => {
  if (Math.max(Math.abs(u), Math.abs(v)) > 0.8) return false;
  const period = 0.42;
  const phase = (u + v) / period;
  return phase - Math.floor(phase) < 0.5;
};

/** Inside-tests in the order of MARKER_CLASSES. */
export const MARKER_SHAPES: readonly ShapeTest[] = [stopBar, slowChevron, turnLeft, turnRight, dockSquare, crossingHatch];
