// Lens descriptions in shots and lens files: located messages, exactly.

import { describe, expect, it } from 'vitest';
import { ShotError } from '../../src/errors.js';
import { resolveShot } from '../../src/shot/resolve.js';
import { presetNames, presetPath } from '../../src/io/presets.js';
import { readFileSync } from 'node:fs';
import { MINIMAL_SHOT } from '../helpers.js';

const files: Record<string, string> = {
  'two-stops.yaml': 'version: 1\nsurfaces:\n  - { radius: 30, gap: 5, glass: N-BK7, semi_diameter: 10 }\n  - { stop: true, gap: 2 }\n  - { stop: true, gap: 40 }\n',
  'bad-glass.yaml': 'version: 1\nsurfaces:\n  - { radius: 30, gap: 5, glass: N-BK8, semi_diameter: 10 }\n  - { stop: true, gap: 40 }\n',
};
const reader = {
  readText(p: string): string {
    const name = p.split('/').pop()!;
    if (name in files) return files[name];
    return readFileSync(p, 'utf8');
  },
  presetNames,
  presetPath,
};

function problems(lensYaml: string): string[] {
  try {
    resolveShot(`${MINIMAL_SHOT}lens:\n${lensYaml}`, 'shot.yaml', reader);
  } catch (e) {
    if (e instanceof ShotError) return e.message.split('\n');
    throw e;
  }
  return [];
}

describe('lens validation', () => {
  it('accepts a preset with an f-number and f-number keys', () => {
    expect(problems('  preset: triplet-50\n  f_number: 8\n')).toEqual([]);
    expect(problems('  preset: triplet-50\n  f_number: [{frame: 1, value: 4}, {frame: 3, value: 11}]\n')).toEqual([]);
  });
  it('names an unknown preset with a hint and the choices', () => {
    expect(problems('  preset: tripplet-50\n')).toEqual([
      'shot.yaml:15:11: lens.preset: expected one of anamorphic-40-2x, anamorphic-50-1.5x, double-gauss-50, multicoated-50, portrait-85, tele-135, triplet-50, uncoated-50, zoom-like-35, found "tripplet-50" (did you mean "triplet-50"?)',
    ]);
  });
  it('refuses an f-number wider than the design', () => {
    expect(problems('  preset: triplet-50\n  f_number: 2\n')).toEqual([
      'shot.yaml:16:13: lens.f_number: expected a number from 3.5 to 64, found 2',
    ]);
  });
  it('reports problems inside a lens file at their place in that file', () => {
    expect(problems('  file: bad-glass.yaml\n')).toEqual([
      expect.stringMatching(/^bad-glass\.yaml:3:34: surfaces\[0\]\.glass: expected one of air, N-BK7, N-SF5, found "N-BK8" \(did you mean "N-BK7"\?\)$/) as unknown as string,
    ]);
    expect(problems('  file: two-stops.yaml\n')).toEqual(['two-stops.yaml:3:3: surfaces: expected exactly one surface with stop: true, found 2']);
  });
  it('checks inline lenses too, with the shot\'s own locations', () => {
    expect(problems('  surfaces:\n    - { radius: 30, gap: 5, glass: N-BK7, semi_diameter: 40 }\n    - { stop: true, gap: 40 }\n')).toEqual([
      'shot.yaml:16:58: lens.surfaces[0].semi_diameter: the semi-diameter 40 exceeds the radius of curvature 30',
    ]);
  });
  it('refuses two ways of giving a lens at once', () => {
    expect(problems('  preset: triplet-50\n  file: x.yaml\n')).toEqual(['shot.yaml:15:3: lens: a lens is a preset, a file, or described inline: give one of them']);
  });
  it('reads ghost settings and refuses unknown quality words', () => {
    expect(problems('  preset: triplet-50\nflare:\n  ghosts: { quality: best }\n')).toEqual([
      'shot.yaml:17:22: flare.ghosts.quality: expected one of draft, low, medium, high, found "best"',
    ]);
  });
});
