// Reflectance of an interface: Fresnel's equations for a bare surface, and thin-film interference
// for a coated one (characteristic-matrix method, Macleod, "Thin-Film Optical Filters"; a single
// layer reduces to r = (r01 + r12 e^{-2i delta}) / (1 + r01 r12 e^{-2i delta})). Unpolarised light:
// the mean of the s and p reflectances (Smith, "Modern Optical Engineering", eq. 11.1).

export interface CoatingLayer {
  index: number;
  thicknessNm: number;
}

/** Layers from the incident (air) side towards the substrate; empty = bare surface. */
export type Coating = CoatingLayer[];

/** A quarter-wave layer of the given index at its design wavelength: d = lambda0 / (4 n). */
export function quarterWave(index: number, designNm: number): CoatingLayer {
  return { index, thicknessNm: designNm / (4 * index) };
}

/** Bare-interface Fresnel reflectances (s, p) going from n1 into n2 at incidence cosine cos1. */
export function fresnel(n1: number, n2: number, cos1: number): { rs: number; rp: number } {
  const sin2t = ((n1 / n2) ** 2) * (1 - cos1 * cos1);
  if (sin2t >= 1) return { rs: 1, rp: 1 }; // total internal reflection
  const cos2 = Math.sqrt(1 - sin2t);
  const rs = (n1 * cos1 - n2 * cos2) / (n1 * cos1 + n2 * cos2);
  const rp = (n2 * cos1 - n1 * cos2) / (n2 * cos1 + n1 * cos2);
  return { rs: rs * rs, rp: rp * rp };
}

/**
 * Unpolarised reflectance of a (possibly coated) interface from medium n0 into substrate ns, at
 * wavelength nm and incidence cosine cos0 in medium n0. Layers are listed from the n0 side.
 */
export function reflectance(n0: number, ns: number, layers: Coating, nm: number, cos0: number): number {
  if (layers.length === 0) {
    const { rs, rp } = fresnel(n0, ns, cos0);
    return 0.5 * (rs + rp);
  }
  const s2 = n0 * n0 * (1 - cos0 * cos0); // (n sin theta)^2, conserved through the stack
  if (s2 >= ns * ns) return 1;
  let rSum = 0;
  for (const pol of ['s', 'p'] as const) {
    // tilted admittances: s: n cos, p: n / cos
    const adm = (n: number) => {
      const c = Math.sqrt(Math.max(0, 1 - s2 / (n * n)));
      return pol === 's' ? n * c : n / c;
    };
    // characteristic matrix product [[m11, i m12], [i m21, m22]] with real m11, m12, m21, m22
    let m11 = 1;
    let m12 = 0;
    let m21 = 0;
    let m22 = 1;
    for (const layer of layers) {
      const n = layer.index;
      const c = Math.sqrt(Math.max(0, 1 - s2 / (n * n)));
      const delta = (2 * Math.PI * n * layer.thicknessNm * c) / nm;
      const eta = adm(n);
      const cd = Math.cos(delta);
      const sd = Math.sin(delta);
      // [m] x [[cd, i sd / eta], [i eta sd, cd]]
      const a11 = m11 * cd - m12 * eta * sd;
      const a12 = m11 * (sd / eta) + m12 * cd;
      const a21 = m21 * cd + m22 * eta * sd;
      const a22 = -m21 * (sd / eta) + m22 * cd;
      m11 = a11;
      m12 = a12;
      m21 = a21;
      m22 = a22;
    }
    const e0 = adm(n0);
    const es = adm(ns);
    // [B, C] = M [1, es]: B = m11 + i m12 es, C = i m21 + m22 es
    const bRe = m11;
    const bIm = m12 * es;
    const cRe = m22 * es;
    const cIm = m21;
    // r = (e0 B - C) / (e0 B + C)
    const numRe = e0 * bRe - cRe;
    const numIm = e0 * bIm - cIm;
    const denRe = e0 * bRe + cRe;
    const denIm = e0 * bIm + cIm;
    rSum += (numRe * numRe + numIm * numIm) / (denRe * denRe + denIm * denIm);
  }
  return 0.5 * rSum;
}
