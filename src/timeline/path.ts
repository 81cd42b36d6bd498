// Smooth spatial paths through position keys: centripetal Catmull-Rom (alpha = 1/2), which never
// forms cusps or self-loops inside a segment (Yuksel, Schaefer & Keyser, "Parameterization and
// applications of Catmull-Rom curves", CAD 43(7), 2011). Evaluated with the Barry-Goldman pyramid.

export type Vec2 = readonly [number, number];

const ALPHA = 0.5;

function knot(a: readonly number[], b: readonly number[]): number {
  return Math.pow(Math.hypot(...a.map((v, k) => b[k] - v)), ALPHA);
}

function mix(a: readonly number[], b: readonly number[], ta: number, tb: number, t: number): number[] {
  const w = (t - ta) / (tb - ta);
  return a.map((v, k) => v + (b[k] - v) * w);
}

/**
 * The point at fraction s (0 at p1, 1 at p2) of the segment p1 -> p2, with neighbours p0 and p3
 * shaping the tangents. Missing end neighbours are mirrored (p0 = 2 p1 - p2).
 */
export function catmullRom(p0: Vec2 | undefined, p1: Vec2, p2: Vec2, p3: Vec2 | undefined, s: number): [number, number] {
  const p = catmullRomN(p0, p1, p2, p3, s);
  return [p[0], p[1]];
}

/** catmullRom in any number of dimensions (3-D camera and light paths). */
export function catmullRomN(p0: readonly number[] | undefined, p1: readonly number[], p2: readonly number[], p3: readonly number[] | undefined, s: number): number[] {
  const a = p0 ?? p1.map((v, k) => 2 * v - p2[k]);
  const d = p3 ?? p2.map((v, k) => 2 * v - p1[k]);
  const d12 = knot(p1, p2);
  if (d12 < 1e-9) return [...p1];
  // a coincident neighbour would give a zero knot interval: borrow the segment's own
  const d01 = knot(a, p1) || d12;
  const d23 = knot(p2, d) || d12;
  const t0 = 0;
  const t1 = d01;
  const t2 = t1 + d12;
  const t3 = t2 + d23;
  const t = t1 + s * d12;
  const a1 = mix(a, p1, t0, t1, t);
  const a2 = mix(p1, p2, t1, t2, t);
  const a3 = mix(p2, d, t2, t3, t);
  const b1 = mix(a1, a2, t0, t2, t);
  const b2 = mix(a2, a3, t1, t3, t);
  return mix(b1, b2, t1, t2, t);
}
