// The shot's `output`: frame template, format, transfer, alpha, passes, OpenEXR settings and the
// colour space frames are written in.

import path from 'node:path';
import { parseFrameTemplate } from '../../format/frame-path.js';
import type { Field } from '../source.js';
import type { ResolvedOutput } from '../types.js';
import type { ResolveContext } from './context.js';
import { SPACE_NAMES } from '../../colour/spaces.js';

export function resolveOutput(ctx: ResolveContext, f: Field): ResolvedOutput | undefined {
  const m = f.map();
  if (!m) return undefined;
  const pathField = m.require('path', 'a frame-path template such as render/shot.####.png');
  const formatField = m.get('format');
  const format = formatField ? formatField.oneOf(['png16', 'png8', 'exr'] as const) : 'png16';
  const tf = m.get('transfer');
  const transfer = tf ? tf.oneOf(['srgb', 'linear'] as const) : format === 'exr' ? 'linear' : 'srgb';
  if (format === 'exr' && transfer === 'srgb') tf!.error('OpenEXR files are scene-linear: give transfer: linear, or leave it out');
  const ef = m.get('exr');
  let exr: ResolvedOutput['exr'] | undefined = { type: 'half', compression: 'zip' };
  if (ef) {
    const em = ef.map('{type: half | float, compression: none | zips | zip}');
    const t = em?.get('type');
    const c = em?.get('compression');
    const type = t ? t.oneOf(['half', 'float'] as const) : 'half';
    const compression = c ? c.oneOf(['none', 'zips', 'zip'] as const) : 'zip';
    em?.finish();
    exr = em && type && compression ? { type, compression } : undefined;
    if (format !== 'exr') ef.error('exr settings need format: exr');
  }
  const af = m.get('alpha');
  const alpha = af ? af.oneOf(['none', 'premultiplied', 'emission'] as const) : 'none';
  if (alpha === 'emission' && format !== 'exr') af!.error('alpha: emission needs format: exr (PNG stores straight alpha, so light under a zero alpha would be lost)');
  const pf = m.get('passes');
  const passes = pf ? pf.oneOf(['combined', 'separate', 'layers'] as const) : 'combined';
  if (passes === 'layers' && format && format !== 'exr') pf!.error('layers are OpenEXR layers: give format: exr, or passes: separate for one PNG sequence per element');
  const csf = m.get('colour_space');
  const colourSpace = csf ? csf.oneOf(SPACE_NAMES) : 'rec709';
  if (colourSpace && colourSpace !== 'rec709' && format && format !== 'exr') {
    csf!.error(`PNG frames are display-referred sRGB (Rec.709 primaries); ${colourSpace} output needs format: exr`);
  }
  m.finish();
  const rel = pathField?.string('a frame-path template such as render/shot.####.png');
  let template: string | undefined;
  if (rel !== undefined) {
    const problem = checkOutputTemplate(rel, format ?? 'png16');
    if (problem) pathField!.error(problem);
    else template = path.resolve(ctx.dir, rel);
  }
  if (!template || !format || !transfer || !alpha || !passes || !exr || !colourSpace) return undefined;
  if (colourSpace !== 'rec709' && format !== 'exr') return undefined;
  if (passes === 'layers' && format !== 'exr') return undefined;
  if (format === 'exr' && transfer === 'srgb') return undefined;
  if (alpha === 'emission' && format !== 'exr') return undefined;
  return { template, format, transfer, alpha, passes, exr, colourSpace };
}

/** A problem with an output template for a format, or undefined when it is fine. */
export function checkOutputTemplate(template: string, format: string): string | undefined {
  const t = parseFrameTemplate(template);
  if (typeof t === 'string') return t;
  if (/[#%]/.test(path.dirname(template))) return 'put the frame-number placeholder in the file name, not a folder';
  const ext = path.extname(template).toLowerCase();
  const wanted = format.startsWith('png') ? '.png' : `.${format}`;
  if (ext !== wanted) return `the file name must end in ${wanted} for format ${format}, found "${ext || 'no extension'}"`;
  return undefined;
}
