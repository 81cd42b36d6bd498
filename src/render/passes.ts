// Separate passes: one sequence per flare element, so a compositor can balance them later. Each
// pass is the shot with only its element on, written beside the combined name (x.glow.####.png),
// so resuming, shards, manifests and verify work per pass exactly as for one sequence. Layers: the
// same passes rendered for one frame, written as layers of one OpenEXR with their sum as the
// combined image (one sequence, so resuming and the rest work as for any).

import { parseFrameTemplate } from '../format/frame-path.js';
import { adoptShotAssets, matteProvider, renderFrame, shotAssets } from './render-frame.js';
import { FloatImage } from '../raster/image.js';
import type { ElementName, LightFlare, ResolvedShot } from '../shot/types.js';

export const ELEMENTS: ElementName[] = ['core', 'glow', 'ghosts', 'starburst', 'veil', 'streak', 'dust'];

/** Whether an element adds anything with these flare settings. */
function adds(f: LightFlare, e: ElementName, hasLens: boolean): boolean {
  if (!f.elements[e].enabled) return false;
  switch (e) {
    case 'glow':
      return f.glow.fraction > 0;
    case 'ghosts':
      return hasLens && f.ghosts.enabled;
    case 'starburst':
      return f.starburst.fraction > 0;
    case 'veil':
      return f.veil.fraction > 0;
    case 'streak':
      return f.streak.fraction > 0;
    case 'dust':
      return f.dust.fraction > 0;
    default:
      return true;
  }
}

/** The elements that add anything to this shot's frames (the shot's settings or any light's own). */
export function activeElements(shot: ResolvedShot): ElementName[] {
  return ELEMENTS.filter((e) => adds(shot, e, Boolean(shot.lens)) || shot.lights.some((l) => l.flare && adds(l.flare, e, Boolean(shot.lens))));
}

/** The pass's file template: the element's name before the frame number. */
export function passTemplate(template: string, element: ElementName): string {
  const t = parseFrameTemplate(template);
  if (typeof t === 'string') throw new Error(t);
  const hashes = template.slice(t.prefix.length, template.length - t.suffix.length);
  return `${t.prefix}${element}.${hashes}${t.suffix}`;
}

/** The shot with only one element on, writing to that element's sequence. */
export function passShot(shot: ResolvedShot, element: ElementName): ResolvedShot {
  const only = (els: ResolvedShot['elements']) => Object.fromEntries(ELEMENTS.map((e) => [e, { ...els[e], enabled: e === element && els[e].enabled }])) as ResolvedShot['elements'];
  const elements = only(shot.elements);
  const lights = shot.lights.map((l) => (l.flare ? { ...l, flare: { ...l.flare, elements: only(l.flare.elements) } } : l));
  const pass: ResolvedShot = { ...shot, lights, elements, output: { ...shot.output, template: passTemplate(shot.output.template, element), passes: 'combined' } };
  adoptShotAssets(pass, shotAssets(shot)); // the lens and kernels are the shot's; build them once
  return pass;
}

/** Each active element's pass of a layered shot, made once per shot. */
const layerShots = new WeakMap<ResolvedShot, { element: ElementName; shot: ResolvedShot }[]>();

/**
 * One frame of a layered shot: each active element rendered alone, and their sum (the combined
 * image, exactly the sum of its layers). The passes share the shot's mattes.
 */
export function renderLayers(shot: ResolvedShot, frame: number, target?: FloatImage): { combined: FloatImage; layers: { name: string; img: FloatImage }[] } {
  let passes = layerShots.get(shot);
  if (!passes) layerShots.set(shot, (passes = activeElements(shot).map((e) => ({ element: e, shot: passShot(shot, e) }))));
  const mattes = matteProvider(shot);
  const layers = passes.map((p) => ({ name: p.element, img: renderFrame(p.shot, frame, undefined, mattes) }));
  const combined = target && target.width === shot.frame.widthPx && target.height === shot.frame.heightPx ? target : new FloatImage(shot.frame.widthPx, shot.frame.heightPx);
  const sum = combined.data;
  sum.fill(0);
  for (const l of layers) {
    const d = l.img.data;
    for (let i = 0; i < sum.length; i++) sum[i] += d[i];
  }
  return { combined, layers };
}

/** The sequences a shot writes: its own, or one per active element. */
export function outputSequences(shot: ResolvedShot): { name: string; shot: ResolvedShot }[] {
  if (shot.output.passes !== 'separate') return [{ name: 'combined', shot }];
  return activeElements(shot).map((e) => ({ name: e, shot: passShot(shot, e) }));
}
