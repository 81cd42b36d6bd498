// Malformed shots: each case asserts the exact one-line messages, with file:line:col and key path.

import { describe, expect, it } from 'vitest';
import { ShotError } from '../../src/errors.js';
import { resolveShot } from '../../src/shot/resolve.js';
import { MINIMAL_SHOT } from '../helpers.js';

const files: Record<string, string> = {
  'bad-value.csv': 'frame,x,y\n1,2,3\n2,x,4\n',
  'backwards.csv': '1,10,10\n3,20,20\n2,30,30\n',
  'with-intensity.csv': 'frame,x,y,intensity\n1,10,10,2\n3,20,20,3\n',
};
const reader = {
  readText(p: string): string {
    const name = p.split('/').pop()!;
    if (name in files) return files[name];
    throw Object.assign(new Error('no such file'), { code: 'ENOENT' });
  },
};

function problems(text: string): string[] {
  try {
    resolveShot(text, 'bad.yaml', reader);
  } catch (e) {
    if (e instanceof ShotError) return e.message.split('\n');
    throw e;
  }
  return [];
}

/** The minimal shot with one substitution. */
function shotWith(find: string, replace: string): string {
  if (!MINIMAL_SHOT.includes(find)) throw new Error(`test bug: ${find} not in the minimal shot`);
  return MINIMAL_SHOT.replace(find, replace);
}

const bomb = ['a: &a [1,1,1,1,1,1,1,1,1,1]']
  .concat('bcdef'.split('').map((c, i) => `${c}: &${c} [${Array(10).fill(`*${'abcdef'[i]}`).join(',')}]`))
  .join('\n');

