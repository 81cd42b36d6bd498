// A lens prescription table, as optics handbooks and patent literature print them: one row per
// surface, "surface, radius, thickness, n_d, V_d, semi-diameter" (the trade's column order; the
// thickness is the axial distance to the next surface, n_d and V_d the medium after the surface,
// blank or "air" for air). Comma-separated, or columns separated by spaces (then air is written
// "air" or "-"). The stop is the row whose surface column reads STO or stop (its radius flat);
// flat surfaces are "inf", "infinity", "flat" or 0; a header row and "#" comments are skipped.
// Turned into a straylight lens file (YAML) with every problem located at file:line:col.

import type { Diagnostic } from '../errors.js';

export interface PrescriptionRow {
  stop: boolean;
  /** mm; 0 = flat */
  radiusMm: number;
  thicknessMm: number;
  /** absent: air after the surface */
  glass?: { nd: number; vd: number };
  semiDiameterMm: number;
  /** the table's line (1-based) the row stands on */
  line?: number;
}

const FLAT = /^(inf|infinity|flat|∞|0|0\.0*)$/i;
const AIR = /^(|air|-|1|1\.0*)$/i;
const NUMBER = /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/;

/** The rows of a table, or undefined with the problems in `diagnostics`. */
export function parsePrescription(text: string, file: string, diagnostics: Diagnostic[]): PrescriptionRow[] | undefined {
  const rows: PrescriptionRow[] = [];
  const lines = text.split(/\r?\n/);
  let headerSeen = false;
  const start = diagnostics.length;
  lines.forEach((raw, i) => {
    const line = raw.replace(/#.*$/, '');
    if (line.trim() === '') return;
    // fields with the column each starts at (1-based)
    const fields: { text: string; col: number }[] = [];
    const re = line.includes(',') ? /([^,]*)(,|$)/g : /(\S+)/g;
    let m: RegExpExecArray | null;
    while ((m = re.exec(line)) && m[0] !== '') {
      const t = m[1];
      const lead = t.length - t.trimStart().length;
      fields.push({ text: t.trim(), col: m.index + lead + 1 });
      if (!line.includes(',') && re.lastIndex >= line.length) break;
    }
    const at = (k: number) => ({ file, line: i + 1, col: fields[k]?.col ?? 1 });
    const problem = (k: number, what: string, message: string) => diagnostics.push({ loc: at(k), path: what, message });
    if (!headerSeen && rows.length === 0 && fields.length >= 2 && !/^(\d+|sto|stop)$/i.test(fields[0].text) && !NUMBER.test(fields[1].text)) {
      headerSeen = true; // a header row naming the columns
      return;
    }
    if (fields.length !== 6 && fields.length !== 4) {
      problem(0, 'row', `expected 6 columns (surface, radius, thickness, n_d, V_d, semi-diameter), or 4 for a surface followed by air (surface, radius, thickness, semi-diameter); found ${fields.length}`);
      return;
    }
    const [surface, radius, thickness] = fields;
    const sd = fields[fields.length - 1];
    const stop = /^(sto|stop)$/i.test(surface.text);
    if (!stop && !/^\d+$/.test(surface.text)) return problem(0, 'surface', `expected a surface number, or STO for the stop, found "${surface.text}"`);
    const num = (f: { text: string }, k: number, what: string, min: number, max: number): number | undefined => {
      if (!NUMBER.test(f.text)) return void problem(k, what, `expected a number, found "${f.text}"`);
      const v = Number(f.text);
      if (!(v >= min && v <= max)) return void problem(k, what, `expected ${what} from ${min} to ${max}, found ${v}`);
      return v;
    };
    let radiusMm: number | undefined = 0;
    if (!FLAT.test(radius.text)) {
      radiusMm = num(radius, 1, 'radius', -1e6, 1e6);
      if (stop && radiusMm !== undefined) return problem(1, 'radius', `the stop is flat: give inf, found ${radiusMm}`);
      if (radiusMm !== undefined && Math.abs(radiusMm) < 0.5) return problem(1, 'radius', `expected |radius| of at least 0.5 mm (or inf for flat), found ${radiusMm}`);
    }
    const thicknessMm = num(thickness, 2, 'thickness', 0, 1e5);
    const semiDiameterMm = num(sd, fields.length - 1, 'semi-diameter', 0, 1e4);
    let glass: PrescriptionRow['glass'];
    if (fields.length === 6 && !(AIR.test(fields[3].text) && AIR.test(fields[4].text))) {
      const nd = num(fields[3], 3, 'n_d', 1.0001, 3);
      const vd = num(fields[4], 4, 'V_d', 10, 120);
      if (nd !== undefined && vd !== undefined) glass = { nd, vd };
      else return;
    }
    if (radiusMm === undefined || thicknessMm === undefined || semiDiameterMm === undefined) return;
    if (semiDiameterMm <= 0 && !stop) return problem(fields.length - 1, 'semi-diameter', 'expected a semi-diameter above 0');
    if (radiusMm !== 0 && semiDiameterMm > Math.abs(radiusMm)) return problem(fields.length - 1, 'semi-diameter', `the semi-diameter ${semiDiameterMm} exceeds the radius of curvature ${Math.abs(radiusMm)}`);
    rows.push({ stop, radiusMm, thicknessMm, ...(glass ? { glass } : {}), semiDiameterMm, line: i + 1 });
  });
  if (diagnostics.length > start) return undefined;
  const where = { file, line: 1, col: 1 };
  if (rows.length < 2) return void diagnostics.push({ loc: where, path: '', message: `expected at least two surfaces, found ${rows.length}` });
  const stops = rows.filter((r) => r.stop).length;
  if (stops !== 1) return void diagnostics.push({ loc: where, path: '', message: stops === 0 ? 'no stop: mark the stop row with STO in the surface column' : `${stops} rows are marked as the stop; a lens has one` });
  if (rows[rows.length - 1].glass) return void diagnostics.push({ loc: where, path: '', message: 'the last surface is followed by glass: the table must end in air (the image side)' });
  return rows;
}

/** A lens file (YAML) for the rows: glasses by n_d and V_d, the stop's gap, our defaults noted. */
export function prescriptionLensText(rows: PrescriptionRow[], o: { name: string; source: string; sensorWidthMm: number; fNumberMin: number }): string {
  const glassName = (g: { nd: number; vd: number }) => `nd${g.nd}-vd${g.vd}`;
  const glasses = new Map<string, { nd: number; vd: number }>();
  for (const r of rows) if (r.glass) glasses.set(glassName(r.glass), r.glass);
  const surfaces = rows.map((r) =>
    r.stop
      ? `  - { stop: true, gap: ${r.thicknessMm}${r.semiDiameterMm > 0 ? `, semi_diameter: ${r.semiDiameterMm}` : ''} }`
      : `  - { radius: ${r.radiusMm === 0 ? 'flat' : r.radiusMm}, gap: ${r.thicknessMm}${r.glass ? `, glass: ${glassName(r.glass)}` : ''}, semi_diameter: ${r.semiDiameterMm} }`,
  );
  return [
    `# ${o.name}: imported by straylight import-lens from ${o.source}.`,
    `# Glasses by n_d and V_d (a normal glass's dispersion); coatings: straylight's default.`,
    `version: 1`,
    `name: ${o.name}`,
    `note: "imported from ${o.source.replace(/"/g, "'")}"`,
    `sensor_width: ${o.sensorWidthMm}`,
    `f_number_min: ${Number(o.fNumberMin.toFixed(3))}`,
    ...(glasses.size ? ['glasses:', ...[...glasses].map(([n, g]) => `  ${n}: { nd: ${g.nd}, vd: ${g.vd} }`)] : []),
    `surfaces:`,
    ...surfaces,
    '',
  ].join('\n');
}
