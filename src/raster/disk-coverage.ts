// Exact area of a disk inside an axis-aligned rectangle, for anti-aliased disks without sampling
// error (a sample count is an integer, so sampled coverage of a sub-pixel disk is off by whole
// samples however fine the grid).
//
// With the disk centred at the origin, F(a, b) = area of the disk with x <= a and y <= b is built
// from H(x) = integral_0^x sqrt(r^2 - t^2) dt = (x sqrt(r^2 - x^2) + r^2 asin(x / r)) / 2, and the
// rectangle's area is F(x1, y1) - F(x0, y1) - F(x1, y0) + F(x0, y0).

function halfChordIntegral(x: number, r: number): number {
  const c = x <= -r ? -r : x >= r ? r : x;
  return 0.5 * (c * Math.sqrt(Math.max(0, r * r - c * c)) + r * r * Math.asin(c / r));
}

/** Area of the disk (radius r, centre at the origin) where x <= a and y <= b. */
export function diskQuadrantArea(a: number, b: number, r: number): number {
  if (a <= -r || b <= -r) return 0;
  const top = Math.min(a, r);
  const H = (x: number) => halfChordIntegral(x, r);
  // integral over [lo, hi] (clipped to x <= top) of the full chord 2h(x)
  const full = (lo: number, hi: number) => {
    const h = Math.min(hi, top);
    return h > lo ? 2 * (H(h) - H(lo)) : 0;
  };
  // integral over [lo, hi] (clipped) of the chord below y = b: b + h(x)
  const part = (lo: number, hi: number) => {
    const h = Math.min(hi, top);
    return h > lo ? b * (h - lo) + H(h) - H(lo) : 0;
  };
  if (b >= r) return full(-r, r);
  const xb = Math.sqrt(r * r - b * b);
  if (b >= 0) return full(-r, -xb) + part(-xb, xb) + full(xb, r);
  return part(-xb, xb);
}

/** Area of the disk (centre cx, cy; radius r) inside the rectangle [x0, x1] x [y0, y1]. */
export function diskRectArea(cx: number, cy: number, r: number, x0: number, y0: number, x1: number, y1: number): number {
  const ax0 = x0 - cx;
  const ax1 = x1 - cx;
  const ay0 = y0 - cy;
  const ay1 = y1 - cy;
  return (
    diskQuadrantArea(ax1, ay1, r) - diskQuadrantArea(ax0, ay1, r) - diskQuadrantArea(ax1, ay0, r) + diskQuadrantArea(ax0, ay0, r)
  );
}