describe('shot validation', () => {
  it('accepts the minimal shot', () => {
    expect(problems(MINIMAL_SHOT)).toEqual([]);
  });

  const cases: [string, string, string[]][] = [
    ['a misspelt key gets a hint and no extra "missing" line', shotWith('width: 64', 'widht: 64'), [
      'bad.yaml:3:3: frame.widht: unknown key "widht" (did you mean "width"?)',
    ]],
    ['an unknown key without a near miss lists the known keys', shotWith('width: 64', 'width: 64\n  colour: 1'), [
      'bad.yaml:4:3: frame.colour: unknown key "colour"; known keys here: width, height, pixel_aspect, rate, first, last, optical_centre, drop_frame, timecode',
    ]],
    ['an absurd frame size', shotWith('width: 64', 'width: 20000'), [
      'bad.yaml:3:10: frame.width: expected a whole number from 1 to 16384, found 20000',
    ]],
    ['a reversed frame range', shotWith('last: 3', 'last: -3'), [
      'bad.yaml:7:9: frame.last: expected a last frame at or after the first (1), found -3',
    ]],
    ['a fractional frame number', shotWith('first: 1', 'first: 1.5'), [
      'bad.yaml:6:10: frame.first: expected a whole number from -1000000000 to 1000000000, found 1.5',
    ]],
    ['a frame rate that is not a rate', shotWith('rate: 24', 'rate: fast'), [
      'bad.yaml:5:9: frame.rate: expected a frame rate such as 24, 25, 30, 23.976 or "24000/1001", found "fast"',
    ]],
    ['drop-frame at a rate without it', shotWith('rate: 24', 'rate: 24\n  drop_frame: true'), [
      'bad.yaml:6:15: frame.drop_frame: drop-frame timecode exists only at 30000/1001 and 60000/1001 fps',
    ]],
    ['a drop-frame label that does not exist (SMPTE ST 12-1)', shotWith('rate: 24', 'rate: 30000/1001\n  timecode: "00:01:00;00"'), [
      'bad.yaml:6:13: frame.timecode: 00:01:00;00 does not exist in drop-frame timecode',
    ]],
    ['NaN intensity', shotWith('intensity: 0', 'intensity: .nan'), [
      'bad.yaml:11:16: lights[0].intensity: expected a number from -40 to 40, found NaN',
    ]],
    ['negative linear intensity', shotWith('intensity: 0', 'intensity: -1\n    intensity_unit: linear'), [
      'bad.yaml:11:16: lights[0].intensity: expected a number from 0 to 1000000000000, found -1',
    ]],
    ['keys out of frame order', shotWith('intensity: 0', 'intensity: [{frame: 1, value: 1}, {frame: 1, value: 2}]'), [
      'bad.yaml:11:47: lights[0].intensity[1].frame: expected keys in increasing frame order, found 1 after 1',
    ]],
    ['an unknown easing', shotWith('intensity: 0', 'intensity: [{frame: 1, value: 1, ease: ease-inout}]'), [
      'bad.yaml:11:44: lights[0].intensity[0].ease: expected one of linear, hold, ease, ease-in, ease-out, ease-in-out, cubic-bezier(x1, y1, x2, y2), found "ease-inout"',
    ]],
    ['a cubic-bezier with x outside [0, 1] (CSS Easing Level 1)', shotWith('intensity: 0', 'intensity: [{frame: 1, value: 1, ease: "cubic-bezier(1.2, 0, 0.5, 1)"}]'), [
      'bad.yaml:11:44: lights[0].intensity[0].ease: cubic-bezier(x1, y1, x2, y2) needs x1 and x2 from 0 to 1 (CSS Easing Level 1), found "cubic-bezier(1.2, 0, 0.5, 1)"',
    ]],
    ['a position of three numbers', shotWith('position: [32, 24]', 'position: [32, 24, 1]'), [
      'bad.yaml:10:15: lights[0].position: expected a constant position [x, y] or a list of keys {frame, x, y, ease}, found a list of 3 values',
    ]],
    ['no position and no track', shotWith('    position: [32, 24]\n', ''), [
      'bad.yaml:9:5: lights[0]: missing key "position" (pixel position keys), "track" (a frame,x,y CSV file), or a place in the world: "position_3d", "direction" or "from_scene"',
    ]],
    ['a misspelt intensity', shotWith('intensity: 0', 'intensty: 0'), [
      'bad.yaml:11:5: lights[0].intensty: unknown key "intensty" (did you mean "intensity"?)',
    ]],
    ['both position and track', shotWith('position: [32, 24]', 'position: [32, 24]\n    track: with-intensity.csv'), [
      'bad.yaml:11:12: lights[0].track: a light is placed by one of position, track, position_3d, direction or from_scene; found position and track',
    ]],
    ['a missing track file', shotWith('position: [32, 24]', 'track: nowhere.csv'), [
      expect.stringMatching(/^bad\.yaml:10:12: lights\[0\]\.track: cannot read track file \/.*\/nowhere\.csv: no such file$/) as unknown as string,
    ]],
    ['a bad number inside a track CSV points into the CSV', shotWith('position: [32, 24]', 'track: bad-value.csv'), [
      expect.stringMatching(/bad-value\.csv:3:3: x: expected a number, found "x"$/) as unknown as string,
    ]],
    ['track rows out of order', shotWith('position: [32, 24]', 'track: backwards.csv'), [
      expect.stringMatching(/backwards\.csv:3:1: frame: expected frames in increasing order, found 2 after 3$/) as unknown as string,
    ]],
    ['intensity both in the shot and in the track', shotWith('position: [32, 24]', 'track: with-intensity.csv'), [
      'bad.yaml:11:16: lights[0].intensity: intensity is given here and in the track file\'s intensity column; keep one',
    ]],
    ['a colder-than-physical blackbody', shotWith('  - name: sun\n', '  - name: sun\n    colour: {kelvin: 100}\n'), [
      'bad.yaml:10:22: lights[0].colour.kelvin: expected a number from 1000 to 40000, found 100',
    ]],
    ['a black light', shotWith('  - name: sun\n', '  - name: sun\n    colour: {rgb: [0, 0, 0]}\n'), [
      'bad.yaml:10:19: lights[0].colour.rgb: expected a colour with some luminance, found black',
    ]],
    ['two lights with one name', shotWith('lights:\n', 'lights:\n  - name: sun\n    position: [1, 2]\n    intensity: 1\n'), [
      'bad.yaml:12:11: lights[1].name: the name "sun" is already used by another light',
    ]],
    ['no lights', shotWith('lights:\n  - name: sun\n    position: [32, 24]\n    intensity: 0\n', 'lights: []\n'), [
      'bad.yaml:8:9: lights: expected at least one light, found an empty list',
    ]],
    ['a glow whose energy would be infinite', `${MINIMAL_SHOT}flare:\n  glow: {falloff: 2}\n`, [
      'bad.yaml:15:19: flare.glow.falloff: expected a number above 2 and at most 8, found 2',
    ]],
    ['an output path without a frame number', shotWith('path: out/f.####.png', 'path: out/f.png'), [
      'bad.yaml:13:9: output.path: the path needs a frame-number placeholder: #### or %04d',
    ]],
    ['an output extension that does not match the format', shotWith('path: out/f.####.png', 'path: out/f.####.exr'), [
      'bad.yaml:13:9: output.path: the file name must end in .png for format png16, found ".exr"',
    ]],
    ['an unknown alpha mode gets the choices', shotWith('  path: out', '  alpha: straight\n  path: out'), [
      'bad.yaml:13:10: output.alpha: expected one of none, premultiplied, emission, found "straight"',
    ]],
    ['a future format version', shotWith('version: 1', 'version: 2'), [
      'bad.yaml:1:10: version: expected version 1, found 2',
    ]],
    ['broken YAML syntax in our words, where it is', 'a: [1, 2\n', [
      'bad.yaml:2:1: YAML syntax: the indentation here does not line up with the lines around it (or a [ ] or { } before it is not closed)',
    ]],
    ['a stray bracket mid-line: its first slip only, not the cascade after it', 'version: 1\nlights:\n  - { name: a, position: [[{ frame: 1, x: 4, y: 3 }]][0], intensity: 1 }\n  - { name: b, position: [1, 2], intensity: 0 }\n', [
      'bad.yaml:3:54: YAML syntax: unexpected text here (a missing colon or comma, or a stray character?)',
    ]],
    ['a tab used for indentation, at its line', 'version: 1\nframe:\n\twidth: 3\n', [
      'bad.yaml:3:1: YAML syntax: a tab is used for indentation; indent with spaces',
    ]],
    ['a key given twice, at the second', 'version: 1\nversion: 2\n', [
      'bad.yaml:2:1: YAML syntax: this key appears twice in one mapping',
    ]],
    ['an empty file', '', ['bad.yaml:1:1: the file is empty']],
    ['an alias bomb is refused before expansion', bomb, [
      'bad.yaml:1:1: aliases expand the document to more than 200000 nodes; refusing it (an alias bomb?)',
    ]],
  ];

  for (const [title, text, expected] of cases) {
    it(`reports ${title}`, () => {
      expect(problems(text)).toEqual(expected);
    });
  }

  it('collects every problem before failing, in file order', () => {
    const text = shotWith('width: 64', 'width: 0').replace('rate: 24', 'rate: -1').replace('intensity: 0', 'intensity: lots');
    expect(problems(text)).toEqual([
      'bad.yaml:3:10: frame.width: expected a whole number from 1 to 16384, found 0',
      'bad.yaml:5:9: frame.rate: expected a frame rate such as 24, 25, 30, 23.976 or "24000/1001", found -1',
      'bad.yaml:11:16: lights[0].intensity: expected a constant number or a list of keys {frame, value, ease}, found "lots"',
    ]);
  });

  it('accepts aliases that expand to a reasonable size', () => {
    const text = shotWith('intensity: 0', 'intensity: &i 0\n    colour: {kelvin: 5000}').replace('lights:\n', 'lights:\n  - name: moon\n    position: [10, 10]\n    intensity: 1\n');
    expect(problems(text)).toEqual([]);
  });

  it('reads intensity keys from the track file when the light gives none', () => {
    const shot = resolveShot(shotWith('    position: [32, 24]\n    intensity: 0\n', '    track: with-intensity.csv\n'), 'ok.yaml', reader);
    expect(shot.lights[0].intensity.map((k) => [k.frame, k.value])).toEqual([[1, 2], [3, 3]]);
    expect(shot.lights[0].position.map((k) => k.value)).toEqual([[10, 10], [20, 20]]);
  });
});

