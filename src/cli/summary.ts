// The text `straylight check` prints: what a shot will render.

import { easingLabel } from '../timeline/easing.js';
import { formatFrameRate, frameRateValue } from '../timeline/frame-rate.js';
import { framesToTimecode } from '../timeline/timecode.js';
import path from 'node:path';
import type { ResolvedShot } from '../shot/types.js';
import { activeElements } from '../render/passes.js';
import { formatBytes, planWorkers, type WorkerPlan } from '../render/memory.js';
import { framesOnDisk } from '../io/read-frame.js';
import { cameraFocalMm, lightPaths } from '../render/light-paths.js';
import { focalLength } from '../optics/paraxial.js';

/** Where and how the machine would run it, for `check`. */
export interface SummaryContext {
  /** the current folder (the output is said to be outside it and the shot's folder, or not) */
  cwd: string;
  /** workers the render would ask for, and the memory it may use */
  jobs: number;
  budgetBytes: number;
}

export function shotSummary(shot: ResolvedShot, shown: string, run?: SummaryContext): string {
  const f = shot.frame;
  const count = f.last - f.first + 1;
  const seconds = count / frameRateValue(f.rate);
  const tc = (n: number) => framesToTimecode(n, f.rate, f.dropFrame);
  const lines = [
    ['shot', shown],
    ['frame', `${f.widthPx}x${f.heightPx} px, pixel aspect ${f.pixelAspect}, optical centre (${f.opticalCentre.join(', ')})`],
    ['rate', `${formatFrameRate(f.rate)} fps${f.dropFrame ? ', drop-frame timecode' : ''}`],
    ['range', `${f.first}-${f.last} (${count} frames, ${seconds.toFixed(3)} s)`],
    ['timecode', `${tc(f.timecodeStartFrames)} - ${tc(f.timecodeStartFrames + count - 1)}`],
  ];
  const warnings: string[] = [];
  for (const l of shot.lights) {
    const colour = 'kelvin' in l.colourSpec ? `${l.colourSpec.kelvin} K` : `rgb ${l.colourSpec.rgb.join(' ')}`;
    const values = l.intensity.map((k) => k.value);
    const span = values.length > 1 ? `${Math.min(...values)}..${Math.max(...values)}` : `${values[0]}`;
    const eases = [...new Set(l.position.slice(0, -1).map((k) => easingLabel(k.ease)))].join(', ') || 'constant';
    const w = l.world;
    const place = !w
      ? `${l.position.length} position key(s) (${l.path}; ${eases})`
      : w.kind === 'point'
        ? `in the world at ${w.position.length} position key(s) (${w.path})`
        : w.kind === 'direction'
          ? `at infinity, ${w.direction.length} direction key(s)`
          : `scene node ${w.nodeName}${w.light ? ` (${w.light.type} light, ${w.light.intensity.toPrecision(5)} ${w.light.type === 'directional' ? 'lux' : 'cd'})` : ''}`;
    const level = w?.kind === 'scene' && w.light ? `its scene's level${span === (l.intensityUnit === 'stops' ? '0' : '1') ? '' : `, trimmed ${span} ${l.intensityUnit}`}` : `intensity ${span} ${l.intensityUnit}`;
    lines.push(['light', `${l.name}: ${colour}, radius ${l.radiusPx} px, ${place}, ${level}`]);
  }
  if (shot.camera) {
    const c = shot.camera;
    const fmm = cameraFocalMm(shot, f.first)!;
    const timing = c.kind === 'scene' ? `; scene time = (frame - ${c.frameOffset}) / ${c.sceneRate} s` : '';
    lines.push(['camera', `${c.source}: ${fmm.toFixed(2)} mm on ${c.sensorWidthMm} mm at frame ${f.first}${timing}`]);
    const display = (f.widthPx * f.pixelAspect) / f.heightPx;
    if (c.kind === 'scene' && c.camera.aspectRatio && Math.abs(c.camera.aspectRatio / display - 1) > 0.01) {
      warnings.push(`the scene's camera was made for a ${c.camera.aspectRatio.toFixed(3)}:1 frame and this one is ${display.toFixed(3)}:1; its horizontal field fills the width, so the frame shows ${c.camera.aspectRatio > display ? 'more' : 'less'} above and below than the scene's renders`);
    }
    if (shot.lens) {
      const lf = focalLength(shot.lens.model);
      if (Math.abs(lf / fmm - 1) > 0.01) {
        warnings.push(`the camera's field is that of ${fmm.toFixed(1)} mm on ${c.sensorWidthMm} mm, the lens ${shot.lens.source} is ${lf.toFixed(1)} mm on ${shot.lens.model.sensorWidthMm} mm: the camera decides where lights land; the lens draws its ghosts from those places, as for any light placed there`);
      }
    }
    for (const p of lightPaths(shot)) {
      const light = shot.lights.find((l) => l.name === p.name)!;
      if (!light.world) continue;
      const seen = p.first === undefined ? 'never on the frame' : `on the frame ${p.onFrames} of ${count} frames (first ${p.first}, last ${p.last})`;
      const near = p.nearest ? `; nearest the centre at frame ${p.nearest.frame} (${p.nearest.xPx.toFixed(1)}, ${p.nearest.yPx.toFixed(1)}), ${p.nearest.distancePx.toFixed(0)} px off` : '';
      const behind = p.behindFrames ? `; behind the camera on ${p.behindFrames} frames` : '';
      const depth = p.depth ? `; depth ${p.depth[0].toPrecision(4)}-${p.depth[1].toPrecision(4)}` : '';
      lines.push(['  path', `${p.name}: ${seen}${near}${behind}${depth}`]);
      if (p.first === undefined) warnings.push(`the light "${p.name}" is never on the frame: check the camera, the scene's frame offset (camera.scene_frame_offset) and the light's place`);
    }
  }
  if (shot.lens) {
    const l = shot.lens;
    const fn = l.fNumber.map((k) => k.value);
    const stop = fn.length > 1 ? `f/${Math.min(...fn)}..f/${Math.max(...fn)} (${fn.length} keys)` : `f/${fn[0]}`;
    const reflecting = l.model.surfaces.filter((s) => !s.stop).length;
    const ghosts = shot.ghosts.enabled && shot.elements.ghosts.enabled ? `${(reflecting * (reflecting - 1)) / 2} ghost paths, quality ${shot.ghosts.quality}` : 'ghosts off';
    lines.push(['lens', `${l.source}: ${l.model.note || l.model.name}; ${stop}; ${ghosts}`]);
  } else {
    lines.push(['lens', 'none (no ghosts; the starburst uses a plain 6-blade iris at f/8 on 36 mm)']);
  }
  for (const m of shot.mattes) {
    const on = framesOnDisk(m.template);
    lines.push(['matte', `${m.name}: ${m.kind}, ${m.template} (${on.length ? `frames ${on[0]}-${on[on.length - 1]}` : 'no frames'}${m.offset ? `, offset ${m.offset}` : ''})`]);
  }
  const on = new Set(activeElements(shot));
  const gainNote = (n: keyof ResolvedShot['elements']) => {
    const g = shot.elements[n].gain;
    return g.length > 1 || g[0].value !== 1 ? `, gain ${g.length > 1 ? `${g.length} keys` : g[0].value}` : '';
  };
  const g = shot.glow;
  lines.push(['core', on.has('core') ? `each light's disk${gainNote('core')}` : 'off']);
  lines.push(['glow', on.has('glow') ? `${g.fraction} of each light's flux, size ${g.sizePx} px, tail falloff ${g.falloff}${gainNote('glow')}` : 'off']);
  if (shot.lens) lines.push(['ghosts', on.has('ghosts') ? `quality ${shot.ghosts.quality}, gain ${shot.ghosts.gain}, threshold ${shot.ghosts.threshold}${gainNote('ghosts')}` : 'off']);
  if (on.has('starburst')) {
    // the Airy radius on the sensor is 1.22 lambda N (Goodman; OPTICS.md section 6), at 550 nm
    const fNumber = shot.lens ? Math.min(...shot.lens.fNumber.map((k) => k.value)) : 8;
    const sensorMm = shot.lens?.model.sensorWidthMm ?? 36;
    const airyPx = ((1.22 * 550e-6 * fNumber) / (sensorMm / f.widthPx)) * shot.starburst.size;
    lines.push(['starburst', `${shot.starburst.fraction} of each light's flux, size ${shot.starburst.size} (Airy radius ${airyPx < 10 ? airyPx.toFixed(2) : airyPx.toFixed(0)} px at f/${fNumber})${gainNote('starburst')}`]);
    if (airyPx < 1) warnings.push(`the starburst is drawn at its physical size, under a pixel here (Airy radius ${airyPx.toFixed(2)} px): it will hardly show; flare.starburst.size magnifies it (e.g. ${Math.ceil(3 / airyPx)} makes the radius about 3 px)`);
  } else lines.push(['starburst', 'off']);
  if (on.has('veil')) lines.push(['veil', `${shot.veil.fraction} of all visible flux over the frame${gainNote('veil')}`]);
  if (on.has('streak')) lines.push(['streak', `${shot.streak.fraction} of each light's flux, length ${shot.streak.lengthPx} px, thickness ${shot.streak.thicknessPx} px${gainNote('streak')}`]);
  if (on.has('dust')) lines.push(['dust', `${shot.dust.fraction} of each light's flux, density ${shot.dust.density}, reach ${shot.dust.reachPx} px, seed ${shot.dust.seed}${gainNote('dust')}`]);
  const o = shot.output;
  lines.push(['output', `${o.template} (${o.format}, ${o.transfer} transfer, alpha ${o.alpha}${o.passes === 'separate' ? ', one sequence per element' : o.passes === 'layers' ? `, each element a layer: ${activeElements(shot).join(', ')}` : ''}${o.colourSpace !== 'rec709' ? `, ${o.colourSpace}` : ''})`]);
  if (run) {
    const inside = (dir: string) => {
      const rel = path.relative(dir, o.template);
      return !rel.startsWith('..') && !path.isAbsolute(rel);
    };
    if (!inside(path.dirname(shot.file)) && !inside(run.cwd)) warnings.push(`the output is outside the shot's folder and the current folder: ${path.dirname(o.template)}`);
    let plan: WorkerPlan | undefined;
    try {
      plan = planWorkers(shot, run.jobs, run.budgetBytes);
      lines.push(['memory', `about ${formatBytes(plan.perWorker)} a worker; ${plan.jobs} worker${plan.jobs === 1 ? '' : 's'} fit in ${formatBytes(plan.budget)}${plan.note ? ` (not ${run.jobs})` : ''}`]);
    } catch (e) {
      warnings.push((e as Error).message.replace(/; nothing was rendered/, ''));
    }
  }
  const out = lines.map(([k, v]) => `${k.padEnd(9)} ${v}`);
  for (const w of warnings) out.push(`warning: ${w}`);
  return out.join('\n') + '\n';
}
