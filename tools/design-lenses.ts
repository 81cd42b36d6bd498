// Designs straylight's preset lenses and writes lenses/*.yaml: `node dist/tools/design-lenses.js`.
//
// Each preset is our own design: a rough form chosen by hand (element powers and shapes of the
// classic types), then solved paraxially: scaled so its focal length is exactly the labelled one,
// the back gap set to the paraxial focus of a distant object, and each clear semi-diameter set to
// the marginal ray (at the widest f-number) plus the share of the chief ray at the corner of a
// 36 x 24 mm frame that leaves the corner CORNER_LIGHT of the centre's light wide open (the
// cat's-eye vignetting of real lenses), with 5% to spare; then each element
// is thickened until it is at least MIN_EDGE_MM thick at its rim and each closing air gap opened,
// and the lens solved again, until lens geometry (src/optics/geometry.ts) finds nothing to refuse.
// They are not copies of any product's, catalogue's or patent's design.

import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { AIR, CATALOGUE, type GlassModel } from '../src/optics/glass.js';
import { imagePath, vertexZ, type Iris, type LensModel, type LensSurface } from '../src/optics/lens.js';
import { planPath, RayHit, traceRay } from '../src/optics/trace.js';
import { backFocalDistance, focalLength, pathMatrix, stopHeightRatio } from '../src/optics/paraxial.js';
import { lensGeometry, MIN_CENTRE_MM, MIN_EDGE_MM, spanThinnest } from '../src/optics/geometry.js';

const BK7 = CATALOGUE['N-BK7'];
const SF5 = CATALOGUE['N-SF5'];
/** glasses of our own choosing by (n_d, V_d): a dense crown and a light flint */
const DENSE_CROWN: GlassModel = { kind: 'abbe', name: 'dense-crown', nd: 1.67, vd: 55 };
const LIGHT_FLINT: GlassModel = { kind: 'abbe', name: 'light-flint', nd: 1.58, vd: 41 };

type Row = [radius: number, gap: number, glass: GlassModel] | 'stop';

interface Form {
  file: string;
  name: string;
  note: string;
  focalMm: number;
  fNumberMin: number;
  iris: Iris;
  squeeze: number;
  rows: Row[];
  stopGap: number;
  /** the corner's light wide open over the centre's (default CORNER_LIGHT) */
  cornerLight?: number;
  /**
   * single: one quarter-wave MgF2 layer a surface, centred at wavelengths that vary from surface to
   * surface (the default); none: bare glass, as before coatings; broadband: three layers a surface
   */
  coating?: 'single' | 'none' | 'broadband';
}

/**
 * A three-layer broadband antireflection stack of the common materials (indices from memory):
 * MgF2 (1.38) outermost, ZrO2 (2.05), Al2O3 (1.63) on the glass. Thicknesses from a search on a
 * 4-6 nm grid for the least mean normal-incidence reflectance from 430 to 670 nm on glass of index
 * 1.62-1.67 (the flint and dense crown used here): 0.23-0.31%, where one quarter-wave MgF2 layer
 * leaves 0.76% (computed with src/optics/coating.ts).
 */
const BROADBAND = [
  { index: 1.38, thicknessNm: 96 },
  { index: 2.05, thicknessNm: 130 },
  { index: 1.63, thicknessNm: 20 },
];
const report: string[] = [];

/** The corner's light wide open over the centre's that each design's apertures are sized for. */
const CORNER_LIGHT = 0.5;

