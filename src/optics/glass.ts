// Refractive index of glasses against wavelength: Sellmeier's formula (catalogue coefficients), or a
// two-term Cauchy fit n = A + B / lambda^2 through n_F and n_C from (n_d, V_d).

/** Fraunhofer lines, nm: d (helium), F (hydrogen), C (hydrogen). */
export const LAMBDA_D_NM = 587.5618;
export const LAMBDA_F_NM = 486.1327;
export const LAMBDA_C_NM = 656.2725;

export type GlassModel =
  | { kind: 'air' }
  | { kind: 'sellmeier'; name: string; b: [number, number, number]; c: [number, number, number] }
  | { kind: 'abbe'; name: string; nd: number; vd: number };

export const AIR: GlassModel = { kind: 'air' };

/** Catalogue glasses (SCHOTT optical glass data sheets: Sellmeier B1-3, C1-3 in um^2). */
export const CATALOGUE: Readonly<Record<string, GlassModel>> = {
  'N-BK7': {
    kind: 'sellmeier',
    name: 'N-BK7',
    b: [1.03961212, 0.231792344, 1.01046945],
    c: [0.00600069867, 0.0200179144, 103.560653],
  },
  'N-SF5': {
    kind: 'sellmeier',
    name: 'N-SF5',
    b: [1.52481889, 0.187085527, 1.42729015],
    c: [0.011254756, 0.0588995392, 129.141675],
  },
};

export function sellmeier(nm: number, b: readonly number[], c: readonly number[]): number {
  const l2 = (nm / 1000) ** 2;
  let n2 = 1;
  for (let k = 0; k < 3; k++) n2 += (b[k] * l2) / (l2 - c[k]);
  return Math.sqrt(n2);
}

/** Cauchy coefficients of the curve through two indices (n_F at the F line, n_C at the C line). */
export function cauchyThrough(nF: number, nC: number): { a: number; b: number } {
  const b = (nF - nC) / (1 / LAMBDA_F_NM ** 2 - 1 / LAMBDA_C_NM ** 2);
  return { a: nF - b / LAMBDA_F_NM ** 2, b };
}

/**
 * Cauchy coefficients from (n_d, V_d): the F-C slope from n_F - n_C = (n_d - 1) / V_d, placed to
 * pass through n_d itself (the index the user states, which sets focal lengths). From n_d and V_d
 * alone n_F and n_C are not known individually, so the curve cannot be the F-C chord.
 */
export function cauchyFromAbbe(nd: number, vd: number): { a: number; b: number } {
  const dn = (nd - 1) / vd;
  const b = dn / (1 / LAMBDA_F_NM ** 2 - 1 / LAMBDA_C_NM ** 2);
  const a = nd - b / LAMBDA_D_NM ** 2;
  return { a, b };
}

export function refractiveIndex(g: GlassModel, nm: number): number {
  switch (g.kind) {
    case 'air':
      return 1;
    case 'sellmeier':
      return sellmeier(nm, g.b, g.c);
    case 'abbe': {
      const { a, b } = cauchyFromAbbe(g.nd, g.vd);
      return a + b / (nm * nm);
    }
  }
}

/** Abbe number V_d = (n_d - 1) / (n_F - n_C). */
export function abbeNumber(g: GlassModel): number {
  const nd = refractiveIndex(g, LAMBDA_D_NM);
  return (nd - 1) / (refractiveIndex(g, LAMBDA_F_NM) - refractiveIndex(g, LAMBDA_C_NM));
}
