// A light's own flare block: the shot's settings with the light's keys on top (the documented merge
// rule), drawn for that light only; lights add, so a shot of two lights equals the sum of each
// drawn alone with its settings. Keys that belong to the whole shot are refused in a light's block.

import { describe, expect, it } from 'vitest';
import { ShotError } from '../../src/errors.js';
import { renderFrame } from '../../src/render/render-frame.js';
import { resolveShot } from '../../src/shot/resolve.js';

const reader = { readText: () => '' };
const shotOf = (lights: string, flare: string) =>
  resolveShot(
    `version: 1
frame: { width: 200, height: 120, rate: 24, first: 1, last: 1 }
lights:
${lights}
flare: ${flare}
output: { path: f.####.png }
`,
    'shot.yaml',
    reader,
  );

const SHOT_FLARE = '{ glow: { fraction: 0.04, size: 9, falloff: 2.6 }, starburst: { fraction: 0.05, size: 30 } }';
const A = '  - { name: beacon, position: [60, 50], intensity: 6 }';
const B_OWN = '  - { name: lamp, position: [150, 70], intensity: 4, flare: { glow: { fraction: 0.2 }, starburst: { enabled: false } } }';
const B_PLAIN = '  - { name: lamp, position: [150, 70], intensity: 4 }';

describe('per-light flare settings', () => {
  it('merge key by key over the shot\'s: a light\'s glow fraction changes, its size and falloff stay the shot\'s', () => {
    const s = shotOf(`${A}\n${B_OWN}`, SHOT_FLARE);
    const lamp = s.lights[1].flare!;
    expect(lamp.glow).toEqual({ fraction: 0.2, sizePx: 9, falloff: 2.6 });
    expect(lamp.elements.starburst.enabled).toBe(false);
    expect(lamp.starburst).toEqual({ fraction: 0.05, size: 30 });
    expect(s.lights[0].flare).toBeUndefined();
  });

  it('draws each light with its own settings: the two-light frame is the sum of each alone', () => {
    const both = renderFrame(shotOf(`${A}\n${B_OWN}`, SHOT_FLARE), 1).data;
    const a = renderFrame(shotOf(A, SHOT_FLARE), 1).data;
    // the lamp alone, its settings written as the shot's
    const b = renderFrame(shotOf(B_PLAIN, '{ glow: { fraction: 0.2, size: 9, falloff: 2.6 }, starburst: { enabled: false, fraction: 0.05, size: 30 } }'), 1).data;
    let peak = 0;
    let worst = 0;
    for (let i = 0; i < both.length; i++) {
      if (i % 4 === 3) continue;
      peak = Math.max(peak, both[i]);
      worst = Math.max(worst, Math.abs(both[i] - a[i] - b[i]));
    }
    expect(worst / peak).toBeLessThan(1e-6);
    // and differs from drawing the lamp with the shot's settings
    const plain = renderFrame(shotOf(`${A}\n${B_PLAIN}`, SHOT_FLARE), 1).data;
    let moved = 0;
    for (let i = 0; i < both.length; i++) moved = Math.max(moved, Math.abs(both[i] - plain[i]));
    expect(moved).toBeGreaterThan(1e-4);
  });

  it('refuses whole-shot keys in a light\'s block, at the key', () => {
    try {
      shotOf('  - { name: lamp, position: [150, 70], intensity: 4, flare: { dust: { density: 2 } } }', '{ dust: { fraction: 0.01 } }');
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(ShotError);
      expect((e as Error).message).toMatch(/^shot\.yaml:4:\d+: lights\[0\]\.flare\.dust\.density: density is set for the whole shot, under the shot's flare: not per light$/);
    }
  });
});
