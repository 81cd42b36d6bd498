// Scene-linear RGB colour spaces by their primaries and white point, and the 3x3 matrices between
// them. RGB -> XYZ is derived from the chromaticities by the method of SMPTE RP 177 (the normalised
// primary matrix: the primaries' XYZ scaled so that RGB (1, 1, 1) is the white at Y = 1); spaces
// with different whites meet through the Bradford chromatic adaptation (the choice of the Academy's
// ACES documents and of OpenColorIO's ACES transforms). straylight renders in linear Rec.709 and
// converts on the way in (light colours) and out (OpenEXR frames).

export type ColourSpace = 'rec709' | 'rec2020' | 'acescg' | 'aces2065-1';
export type Mat3 = [number, number, number, number, number, number, number, number, number];
type XY = readonly [number, number];

export interface SpaceDefinition {
  /** red, green, blue and white chromaticities (CIE 1931 x, y) */
  red: XY;
  green: XY;
  blue: XY;
  white: XY;
  /** what it is, for messages and docs */
  label: string;
}

const D65: XY = [0.3127, 0.329];
/** the ACES white (S-2008-001), near CIE D60 */
const ACES_WHITE: XY = [0.32168, 0.33767];

export const COLOUR_SPACES: Record<ColourSpace, SpaceDefinition> = {
  // ITU-R BT.709 primaries, D65 (as sRGB, IEC 61966-2-1)
  rec709: { red: [0.64, 0.33], green: [0.3, 0.6], blue: [0.15, 0.06], white: D65, label: 'linear Rec.709 / sRGB primaries, D65' },
  // ITU-R BT.2020 primaries, D65
  rec2020: { red: [0.708, 0.292], green: [0.17, 0.797], blue: [0.131, 0.046], white: D65, label: 'linear Rec.2020 primaries, D65' },
  // ACES AP1 (S-2014-004, ACEScg)
  acescg: { red: [0.713, 0.293], green: [0.165, 0.83], blue: [0.128, 0.044], white: ACES_WHITE, label: 'ACEScg (AP1 primaries, ACES white)' },
  // ACES AP0 (S-2008-001, ACES2065-1)
  'aces2065-1': { red: [0.7347, 0.2653], green: [0, 1], blue: [0.0001, -0.077], white: ACES_WHITE, label: 'ACES2065-1 (AP0 primaries, ACES white)' },
};

export const SPACE_NAMES = Object.keys(COLOUR_SPACES) as ColourSpace[];

const xyz = ([x, y]: XY): [number, number, number] => [x / y, 1, (1 - x - y) / y];

export function multiply(a: Mat3, b: Mat3): Mat3 {
  const m = new Array(9).fill(0) as Mat3;
  for (let r = 0; r < 3; r++) for (let c = 0; c < 3; c++) for (let k = 0; k < 3; k++) m[r * 3 + c] += a[r * 3 + k] * b[k * 3 + c];
  return m;
}

export function invert(m: Mat3): Mat3 {
  const [a, b, c, d, e, f, g, h, i] = m;
  const A = e * i - f * h;
  const B = -(d * i - f * g);
  const C = d * h - e * g;
  const det = a * A + b * B + c * C;
  return [A / det, -(b * i - c * h) / det, (b * f - c * e) / det, B / det, (a * i - c * g) / det, -(a * f - c * d) / det, C / det, -(a * h - b * g) / det, (a * e - b * d) / det];
}

export function apply(m: Mat3, v: readonly [number, number, number]): [number, number, number] {
  return [m[0] * v[0] + m[1] * v[1] + m[2] * v[2], m[3] * v[0] + m[4] * v[1] + m[5] * v[2], m[6] * v[0] + m[7] * v[1] + m[8] * v[2]];
}

/** The normalised primary matrix, RGB -> XYZ (SMPTE RP 177). */
export function rgbToXyz(s: SpaceDefinition): Mat3 {
  const [r, g, b] = [xyz(s.red), xyz(s.green), xyz(s.blue)];
  const p: Mat3 = [r[0], g[0], b[0], r[1], g[1], b[1], r[2], g[2], b[2]];
  const k = apply(invert(p), xyz(s.white));
  return [p[0] * k[0], p[1] * k[1], p[2] * k[2], p[3] * k[0], p[4] * k[1], p[5] * k[2], p[6] * k[0], p[7] * k[1], p[8] * k[2]];
}

/** Bradford's cone response matrix (common practice; Lam 1985, as used by ICC and the ACES documents). */
const BRADFORD: Mat3 = [0.8951, 0.2664, -0.1614, -0.7502, 1.7135, 0.0367, 0.0389, -0.0685, 1.0296];

/** XYZ under white `from` -> XYZ under white `to`, by Bradford adaptation. */
export function bradford(from: XY, to: XY): Mat3 {
  const s = apply(BRADFORD, xyz(from));
  const d = apply(BRADFORD, xyz(to));
  const scale: Mat3 = [d[0] / s[0], 0, 0, 0, d[1] / s[1], 0, 0, 0, d[2] / s[2]];
  return multiply(invert(BRADFORD), multiply(scale, BRADFORD));
}

/** Linear RGB in space `a` -> linear RGB in space `b` (Bradford between different whites). */
function between(a: SpaceDefinition, b: SpaceDefinition): Mat3 {
  const same = Math.abs(a.white[0] - b.white[0]) < 1e-6 && Math.abs(a.white[1] - b.white[1]) < 1e-6;
  const toXyz = same ? rgbToXyz(a) : multiply(bradford(a.white, b.white), rgbToXyz(a));
  return multiply(invert(rgbToXyz(b)), toXyz);
}

const cache = new Map<string, Mat3>();

/** The matrix taking linear RGB in `from` to linear RGB in `to`. */
export function convertMatrix(from: ColourSpace, to: ColourSpace): Mat3 {
  const key = `${from}>${to}`;
  let m = cache.get(key);
  if (!m) cache.set(key, (m = between(COLOUR_SPACES[from], COLOUR_SPACES[to])));
  return m;
}

/** Linear RGB with these chromaticities (red, green, blue, white x, y, as OpenEXR stores them) -> linear RGB in `to`. */
export function matrixFromChromaticities(c: readonly number[], to: ColourSpace): Mat3 {
  return between({ red: [c[0], c[1]], green: [c[2], c[3]], blue: [c[4], c[5]], white: [c[6], c[7]], label: 'the file' }, COLOUR_SPACES[to]);
}

/** The space whose chromaticities these are (within 1e-4), if any: how a file's attribute is read back. */
export function spaceOfChromaticities(c: readonly number[]): ColourSpace | undefined {
  return SPACE_NAMES.find((n) => {
    const s = COLOUR_SPACES[n];
    return [...s.red, ...s.green, ...s.blue, ...s.white].every((v, i) => Math.abs(v - c[i]) < 1e-4);
  });
}