describe('limits that keep check fast and honest', () => {
  it('refuses more lights than a shot holds, at the list, in one message', () => {
    const lights = Array.from({ length: 1001 }, (_, i) => `  - { name: l${i}, position: [${i}, 10], intensity: 1 }`).join('\n');
    const text = `version: 1\nframe: { width: 64, height: 48, rate: 24, first: 1, last: 1 }\nlights:\n${lights}\noutput: { path: f.####.png }\n`;
    expect(problems(text)).toEqual(['bad.yaml:4:3: lights: a shot holds at most 1000 lights, found 1001; split the lights over several shots and add their passes']);
    // 1000 are fine
    expect(problems(text.replace(/\n  - \{ name: l1000,[^\n]*/, ''))).toEqual([]);
  });

  it('a glass with n_d below 1 says so once, not again at each surface that uses it', () => {
    const text = `version: 1
frame: { width: 64, height: 48, rate: 24, first: 1, last: 1 }
lights: [{ name: a, position: [3, 3], intensity: 1 }]
lens:
  glasses: { odd: { nd: 0.8, vd: 40 } }
  surfaces:
    - { radius: 40, gap: 5, glass: odd, semi_diameter: 12 }
    - { radius: -200, gap: 4, semi_diameter: 12 }
    - { stop: true, gap: 2 }
    - { radius: 100, gap: 3, glass: odd, semi_diameter: 10 }
    - { radius: -100, gap: 40, semi_diameter: 10 }
output: { path: f.####.png }
`;
    expect(problems(text)).toEqual(['bad.yaml:5:25: lens.glasses.odd.nd: expected a number from 1.2 to 2.5, found 0.8']);
  });

  it('a pathologically nested document gets our own message at the place it gets too deep', () => {
    const flow = `version: 1\nframe: ${'['.repeat(5000)}${']'.repeat(5000)}\n`;
    expect(problems(flow)).toEqual(['bad.yaml:2:71: the document nests deeper than 64 levels here (a shot needs fewer than 10); refusing it']);
    const block = `version: 1\nframe:\n${Array.from({ length: 100 }, (_, i) => `${'  '.repeat(i + 1)}k${i}:`).join('\n')}\n`;
    expect(problems(block)).toEqual(['bad.yaml:66:129: the document nests deeper than 64 levels here (a shot needs fewer than 10); refusing it']);
    // the demo-sized nesting of a real shot passes the scan
    expect(problems(MINIMAL_SHOT)).toEqual([]);
  });
});
