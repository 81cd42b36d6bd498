// The text `straylight check` prints: what a shot will render.

import { easingLabel } from '../timeline/easing.js';
import { formatFrameRate, frameRateValue } from '../timeline/frame-rate.js';
import { framesToTimecode } from '../timeline/timecode.js';
import type { ResolvedShot } from '../shot/types.js';

export function shotSummary(shot: ResolvedShot, shown: string): string {
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
  for (const l of shot.lights) {
    const colour = 'kelvin' in l.colourSpec ? `${l.colourSpec.kelvin} K` : `rgb ${l.colourSpec.rgb.join(' ')}`;
    const values = l.intensity.map((k) => k.value);
    const span = values.length > 1 ? `${Math.min(...values)}..${Math.max(...values)}` : `${values[0]}`;
    const eases = [...new Set(l.position.slice(0, -1).map((k) => easingLabel(k.ease)))].join(', ') || 'constant';
    lines.push([
      'light',
      `${l.name}: ${colour}, radius ${l.radiusPx} px, ${l.position.length} position key(s) (${l.path}; ${eases}), intensity ${span} ${l.intensityUnit}`,
    ]);
  }
  const g = shot.glow;
  lines.push(['glow', `${g.fraction} of each light's flux, size ${g.sizePx} px, tail falloff ${g.falloff}`]);
  const o = shot.output;
  lines.push(['output', `${o.template} (${o.format}, ${o.transfer} transfer, alpha ${o.alpha})`]);
  return lines.map(([k, v]) => `${k.padEnd(9)} ${v}`).join('\n') + '\n';
}
