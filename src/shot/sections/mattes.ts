// The shot's `mattes`: each matte sequence's name, kind (alpha or depth), frame template, channel,
// frame offset, hold rules, resize rule and depth encoding.

import path from 'node:path';
import { parseFrameTemplate } from '../../format/frame-path.js';
import type { Field } from '../source.js';
import type { ResolvedMatte } from '../types.js';
import type { ResolveContext } from './context.js';

export function resolveMattes(ctx: ResolveContext, f: Field): ResolvedMatte[] | undefined {
  const items = f.list('a list of mattes');
  if (!items) return undefined;
  const seen = new Set<string>();
  const out = items.map((item) => {
    const m = item.map('a matte: {name, kind, path, ...}');
    if (!m) return undefined;
    const name = m.require('name', "the matte's name")?.string('a name');
    if (name && seen.has(name)) m.get('name')!.error(`the name "${name}" is already used by another matte`);
    if (name) seen.add(name);
    const kind = m.require('kind', 'alpha (coverage), depth, or plate (the footage itself)')?.oneOf(['alpha', 'depth', 'plate'] as const);
    const pathField = m.require('path', 'a frame-path template of the matte images, such as mattes/fg.####.png');
    let template: string | undefined;
    const rel = pathField?.string('a frame-path template');
    if (rel !== undefined) {
      const t = parseFrameTemplate(rel);
      if (typeof t === 'string') pathField!.error(t);
      else template = path.resolve(ctx.dir, rel);
    }
    const isExr = template !== undefined && path.extname(template).toLowerCase() === '.exr';
    const ch = m.get('channel');
    let channel: string | undefined;
    if (ch && kind === 'plate') {
      ch.error('a plate matte reads the plate\'s luminance (R, G, B or Y); it takes no channel');
    } else if (ch && isExr) {
      channel = ch.string('an OpenEXR channel name, such as Z, A or depth.Z');
      if (channel !== undefined && !/^[\x21-\x7e]{1,255}$/.test(channel)) ch.error(`"${channel}" is not an OpenEXR channel name`);
    } else if (ch) channel = ch.oneOf(['r', 'g', 'b', 'a'] as const);
    else channel = isExr || kind === 'plate' ? undefined : 'r';
    const off = m.get('offset');
    const offset = off ? off.number({ integer: true, min: -1e9, max: 1e9 }) : 0;
    const bf = m.get('before');
    const before = bf ? bf.oneOf(['hold', 'clear'] as const) : 'hold';
    const af = m.get('after');
    const after = af ? af.oneOf(['hold', 'clear'] as const) : 'hold';
    const inv = m.get('invert');
    if (inv && typeof inv.scalar !== 'boolean') inv.expected('true or false');
    const rs = m.get('resize');
    const resize = rs ? rs.oneOf(['error', 'stretch'] as const) : 'error';
    let depth: ResolvedMatte['depth'];
    const enc = m.get('encoding');
    const near = m.get('near');
    const far = m.get('far');
    const scale = m.get('scale');
    const tol = m.get('tolerance');
    const thr = m.get('threshold');
    let plate: ResolvedMatte['plate'];
    if (kind === 'plate') {
      const threshold = thr ? thr.number({ min: 0, minExclusive: true, max: 1e12 }) : 0.9;
      if (threshold !== undefined) plate = { threshold };
    } else if (thr) thr.error(`threshold is for plate mattes; this one is kind: ${kind ?? 'alpha'}`);
    if (kind === 'depth') {
      // OpenEXR depth is scene depth as rendered; PNG depth is a [0, 1] code between near and far
      const encoding = enc ? enc.oneOf(['normalised', 'inverted', 'linear'] as const) : isExr ? 'linear' : 'normalised';
      const n = near ? near.number({ min: 0, max: 1e12 }) : 0;
      const fa = far ? far.number({ min: 0, max: 1e12 }) : 1;
      const sc = scale ? scale.number({ min: 0, minExclusive: true, max: 1e12 }) : 1;
      const to = tol ? tol.number({ min: 0, minExclusive: true, max: 1e12 }) : 0.01 * ((fa ?? 1) - (n ?? 0) || 1);
      if (encoding && encoding !== 'linear' && (!near || !far)) m.reportMissing(near ? 'far' : 'near', '"near" and "far" (the depths that stored 0 and 1 stand for)');
      if (encoding && n !== undefined && fa !== undefined && sc !== undefined && to !== undefined && (encoding === 'linear' || (near && far))) {
        if (encoding !== 'linear' && fa <= n) far!.error(`expected far beyond near (${n}), found ${fa}`);
        else depth = { encoding, near: n, far: fa, scale: sc, tolerance: to };
      }
    } else {
      for (const [k, x] of [['encoding', enc], ['near', near], ['far', far], ['scale', scale], ['tolerance', tol]] as const) {
        if (x) x.error(`${k} is for depth mattes; this one is kind: ${kind ?? 'alpha'}`);
      }
    }
    m.finish();
    if (!name || !kind || !template || (ch && channel === undefined) || offset === undefined || !before || !after || !resize || (kind === 'depth' && !depth) || (kind === 'plate' && !plate)) return undefined;
    return {
      name,
      kind,
      template,
      ...(channel !== undefined ? { channel } : {}),
      offset,
      before,
      after,
      invert: inv ? inv.scalar === true : false,
      ...(depth ? { depth } : {}),
      ...(plate ? { plate } : {}),
      resize,
      at: pathField!.loc,
      atPath: pathField!.path,
    } satisfies ResolvedMatte;
  });
  return out.every((x) => x !== undefined) ? (out as ResolvedMatte[]) : undefined;
}
