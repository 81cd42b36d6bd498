// Lens descriptions in YAML: a lens file of its own, a preset (a lens file shipped in lenses/), or
// the same keys inline in a shot's `lens:` section. Located errors, like the shot file's.

import { lensGeometry } from '../optics/geometry.js';
import { quarterWave, type Coating } from '../optics/coating.js';
import { AIR, CATALOGUE, type GlassModel } from '../optics/glass.js';
import type { Iris, LensModel, LensSurface } from '../optics/lens.js';
import type { Diagnostic } from '../errors.js';
import { Field, MapField, parseYamlSource } from './source.js';

/** A lens file of its own (version 1), with its problems located in that file. */
export function parseLensText(text: string, shownFile: string, defaultName: string): { model?: LensModel; diagnostics: Diagnostic[] } {
  const { ctx, root } = parseYamlSource(text, shownFile);
  let model: LensModel | undefined;
  const m = root?.map('a lens: a mapping with version, surfaces, ...');
  if (m) {
    const v = m.require('version', 'the lens-file format version, 1');
    if (v && v.scalar !== 1) v.expected('version 1');
    model = readLens(m, defaultName);
    m.finish();
  }
  return ctx.diagnostics.length ? { diagnostics: ctx.diagnostics } : { model, diagnostics: [] };
}

/** Single-layer quarter-wave MgF2 (n 1.38) at 550 nm: the default for air-glass surfaces. */
export const DEFAULT_COATING: Coating = [quarterWave(1.38, 550)];

/** Keys a lens description has (for "did you mean" when a shot mixes them up). */
export const LENS_KEYS = ['name', 'note', 'sensor_width', 'f_number_min', 'iris', 'squeeze', 'hood', 'coating', 'glasses', 'surfaces'];

/** Read the lens keys of a mapping; the caller declares its own other keys and calls finish(). */
export function readLens(m: MapField, defaultName: string): LensModel | undefined {
  const nameField = m.get('name');
  const name = nameField ? nameField.string('a name') : defaultName;
  const noteField = m.get('note');
  const note = noteField ? noteField.string('a note') : '';
  const sw = m.get('sensor_width');
  const sensorWidthMm = sw ? sw.number({ min: 1, max: 200 }) : 36;
  const fm = m.get('f_number_min');
  const fNumberMin = fm ? fm.number({ min: 0.5, max: 64 }) : 2.8;
  const irisField = m.get('iris');
  const iris = irisField ? readIris(irisField) : { blades: 6, rotationDeg: 0, roundness: 0 };
  const sq = m.get('squeeze');
  const squeeze = sq ? sq.number({ min: 1, max: 3 }) : 1;
  const hoodField = m.get('hood');
  const hood = hoodField ? readHood(hoodField) : undefined;
  const coatingField = m.get('coating');
  const coating = coatingField ? readCoating(coatingField) : DEFAULT_COATING;
  const glassesField = m.get('glasses');
  const glasses = new Map<string, GlassModel>(Object.entries(CATALOGUE));
  // glasses defined with a problem (already reported where they are defined): a surface naming
  // one is not reported again
  const faulty = new Set<string>();
  if (glassesField) {
    const gm = glassesField.map('a mapping of glass names to {nd, vd} or {sellmeier: {b, c}}');
    if (gm) {
      for (const key of gm.keys()) {
        const g = readGlassDefinition(gm.get(key)!, key);
        if (g) glasses.set(key, g);
        else faulty.add(key);
      }
      gm.finish();
    }
  }
  const surfacesField = m.require('surfaces', 'the surfaces, front to back');
  const list = surfacesField?.list('a list of surfaces, front (object side) to back');
  let surfaces: LensSurface[] | undefined;
  if (list && coating) {
    if (list.length < 2) surfacesField!.error(`expected at least a surface and the stop, found ${list.length}`);
    const read = list.map((f) => readSurface(f, glasses, faulty));
    if (read.every((s) => s !== undefined)) {
      // surfaces without a coating of their own take the lens's between air and glass, and none
      // between two glasses (a cemented interface)
      surfaces = (read as { surface: LensSurface; coating?: Coating }[]).map(({ surface, coating: own }, k, all) => {
        const before = k === 0 ? AIR : all[k - 1].surface.glass;
        const cemented = before.kind !== 'air' && surface.glass.kind !== 'air';
        return { ...surface, coating: surface.stop ? [] : (own ?? (cemented ? [] : coating)) };
      });
      const stops = surfaces.filter((s) => s.stop).length;
      if (stops !== 1) surfacesField!.error(`expected exactly one surface with stop: true, found ${stops}`);
      else if (surfaces[surfaces.length - 1].stop) surfacesField!.error('the stop cannot be the last surface: the last gap reaches the sensor');
    }
  }
  if (!name || note === undefined || !sensorWidthMm || !fNumberMin || !iris || !squeeze || !surfaces || (hoodField && !hood)) return undefined;
  if (surfaces.filter((s) => s.stop).length !== 1 || surfaces[surfaces.length - 1].stop) return undefined;
  const model: LensModel = { name, note, surfaces, iris, fNumberMin, sensorWidthMm, squeeze, ...(hood ? { hood } : {}) };
  // a lens that could not be built is refused, at the surface where it fails
  let buildable = true;
  for (const p of lensGeometry(model)) {
    if (p.severity !== 'error') continue;
    list![p.surface].error(p.message);
    buildable = false;
  }
  return buildable ? model : undefined;
}