/** Scale to the focal length, put the back gap at focus, and size the clear apertures from rays. */
function solve(lens: LensModel, form: Form, vignette: number): LensModel {
  // scale to the focal length (all lengths scale together; the power scales inversely)
  const k = form.focalMm / focalLength(lens);
  lens = { ...lens, surfaces: lens.surfaces.map((s) => ({ ...s, radiusMm: s.radiusMm * k, gapMm: s.gapMm * k })) };
  // back gap: the paraxial focus
  const last = lens.surfaces.length - 1;
  lens.surfaces[last] = { ...lens.surfaces[last], gapMm: backFocalDistance(lens) };
  // semi-diameters from paraxial marginal and chief rays: the whole axial beam at the widest
  // aperture, and `vignette` of the corner's chief-ray height, so the corner's beam is cut by the
  // front and rear elements into a cat's eye at full aperture, as in real lenses
  const f = focalLength(lens);
  const stop = lens.surfaces.findIndex((s) => s.stop);
  const ep = f / (2 * form.fNumberMin);
  const fieldSlope = Math.hypot(18 / form.squeeze, 12) / f;
  const z = vertexZ(lens);
  // chief ray: crosses the stop centre; find its height at the first surface paraxially
  const toStop = pathMatrix(lens, imagePath(lens).slice(0, stop), 587.5618, z[stop]);
  const yChief0 = (-toStop[1] * fieldSlope) / toStop[0];
  lens.surfaces = lens.surfaces.map((s, i) => {
    const m = pathMatrix(lens, imagePath(lens).slice(0, i), 587.5618, z[i]);
    const marginal = Math.abs(m[0] * ep);
    const chief = Math.abs(m[0] * yChief0 + m[1] * fieldSlope);
    let semi = 1.05 * (marginal + vignette * chief);
    if (s.stop) return { ...s, semiDiameterMm: ep * stopHeightRatio(lens, stop) };
    if (s.radiusMm !== 0 && semi > 0.9 * Math.abs(s.radiusMm)) semi = 0.9 * Math.abs(s.radiusMm);
    return { ...s, semiDiameterMm: semi };
  });
  // an element's rim is its larger aperture: both its surfaces must reach it
  for (let i = 0; i + 1 < lens.surfaces.length; i++) {
    const [a, b] = [lens.surfaces[i], lens.surfaces[i + 1]];
    if (a.glass.kind === 'air') continue;
    for (const [mine, other] of [[a, b], [b, a]] as const) {
      if (mine.radiusMm !== 0 && other.semiDiameterMm > 0.9 * Math.abs(mine.radiusMm)) (other as LensSurface).semiDiameterMm = 0.9 * Math.abs(mine.radiusMm);
    }
  }
  return lens;
}

/**
 * Make the lens buildable: thicken each element until it is MIN_EDGE_MM thick at its rim (and
 * MIN_CENTRE_MM at its centre) with a tenth to spare, open each air gap whose surfaces meet, and
 * solve again (focal length, focus, apertures), until nothing is left to fix.
 */
function buildable(lens: LensModel, form: Form, vignette: number): LensModel {
  for (let round = 0; round < 40; round++) {
    const errors = lensGeometry(lens).filter((p) => p.severity === 'error');
    if (!errors.length) return lens;
    const s = lens.surfaces.map((x) => ({ ...x }));
    for (let k = 0; k + 1 < s.length; k++) {
      const thin = spanThinnest(lens, k).mm;
      if (s[k].glass.kind !== 'air') {
        const want = 1.1 * MIN_EDGE_MM;
        if (thin < want) s[k].gapMm += want - thin;
        if (s[k].gapMm < 1.1 * MIN_CENTRE_MM) s[k].gapMm = 1.1 * MIN_CENTRE_MM;
      } else if (thin < 0.1) s[k].gapMm += 0.1 - thin;
    }
    lens = solve({ ...lens, surfaces: s }, form, vignette);
  }
  throw new Error(`${form.name}: still not buildable: ${lensGeometry(lens).map((p) => p.message).join('; ')}`);
}

/**
 * The corner's light at full aperture over the centre's: the share of a fine grid of parallel rays
 * over the front that gets through every clear aperture and the stop, traced for real.
 */
export function cornerIllumination(lens: LensModel): number {
  const f = focalLength(lens);
  const stop = lens.surfaces.findIndex((s) => s.stop);
  const plan = planPath(lens, imagePath(lens), 587.5618, lens.surfaces[stop].semiDiameterMm);
  const hit = new RayHit();
  // rays on a fixed spacing over a window of the entrance plane wide enough for the tilted beam:
  // the front's aperture, shifted by as far as the beam can lean (it crosses the stop's centre)
  const semi0 = lens.surfaces[0].semiDiameterMm;
  const step = (2 * semi0) / 120;
  const zStop = vertexZ(lens)[stop];
  const passing = (slope: number) => {
    const norm = 1 / Math.hypot(1, slope);
    const reach = 1.3 * semi0 + 1.5 * zStop * slope;
    const cells = Math.ceil((2 * reach) / step);
    let n = 0;
    for (let j = 0; j < cells; j++) {
      for (let i = 0; i < cells; i++) {
        const x = -reach + (i + 0.5) * step;
        const y = -reach + (j + 0.5) * step;
        if (!traceRay(plan, x, y - 20 * slope, -20, 0, slope * norm, norm, hit)) continue;
        if (hit.margin >= 0 && hit.vignette <= 1 && hit.stopU[0] ** 2 + hit.stopV[0] ** 2 <= 1) n++;
      }
    }
    return n;
  };
  // the corner of the frame as the light sees it: an anamorphic front widens the horizontal field
  return passing(Math.hypot(18 / lens.squeeze, 12) / f) / passing(0);
}

