// sRGB transfer function and luminance (IEC 61966-2-1; ITU-R BT.709 weights).

/** Linear -> sRGB-encoded, for values in [0, 1]. */
export function srgbEncode(linear: number): number {
  return linear <= 0.0031308 ? 12.92 * linear : 1.055 * Math.pow(linear, 1 / 2.4) - 0.055;
}

/** sRGB-encoded -> linear, for values in [0, 1]. */
export function srgbDecode(encoded: number): number {
  return encoded <= 0.04045 ? encoded / 12.92 : Math.pow((encoded + 0.055) / 1.055, 2.4);
}

/** Relative luminance of linear Rec.709 RGB (ITU-R BT.709). */
export function luminance(r: number, g: number, b: number): number {
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

/** XYZ -> linear sRGB (IEC 61966-2-1; D65 white maps to 1, 1, 1). */
export function xyzToLinearSrgb(x: number, y: number, z: number): [number, number, number] {
  return [
    3.2406 * x - 1.5372 * y - 0.4986 * z,
    -0.9689 * x + 1.8758 * y + 0.0415 * z,
    0.0557 * x - 0.204 * y + 1.057 * z,
  ];
}