/** `none`, or {depth, radius} in mm: the front barrel or hood's opening, ahead of the first vertex. */
export function readHood(f: Field): { depthMm: number; radiusMm: number } | undefined {
  if (f.isString()) return f.oneOf(['none'] as const) ? { depthMm: 0, radiusMm: 0 } : undefined;
  const m = f.map('none, or {depth, radius} in millimetres');
  if (!m) return undefined;
  const depthMm = m.require('depth', 'how far the opening sits ahead of the first surface, mm')?.number({ min: 0, max: 1000 });
  const radiusMm = m.require('radius', "the opening's radius, mm")?.number({ min: 0, minExclusive: true, max: 1000 });
  m.finish();
  return depthMm === undefined || radiusMm === undefined ? undefined : { depthMm, radiusMm };
}

export function readIris(f: Field): Iris | undefined {
  const m = f.map('{blades, rotation, roundness}');
  if (!m) return undefined;
  const b = m.get('blades');
  const blades = b ? b.number({ integer: true, min: 0, max: 16 }) : 6;
  const r = m.get('rotation');
  const rotationDeg = r ? r.number({ min: -360, max: 360 }) : 0;
  const rd = m.get('roundness');
  const roundness = rd ? rd.number({ min: 0, max: 1 }) : 0;
  m.finish();
  if (blades === undefined || rotationDeg === undefined || roundness === undefined) return undefined;
  if (blades > 0 && blades < 3) return b!.error(`expected 0 (a round iris) or 3 to 16 blades, found ${blades}`);
  return { blades, rotationDeg, roundness: blades === 0 ? 1 : roundness };
}

/** none | mgf2 | {layer: index, wavelength: nm} | {layers: [{index, thickness}]} */
export function readCoating(f: Field): Coating | undefined {
  if (f.isString()) {
    const w = f.oneOf(['none', 'mgf2'] as const);
    if (w === 'none') return [];
    if (w === 'mgf2') return DEFAULT_COATING;
    return undefined;
  }
  const m = f.map('none, mgf2, {layer: index, wavelength: nm} or {layers: [{index, thickness}]}');
  if (!m) return undefined;
  const layer = m.get('layer');
  const wl = m.get('wavelength');
  const layers = m.get('layers');
  m.finish();
  if (layer && layers) return f.error('give either layer (one quarter-wave layer) or layers, not both');
  if (layer) {
    const index = layer.number({ min: 1, max: 3 });
    const nm = wl ? wl.number({ min: 300, max: 1000 }) : 550;
    return index === undefined || nm === undefined ? undefined : [quarterWave(index, nm)];
  }
  if (layers) {
    const items = layers.list('a list of {index, thickness} layers, from the front');
    if (!items) return undefined;
    if (items.length > 16) return layers.error(`expected at most 16 layers, found ${items.length}`);
    const out = items.map((it) => {
      const lm = it.map('{index, thickness}');
      if (!lm) return undefined;
      const index = lm.require('index', 'refractive index of the layer')?.number({ min: 1, max: 3 });
      const t = lm.require('thickness', 'physical thickness in nm')?.number({ min: 0, max: 10_000 });
      lm.finish();
      return index === undefined || t === undefined ? undefined : { index, thicknessNm: t };
    });
    return out.every((x) => x !== undefined) ? (out as Coating) : undefined;
  }
  return f.error('expected none, mgf2, {layer: index, wavelength: nm} or {layers: [...]}, found an empty mapping');
}