function build(form: Form): LensModel {
  const surfaces: LensSurface[] = form.rows.map((r) =>
    r === 'stop'
      ? { radiusMm: 0, gapMm: form.stopGap, glass: AIR, semiDiameterMm: 1e6, coating: [], stop: true }
      : { radiusMm: r[0], gapMm: r[1], glass: r[2], semiDiameterMm: 1e6, coating: [], stop: false },
  );
  const lens: LensModel = { name: form.name, note: form.note, surfaces, iris: form.iris, fNumberMin: form.fNumberMin, sensorWidthMm: 36, squeeze: form.squeeze };
  // the apertures' share of the chief ray: the least that gives the corner its light, stepping up
  // and then bisecting (past some share the thickened front runs away from the stop and the corner
  // gets darker again, so the first crossing is taken, or else the brightest corner found)
  const target = form.cornerLight ?? CORNER_LIGHT;
  const at = (v: number) => buildable(solve(lens, form, v), form, v);
  let best = { v: 0.2, light: -1 };
  let lo = -1;
  let hi = -1;
  for (let v = 0.2; v <= 3 + 1e-9; v += 0.05) {
    const light = cornerIllumination(at(v));
    if (light > best.light) best = { v, light };
    if (light >= target) {
      [lo, hi] = [v - 0.05, v];
      break;
    }
  }
  if (hi > 0) {
    for (let i = 0; i < 8; i++) {
      const v = (lo + hi) / 2;
      if (cornerIllumination(at(v)) >= target) hi = v;
      else lo = v;
    }
  } else hi = best.v;
  const out = at(hi);
  for (const p of lensGeometry(out)) report.push(`  ${form.name} surface ${p.surface + 1}: ${p.severity}: ${p.message}`);
  return out;
}

const r2 = (v: number) => Math.round(v * 1000) / 1000;

function glassKey(g: GlassModel): string {
  return g.kind === 'air' ? 'air' : g.name;
}

function toYaml(lens: LensModel, form: Form): string {
  const lines = [
    `# ${lens.name}: a preset lens of straylight's own design (not a copy of any product, catalogue`,
    '# or patent). Rough form chosen by hand, then solved by tools/design-lenses.ts: scaled to',
    `# f = ${form.focalMm} mm, back gap at the paraxial focus, semi-diameters from the marginal ray at`,
    `# f/${form.fNumberMin} plus part of the chief ray at the corner of a 36 x 24 mm frame, each element at`,
    `# least ${MIN_EDGE_MM} mm thick at its rim (common practice). Wide open, the corner gets`,
    `# ${Math.round(100 * cornerIllumination(lens))}% of the centre's light (cat's-eye vignetting by the front and rear rims).`,
    'version: 1',
    `name: ${lens.name}`,
    `note: ${JSON.stringify(lens.note)}`,
    'sensor_width: 36',
    `f_number_min: ${lens.fNumberMin}`,
    `iris: { blades: ${lens.iris.blades}, rotation: ${lens.iris.rotationDeg}, roundness: ${lens.iris.roundness} }`,
  ];
  if (lens.squeeze !== 1) lines.push(`squeeze: ${lens.squeeze}`);
  const kind = form.coating ?? 'single';
  if (kind === 'none') lines.push('coating: none   # bare glass on every surface, as lenses were before antireflection coatings');
  else if (kind === 'broadband') lines.push('coating: mgf2   # (every air-glass surface has its own three-layer stack below)');
  else lines.push('coating: mgf2   # default: single-layer quarter-wave MgF2 at 550 nm on air-glass surfaces');
  lines.push('glasses:');
  lines.push(`  ${DENSE_CROWN.kind === 'abbe' ? `dense-crown: { nd: ${DENSE_CROWN.nd}, vd: ${DENSE_CROWN.vd} }` : ''}`);
  lines.push(`  ${LIGHT_FLINT.kind === 'abbe' ? `light-flint: { nd: ${LIGHT_FLINT.nd}, vd: ${LIGHT_FLINT.vd} }` : ''}`);
  lines.push('surfaces:');
  // like a real multi-coated lens, the single layers are centred at different wavelengths from
  // surface to surface, so the ghosts come in several tints
  const designNm = [550, 500, 600, 470, 620, 530, 580];
  let coated = 0;
  const stack = (airInFront: boolean) => {
    // layers are listed from the front: the air side first where air is in front
    const layers = airInFront ? BROADBAND : [...BROADBAND].reverse();
    return `{ layers: [${layers.map((l) => `{ index: ${l.index}, thickness: ${r2(l.thicknessNm)} }`).join(', ')}] }`;
  };
  for (const [k, s] of lens.surfaces.entries()) {
    if (s.stop) {
      lines.push(`  - { stop: true, gap: ${r2(s.gapMm)}, semi_diameter: ${r2(s.semiDiameterMm)} }`);
      continue;
    }
    const radius = s.radiusMm === 0 ? 'flat' : r2(s.radiusMm);
    const glass = s.glass.kind === 'air' ? '' : `, glass: ${glassKey(s.glass)}`;
    const before = k === 0 ? AIR : lens.surfaces[k - 1].glass;
    const airGlass = (before.kind === 'air') !== (s.glass.kind === 'air');
    let coating = '';
    if (airGlass && kind === 'single') coating = `, coating: { layer: 1.38, wavelength: ${designNm[coated++ % designNm.length]} }`;
    if (airGlass && kind === 'broadband') coating = `, coating: ${stack(before.kind === 'air')}`;
    lines.push(`  - { radius: ${radius}, gap: ${r2(s.gapMm)}${glass}, semi_diameter: ${r2(s.semiDiameterMm)}${coating} }`);
  }
  return lines.join('\n') + '\n';
}

