// Designs straylight's preset lenses and writes lenses/*.yaml: `node dist/tools/design-lenses.js`.
//
// Each preset is our own design: a rough form chosen by hand (element powers and shapes of the
// classic types), then solved paraxially: scaled so its focal length is exactly the labelled one,
// the back gap set to the paraxial focus of a distant object, and each clear semi-diameter set to
// the marginal ray (at the widest f-number) plus the chief ray at the corner of a 36 x 24 mm
// frame, with 5% to spare. They are not copies of any product's, catalogue's or patent's design.

import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { AIR, CATALOGUE, type GlassModel } from '../src/optics/glass.js';
import { imagePath, vertexZ, type Iris, type LensModel, type LensSurface } from '../src/optics/lens.js';
import { backFocalDistance, focalLength, pathMatrix, stopHeightRatio } from '../src/optics/paraxial.js';

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
}

const report: string[] = [];

function build(form: Form): LensModel {
  const surfaces: LensSurface[] = form.rows.map((r) =>
    r === 'stop'
      ? { radiusMm: 0, gapMm: form.stopGap, glass: AIR, semiDiameterMm: 1e6, coating: [], stop: true }
      : { radiusMm: r[0], gapMm: r[1], glass: r[2], semiDiameterMm: 1e6, coating: [], stop: false },
  );
  let lens: LensModel = { name: form.name, note: form.note, surfaces, iris: form.iris, fNumberMin: form.fNumberMin, sensorWidthMm: 36, squeeze: form.squeeze };
  // scale to the focal length (all lengths scale together; the power scales inversely)
  const k = form.focalMm / focalLength(lens);
  report.push(`${form.name}: scale ${k.toFixed(3)}`);
  lens = { ...lens, surfaces: lens.surfaces.map((s) => ({ ...s, radiusMm: s.radiusMm * k, gapMm: s.gapMm * k })) };
  // back gap: the paraxial focus
  const last = lens.surfaces.length - 1;
  lens.surfaces[last] = { ...lens.surfaces[last], gapMm: backFocalDistance(lens) };
  // semi-diameters from paraxial marginal and chief rays
  const f = focalLength(lens);
  const stop = lens.surfaces.findIndex((s) => s.stop);
  const ep = f / (2 * form.fNumberMin);
  const fieldSlope = Math.hypot(18, 12) / f;
  const z = vertexZ(lens);
  // chief ray: crosses the stop centre; find its height at the first surface paraxially
  const toStop = pathMatrix(lens, imagePath(lens).slice(0, stop), 587.5618, z[stop]);
  const yChief0 = (-toStop[1] * fieldSlope) / toStop[0];
  lens.surfaces = lens.surfaces.map((s, i) => {
    const m = pathMatrix(lens, imagePath(lens).slice(0, i), 587.5618, z[i]);
    const marginal = Math.abs(m[0] * ep);
    const chief = Math.abs(m[0] * yChief0 + m[1] * fieldSlope);
    let semi = 1.05 * (marginal + chief);
    if (s.stop) return { ...s, semiDiameterMm: ep * stopHeightRatio(lens, stop) };
    if (s.radiusMm !== 0 && semi > 0.95 * Math.abs(s.radiusMm)) {
      report.push(`  surface ${i}: needs ${semi.toFixed(2)} mm, capped at ${(0.95 * Math.abs(s.radiusMm)).toFixed(2)} (radius ${s.radiusMm.toFixed(2)})`);
      semi = 0.95 * Math.abs(s.radiusMm);
    }
    return { ...s, semiDiameterMm: semi };
  });
  return lens;
}

const r2 = (v: number) => Math.round(v * 1000) / 1000;

function glassKey(g: GlassModel): string {
  return g.kind === 'air' ? 'air' : g.name;
}

function toYaml(lens: LensModel, form: Form): string {
  const lines = [
    `# ${lens.name}: a preset lens of straylight's own design (not a copy of any product, catalogue`,
    '# or patent). Rough form chosen by hand, then solved paraxially by tools/design-lenses.ts:',
    `# scaled to f = ${form.focalMm} mm, back gap at the paraxial focus, semi-diameters from the`,
    `# marginal ray at f/${form.fNumberMin} plus the chief ray at the corner of a 36 x 24 mm frame.`,
    'version: 1',
    `name: ${lens.name}`,
    `note: ${JSON.stringify(lens.note)}`,
    'sensor_width: 36',
    `f_number_min: ${lens.fNumberMin}`,
    `iris: { blades: ${lens.iris.blades}, rotation: ${lens.iris.rotationDeg}, roundness: ${lens.iris.roundness} }`,
  ];
  if (lens.squeeze !== 1) lines.push(`squeeze: ${lens.squeeze}`);
  lines.push('coating: mgf2   # default: single-layer quarter-wave MgF2 at 550 nm on air-glass surfaces');
  lines.push('glasses:');
  lines.push(`  ${DENSE_CROWN.kind === 'abbe' ? `dense-crown: { nd: ${DENSE_CROWN.nd}, vd: ${DENSE_CROWN.vd} }` : ''}`);
  lines.push(`  ${LIGHT_FLINT.kind === 'abbe' ? `light-flint: { nd: ${LIGHT_FLINT.nd}, vd: ${LIGHT_FLINT.vd} }` : ''}`);
  lines.push('surfaces:');
  // like a real multi-coated lens, the single layers are centred at different wavelengths from
  // surface to surface, so the ghosts come in several tints
  const designNm = [550, 500, 600, 470, 620, 530, 580];
  let coated = 0;
  for (const [k, s] of lens.surfaces.entries()) {
    if (s.stop) {
      lines.push(`  - { stop: true, gap: ${r2(s.gapMm)}, semi_diameter: ${r2(s.semiDiameterMm)} }`);
      continue;
    }
    const radius = s.radiusMm === 0 ? 'flat' : r2(s.radiusMm);
    const glass = s.glass.kind === 'air' ? '' : `, glass: ${glassKey(s.glass)}`;
    const before = k === 0 ? AIR : lens.surfaces[k - 1].glass;
    const airGlass = (before.kind === 'air') !== (s.glass.kind === 'air');
    const coating = airGlass ? `, coating: { layer: 1.38, wavelength: ${designNm[coated++ % designNm.length]} }` : '';
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