function readGlassDefinition(f: Field, name: string): GlassModel | undefined {
  const m = f.map('{nd, vd} or {sellmeier: {b: [b1, b2, b3], c: [c1, c2, c3]}}');
  if (!m) return undefined;
  const nd = m.get('nd');
  const vd = m.get('vd');
  const sm = m.get('sellmeier');
  m.finish();
  if (sm) {
    if (nd || vd) return f.error('give either nd and vd, or sellmeier, not both');
    const s = sm.map('{b: [b1, b2, b3], c: [c1, c2, c3]} (c in square micrometres)');
    if (!s) return undefined;
    const b = s.require('b', 'the three B coefficients')?.numbers(3, { min: -100, max: 100 });
    const c = s.require('c', 'the three C coefficients, um^2')?.numbers(3, { min: 0, max: 10_000 });
    s.finish();
    return b && c ? { kind: 'sellmeier', name, b: b as [number, number, number], c: c as [number, number, number] } : undefined;
  }
  if (!nd || !vd) return f.error('expected {nd, vd} or {sellmeier: {...}}');
  const n = nd.number({ min: 1.2, max: 2.5 });
  const v = vd.number({ min: 10, max: 120 });
  return n === undefined || v === undefined ? undefined : { kind: 'abbe', name, nd: n, vd: v };
}

function readGlassRef(f: Field, glasses: Map<string, GlassModel>, faulty: Set<string>): GlassModel | undefined {
  if (f.isString()) {
    const name = f.scalar as string;
    if (name === 'air') return AIR;
    const g = glasses.get(name);
    if (g) return g;
    if (faulty.has(name)) return undefined;
    f.oneOf(['air', ...glasses.keys()]); // reports the unknown name, with a hint
    return undefined;
  }
  return readGlassDefinition(f, 'inline glass');
}

function readSurface(f: Field, glasses: Map<string, GlassModel>, faulty: Set<string>): { surface: LensSurface; coating?: Coating } | undefined {
  const m = f.map('a surface: {radius, gap, glass, semi_diameter, coating} or {stop: true, gap}');
  if (!m) return undefined;
  const stopField = m.get('stop');
  const isStop = stopField ? stopField.scalar === true : false;
  if (stopField && typeof stopField.scalar !== 'boolean') stopField.expected('true or false');
  const rField = isStop ? undefined : m.require('radius', 'radius of curvature in mm, or flat');
  let radiusMm: number | undefined = 0;
  if (rField) {
    if (rField.scalar === 'flat') radiusMm = 0;
    else {
      const r = rField.number({ min: -1e6, max: 1e6 });
      if (r !== undefined && r !== 0 && Math.abs(r) < 0.5) radiusMm = rField.error(`expected |radius| of at least 0.5 mm (or flat), found ${r}`);
      else radiusMm = r;
    }
  }
  const gapMm = m.require('gap', 'distance to the next surface (the last: to the sensor), mm')?.number({ min: 0, max: 10_000 });
  const gField = m.get('glass');
  const glass = gField ? readGlassRef(gField, glasses, faulty) : AIR;
  if (isStop && gField && glass && glass.kind !== 'air') gField.error('the stop sits in air');
  const sdField = isStop ? m.get('semi_diameter') : m.require('semi_diameter', 'clear semi-diameter in mm');
  const semiDiameterMm = sdField ? sdField.number({ min: 0, minExclusive: true, max: 1000 }) : 1e6;
  const cField = m.get('coating');
  const coating = cField ? readCoating(cField) : undefined;
  m.finish();
  if (radiusMm === undefined || gapMm === undefined || !glass || semiDiameterMm === undefined || (cField && !coating)) return undefined;
  if (radiusMm !== 0 && semiDiameterMm > Math.abs(radiusMm)) return sdField!.error(`the semi-diameter ${semiDiameterMm} exceeds the radius of curvature ${Math.abs(radiusMm)}`);
  return { surface: { radiusMm, gapMm, glass, semiDiameterMm, coating: [], stop: isStop }, coating };
}