const forms: Form[] = [
  {
    file: 'triplet-50',
    name: 'triplet-50',
    note: 'three-element air-spaced triplet, 50 mm f/3.5 (straylight design)',
    focalMm: 50,
    fNumberMin: 3.5,
    iris: { blades: 5, rotationDeg: 0, roundness: 0 },
    squeeze: 1,
    stopGap: 3,
    rows: [[22, 4.5, DENSE_CROWN], [-400, 4.5, AIR], [-30, 1.2, SF5], [22, 2.5, AIR], 'stop', [70, 4, DENSE_CROWN], [-28, 40, AIR]],
  },
  {
    file: 'double-gauss-50',
    name: 'double-gauss-50',
    note: 'six-element double-Gauss-type normal lens, 50 mm f/2 (straylight design)',
    cornerLight: 0.4,
    focalMm: 50,
    fNumberMin: 2,
    iris: { blades: 6, rotationDeg: 0, roundness: 0.15 },
    squeeze: 1,
    stopGap: 5,
    rows: [
      [33, 4.5, DENSE_CROWN], [140, 0.3, AIR],
      [21, 6, DENSE_CROWN], [60, 1.5, SF5], [14.5, 5.5, AIR],
      'stop',
      [-15, 1.5, SF5], [-60, 6, DENSE_CROWN], [-21, 0.3, AIR],
      [120, 4.5, DENSE_CROWN], [-48, 40, AIR],
    ],
  },
  {
    file: 'zoom-like-35',
    name: 'zoom-like-35',
    note: 'many-element zoom-like design, 35 mm f/2.8, 16 glass surfaces (straylight design)',
    focalMm: 35,
    fNumberMin: 2.8,
    iris: { blades: 9, rotationDeg: 10, roundness: 0.3 },
    squeeze: 1,
    stopGap: 3,
    rows: [
      [60, 2, SF5], [25, 8, AIR],
      [-80, 1.8, BK7], [80, 1, AIR],
      [45, 2, SF5], [25, 6, DENSE_CROWN], [-70, 6, AIR],
      [30, 4, BK7], [-200, 3, AIR],
      'stop',
      [-40, 1.5, LIGHT_FLINT], [22, 5, DENSE_CROWN], [-35, 2, AIR],
      [50, 3.5, BK7], [-60, 4, AIR],
      [-25, 1.5, LIGHT_FLINT], [-60, 40, AIR],
    ],
  },
  {
    file: 'anamorphic-40-2x',
    name: 'anamorphic-40-2x',
    note: 'anamorphic option: a 40 mm double-Gauss-type prime behind an ideal 2x horizontal squeeze (straylight design)',
    focalMm: 40,
    fNumberMin: 2.8,
    iris: { blades: 0, rotationDeg: 0, roundness: 1 },
    squeeze: 2,
    stopGap: 4,
    rows: [
      [27, 4, DENSE_CROWN], [110, 0.3, AIR],
      [17, 5, DENSE_CROWN], [50, 1.5, SF5], [12, 4.5, AIR],
      'stop',
      [-12.5, 1.5, SF5], [-50, 5, DENSE_CROWN], [-17.5, 0.3, AIR],
      [100, 4, DENSE_CROWN], [-40, 40, AIR],
    ],
  },
  {
    file: 'portrait-85',
    name: 'portrait-85',
    note: 'short telephoto focal length, 85 mm f/2, six elements of the double-Gauss type (straylight design)',
    focalMm: 85,
    fNumberMin: 2,
    iris: { blades: 8, rotationDeg: 0, roundness: 0.4 },
    squeeze: 1,
    stopGap: 6,
    cornerLight: 0.5,
    rows: [
      [52, 6, DENSE_CROWN], [250, 0.3, AIR],
      [32, 7, DENSE_CROWN], [90, 2, SF5], [22, 8, AIR],
      'stop',
      [-24, 2, SF5], [-90, 7, DENSE_CROWN], [-32, 0.3, AIR],
      [160, 5, DENSE_CROWN], [-80, 50, AIR],
    ],
  },
  {
    file: 'tele-135',
    name: 'tele-135',
    note: 'telephoto, 135 mm f/2.8: a positive front group and a negative rear group, shorter than its focal length (straylight design)',
    focalMm: 135,
    fNumberMin: 2.8,
    iris: { blades: 9, rotationDeg: 0, roundness: 0.5 },
    squeeze: 1,
    stopGap: 10,
    rows: [
      [80, 6, DENSE_CROWN], [-250, 0.5, AIR],
      [50, 7, DENSE_CROWN], [-180, 2.5, SF5], [45, 18, AIR],
      'stop',
      [-70, 2, BK7], [45, 6, AIR],
      [120, 4, SF5], [-150, 60, AIR],
    ],
  },
  {
    file: 'uncoated-50',
    name: 'uncoated-50',
    note: 'older-style four-element lens with a cemented rear pair, 50 mm f/4.5, uncoated glass: strong ghosts (straylight design)',
    focalMm: 50,
    fNumberMin: 4.5,
    iris: { blades: 10, rotationDeg: 0, roundness: 0.6 },
    squeeze: 1,
    stopGap: 2,
    coating: 'none',
    rows: [
      [20, 4, DENSE_CROWN], [-500, 3, AIR],
      [-40, 1.2, LIGHT_FLINT], [20, 3, AIR],
      'stop',
      [-80, 1.2, LIGHT_FLINT], [20, 4, DENSE_CROWN], [-28, 40, AIR],
    ],
  },
  {
    file: 'multicoated-50',
    name: 'multicoated-50',
    note: 'modern six-element double-Gauss-type 50 mm f/1.8 with three-layer broadband coatings: faint ghosts (straylight design)',
    focalMm: 50,
    fNumberMin: 1.8,
    iris: { blades: 7, rotationDeg: 0, roundness: 0.5 },
    squeeze: 1,
    stopGap: 5,
    cornerLight: 0.35,
    coating: 'broadband',
    rows: [
      [34, 4.5, DENSE_CROWN], [150, 0.3, AIR],
      [21, 6, DENSE_CROWN], [62, 1.5, SF5], [14.5, 5.5, AIR],
      'stop',
      [-15, 1.5, SF5], [-62, 6, DENSE_CROWN], [-21, 0.3, AIR],
      [130, 4.5, DENSE_CROWN], [-46, 40, AIR],
    ],
  },
  {
    file: 'anamorphic-50-1.5x',
    name: 'anamorphic-50-1.5x',
    note: 'anamorphic option: a 50 mm triplet-type prime behind an ideal 1.5x horizontal squeeze (straylight design)',
    focalMm: 50,
    fNumberMin: 2.8,
    iris: { blades: 11, rotationDeg: 0, roundness: 0.8 },
    squeeze: 1.5,
    stopGap: 3,
    rows: [[24, 5, DENSE_CROWN], [-300, 4.5, AIR], [-32, 1.5, SF5], [24, 2.5, AIR], 'stop', [75, 4.5, DENSE_CROWN], [-30, 40, AIR]],
  },
];

const outDir = path.resolve(process.argv[2] ?? 'lenses');
for (const form of forms) {
  const lens = build(form);
  const f = focalLength(lens);
  const bfd = backFocalDistance(lens);
  if (!(bfd > 5)) throw new Error(`${form.name}: back focal distance ${bfd.toFixed(2)} mm is too short`);
  writeFileSync(path.join(outDir, `${form.file}.yaml`), toYaml(lens, form));
  console.log(`${form.name}: f ${f.toFixed(3)} mm, back focus ${bfd.toFixed(2)} mm, ${lens.surfaces.length - 1} glass surfaces`);
}
console.log(report.join('\n'));
