// renderFrame into a reused image: the first glow overwrites instead of the frame being cleared
// first, so a frame drawn over another frame's pixels must equal the same frame drawn fresh.

import { describe, expect, it } from 'vitest';
import { FloatImage } from '../../src/raster/image.js';
import { renderFrame } from '../../src/render/render-frame.js';
import { resolveShot } from '../../src/shot/resolve.js';

function shot(flare: string): ReturnType<typeof resolveShot> {
  const text = `version: 1
frame: { width: 96, height: 64, rate: 24, first: 1, last: 3 }
lights:
  - name: sun
    position: [{ frame: 1, x: 20, y: 20 }, { frame: 3, x: 80, y: 40 }]
    intensity: 6
    radius: 3
  - name: lamp
    position: [70, 12]
    intensity: 3
    radius: 2
${flare}
output: { path: out/f.####.png }
`;
  return resolveShot(text, 'shot.yaml', { readText: () => '' });
}

function dirty(): FloatImage {
  const img = new FloatImage(96, 64);
  for (let i = 0; i < img.data.length; i++) img.data[i] = (i % 7) * 0.37 + 1;
  return img;
}

describe('renderFrame into a reused image', () => {
  for (const [name, flare] of [
    ['glow and starburst', 'flare: { glow: { fraction: 0.05, size: 4, falloff: 3 } }'],
    ['glow switched off', 'flare: { glow: { fraction: 0.05, size: 4, falloff: 3, enabled: false } }'],
    ['no glow, veil only', 'flare: { glow: { fraction: 0 }, starburst: { fraction: 0 }, veil: { fraction: 0.1 } }'],
    ['two shutter samples', 'shutter: { angle: 180, samples: 2 }\nflare: { glow: { fraction: 0.05, size: 4, falloff: 3 } }'],
  ] as const) {
    it(`gives the same pixels as a fresh image (${name})`, () => {
      const s = shot(flare);
      const fresh = renderFrame(s, 2);
      const reused = renderFrame(s, 2, undefined, undefined, dirty());
      expect(fresh.channelSums()[0]).toBeGreaterThan(0);
      expect(Buffer.from(reused.data.buffer).equals(Buffer.from(fresh.data.buffer))).toBe(true);
    });
  }
});
