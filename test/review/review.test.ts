// Review outputs: contact sheets (decoded by fast-png, an independent decoder) and movies (encoded
// by ffmpeg, checked with ffprobe; both from Debian's ffmpeg, installed by
// scripts/install-test-tools.sh).

import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { decode } from 'fast-png';
import { describe, expect, it } from 'vitest';
import { ExitCode } from '../../src/errors.js';
import { encodePng } from '../../src/io/png.js';
import { FloatImage } from '../../src/raster/image.js';
import { SHEET_LAYOUT } from '../../src/review/sheet.js';
import { cli, tempDir } from '../helpers.js';

/** A light crossing the frame; frames first..last at the rate given. */
function shot(dir: string, opts: { w?: number; h?: number; last?: number; rate?: string; timecode?: string; output?: string } = {}): string {
  const { w = 64, h = 36, last = 10, rate = '24', timecode = '01:00:00:00', output = 'out/f.####.png' } = opts;
  const f = path.join(dir, 'shot.yaml');
  writeFileSync(
    f,
    `version: 1
frame: { width: ${w}, height: ${h}, rate: ${rate}, first: 1, last: ${last}, timecode: "${timecode}" }
lights:
  - name: lamp
    path: linear
    position: [{ frame: 1, x: 4, y: ${h / 2} }, { frame: ${last}, x: ${w - 4}, y: ${h / 2} }]
    intensity: 0
    radius: 3
output: { path: "${output}" }
`,
  );
  return f;
}

/** The labels of a sheet written as SVG: frame numbers and timecodes by frame, with their x. */
function sheetLabels(svg: string): { numbers: number[]; timecodes: Record<number, { text: string; x: number }> } {
  const numbers = [...svg.matchAll(/class="frame-number" data-frame="(\d+)"[^>]*>(\d+)</g)].map((m) => {
    expect(m[2]).toBe(m[1]);
    return Number(m[1]);
  });
  const timecodes = Object.fromEntries([...svg.matchAll(/<text x="([\d.]+)" y="[\d.]+" class="timecode" data-frame="(\d+)"[^>]*>([^<]+)</g)].map((m) => [Number(m[2]), { text: m[3], x: Number(m[1]) }]));
  return { numbers, timecodes };
}

function ffprobe(file: string): Record<string, string> {
  const r = spawnSync('ffprobe', ['-v', 'error', '-count_frames', '-select_streams', 'v:0', '-show_entries', 'stream=codec_name,profile,width,height,pix_fmt,r_frame_rate,nb_read_frames,color_primaries,color_transfer,color_space:stream_tags=timecode', '-of', 'default=noprint_wrappers=1', file], { encoding: 'utf8' });
  if (r.error) throw r.error;
  expect(r.status, r.stderr).toBe(0);
  return Object.fromEntries(r.stdout.trim().split('\n').map((l) => [l.split('=')[0].replace('TAG:', ''), l.slice(l.indexOf('=') + 1)]));
}

describe('contact sheets', () => {
  it('every Nth frame as a tile, frame numbers and timecodes printed under each', async () => {
    const dir = tempDir();
    const f = shot(dir);
    expect((await cli(['render', f, '--quiet'])).code).toBe(0);
    const r = await cli(['sheet', f, '-o', path.join(dir, 's.png'), '--every', '3', '--columns', '2']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('4 frames (1-10, every 3)');
    const png = decode(readFileSync(path.join(dir, 's.png')));
    const { margin, gap, title, label } = SHEET_LAYOUT;
    // tiles at the frames' own size (64 < the 320 default): 2 columns, 2 rows, under the title strip
    expect([png.width, png.height]).toEqual([margin * 2 + 2 * 64 + gap, margin * 2 + title + 2 * (36 + label) + gap]);
    const at = (k: number) => ({ x: margin + (k % 2) * (64 + gap), y: margin + title + Math.floor(k / 2) * (36 + label + gap) });
    // the labels, in the shipped font: read from the same sheet written as SVG
    expect((await cli(['sheet', f, '-o', path.join(dir, 's.svg'), '--every', '3', '--columns', '2'])).code).toBe(0);
    const svg = readFileSync(path.join(dir, 's.svg'), 'utf8');
    const labels = sheetLabels(svg);
    expect(labels.numbers).toEqual([1, 4, 7, 10]);
    // the timecode is wider than the tile here (64 px): it is left out rather than overprinted
    expect(labels.timecodes).toEqual({});
    expect(svg).toContain('class="sheet-title"');
    expect(svg).toContain('shot.yaml, frames 1-10 every 3');
    // the label strip has ink: text was drawn under the first tile
    let ink = 0;
    for (let y = at(0).y + 36; y < at(0).y + 36 + label; y++) for (let x = at(0).x; x < at(0).x + 20; x++) if ((png.data[(y * png.width + x) * png.channels] as number) > 150) ink++;
    expect(ink).toBeGreaterThan(5);
    // each tile shows its own frame: the light moves right from frame 1 to 4, 7 and 10
    const centre = (k: number) => {
      // the disk is clipped white: the middle of the white run along the light's row
      const row = at(k).y + 18;
      const white = [...Array(64).keys()].filter((x) => png.data[(row * png.width + at(k).x + x) * png.channels] === 255);
      return (white[0] + white[white.length - 1] + 1) / 2;
    };
    // the light runs from x 4 to 60 over frames 1-10: frame n at 4 + 56 (n - 1) / 9
    [1, 4, 7, 10].forEach((n, k) => expect(Math.abs(centre(k) - (4 + (56 * (n - 1)) / 9))).toBeLessThanOrEqual(0.5));
  });

  it('prints timecodes when the tile is wide enough, and adds a plate under the pass', async () => {
    const dir = tempDir();
    const f = shot(dir, { w: 200, h: 60, last: 3, timecode: '10:00:00:00' });
    expect((await cli(['render', f, '--quiet'])).code).toBe(0);
    mkdirSync(path.join(dir, 'plate'));
    const grey = new FloatImage(200, 60);
    for (let i = 0; i < grey.data.length; i += 4) grey.data.set([0.2158, 0.2158, 0.2158, 0], i); // sRGB code 128: ((128/255 + 0.055) / 1.055)^2.4 (IEC 61966-2-1)
    for (let k = 1; k <= 3; k++) writeFileSync(path.join(dir, 'plate', `p.${k}.png`), encodePng(grey, { bitDepth: 16, transfer: 'linear', alpha: 'none' }));
    const r = await cli(['sheet', f, '-o', path.join(dir, 's.png'), '--over', path.join(dir, 'plate', 'p.#.png')]);
    expect(r.code, r.stderr).toBe(0);
    const png = decode(readFileSync(path.join(dir, 's.png')));
    const { margin, title } = SHEET_LAYOUT;
    const k = 2;
    const x0 = margin + k * (200 + SHEET_LAYOUT.gap);
    // frame 3 of a shot starting at 10:00:00:00, right-aligned to its tile's edge
    expect((await cli(['sheet', f, '-o', path.join(dir, 's.svg'), '--over', path.join(dir, 'plate', 'p.#.png')])).code).toBe(0);
    const labels = sheetLabels(readFileSync(path.join(dir, 's.svg'), 'utf8'));
    expect(labels.timecodes[3]).toEqual({ text: '10:00:00:02', x: x0 + 200 });
    // a corner of the tile far from the light shows the plate: code 128 (the pass adds a little glow)
    const corner = png.data[((margin + title + 1) * png.width + x0 + 1) * png.channels] as number;
    expect(corner).toBeGreaterThanOrEqual(128);
    expect(corner).toBeLessThanOrEqual(131);
  });

  it('shows anamorphic frames desqueezed: a 2:1 pixel aspect doubles the tile width', async () => {
    const dir = tempDir();
    const f = shot(dir, { last: 2 });
    writeFileSync(f, readFileSync(f, 'utf8').replace('first: 1, last: 2,', 'first: 1, last: 2, pixel_aspect: 2,'));
    expect((await cli(['render', f, '--quiet'])).code).toBe(0);
    expect((await cli(['sheet', f, '-o', path.join(dir, 's.png')])).code).toBe(0);
    const png = decode(readFileSync(path.join(dir, 's.png')));
    const { margin, title, label } = SHEET_LAYOUT;
    // 64x36 stored pixels twice as wide as tall: shown 128x36, two tiles in a row
    expect([png.width, png.height]).toEqual([2 * margin + 2 * 128 + SHEET_LAYOUT.gap, 2 * margin + title + 36 + label]);
  });

  it('a missing plate frame is a clear error and writes no sheet', async () => {
    const dir = tempDir();
    const f = shot(dir, { last: 2 });
    expect((await cli(['render', f, '--quiet'])).code).toBe(0);
    const r = await cli(['sheet', f, '-o', path.join(dir, 's.png'), '--over', path.join(dir, 'nope.####.png')]);
    expect(r.code).toBe(ExitCode.badInput);
    expect(r.stderr).toMatch(/--over: no plate frame .*nope\.0001\.png/);
    expect(existsSync(path.join(dir, 's.png'))).toBe(false);
  });
});

describe('review movies through ffmpeg', () => {
  it('.mp4: H.264 at the shot\'s rate (23.976), every frame, odd sizes padded to even, Rec.709/sRGB tags', async () => {
    const dir = tempDir();
    const f = shot(dir, { w: 65, h: 37, last: 12, rate: '23.976' });
    const r = await cli(['render', f, '--quiet', '--movie', path.join(dir, 'm.mp4')]);
    expect(r.code, r.stderr).toBe(0);
    const p = ffprobe(path.join(dir, 'm.mp4'));
    expect(p).toMatchObject({ codec_name: 'h264', width: '66', height: '38', pix_fmt: 'yuv420p', r_frame_rate: '24000/1001', nb_read_frames: '12', color_primaries: 'bt709', color_transfer: 'iec61966-2-1', color_space: 'bt709' });
  });

  it('.mov: ProRes 4444 with alpha, the shot\'s rate and start timecode; the alpha follows the light', async () => {
    const dir = tempDir();
    const f = shot(dir, { last: 5, rate: '25', timecode: '10:00:01:00' });
    const r = await cli(['render', f, '--quiet', '--movie', path.join(dir, 'm.mov')]);
    expect(r.code, r.stderr).toBe(0);
    const p = ffprobe(path.join(dir, 'm.mov'));
    expect(p).toMatchObject({ codec_name: 'prores', profile: '4444', width: '64', height: '36', r_frame_rate: '25/1', nb_read_frames: '5', timecode: '10:00:01:00' });
    expect(p.pix_fmt).toMatch(/^yuva444p/);
    // decode the alpha plane of frame 1 with ffmpeg: opaque at the light (x 4, y 18), clear in a far corner
    const a = spawnSync('ffmpeg', ['-v', 'error', '-i', path.join(dir, 'm.mov'), '-frames:v', '1', '-vf', 'alphaextract', '-pix_fmt', 'gray', '-f', 'rawvideo', '-'], { maxBuffer: 1 << 20 });
    expect(a.status, String(a.stderr)).toBe(0);
    const alpha = a.stdout as Buffer;
    expect(alpha.length).toBe(64 * 36);
    expect(alpha[18 * 64 + 4]).toBeGreaterThan(240);
    expect(alpha[35 * 64 + 63]).toBeLessThan(8);
  });

  it('over a plate, and from separate passes summed', async () => {
    const dir = tempDir();
    const f = shot(dir, { last: 3, output: 'out/f.####.exr", format: exr, passes: "separate' });
    mkdirSync(path.join(dir, 'plate'));
    const grey = new FloatImage(64, 36);
    for (let i = 0; i < grey.data.length; i += 4) grey.data.set([0.2158, 0.2158, 0.2158, 0], i);
    for (let k = 1; k <= 3; k++) writeFileSync(path.join(dir, 'plate', `p.${String(k).padStart(4, '0')}.png`), encodePng(grey, { bitDepth: 16, transfer: 'linear', alpha: 'none' }));
    const r = await cli(['render', f, '--movie', path.join(dir, 'm.mp4'), '--over', path.join(dir, 'plate', 'p.####.png')]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain('(3 frames, H.264, over the plate)');
    expect(existsSync(path.join(dir, 'out', 'f.over.0003.png'))).toBe(true); // review frames too, in the same pass
    // the far corner shows the plate: sRGB 128, within the H.264 coding error
    const y = spawnSync('ffmpeg', ['-v', 'error', '-i', path.join(dir, 'm.mp4'), '-frames:v', '1', '-vf', 'scale=in_color_matrix=bt709:in_range=tv', '-pix_fmt', 'rgb24', '-f', 'rawvideo', '-'], { maxBuffer: 1 << 20 });
    expect(y.status, String(y.stderr)).toBe(0);
    const rgb = y.stdout as Buffer;
    expect(Math.abs(rgb[(35 * 64 + 63) * 3] - 128)).toBeLessThanOrEqual(3);
  });

  it('an anamorphic shot\'s movie carries its 2:1 pixel aspect, so players show it desqueezed', async () => {
    const dir = tempDir();
    const f = shot(dir, { last: 2 });
    writeFileSync(f, readFileSync(f, 'utf8').replace('first: 1, last: 2,', 'first: 1, last: 2, pixel_aspect: 2,'));
    expect((await cli(['render', f, '--quiet', '--movie', path.join(dir, 'm.mov')])).code).toBe(0);
    const r = spawnSync('ffprobe', ['-v', 'error', '-select_streams', 'v:0', '-show_entries', 'stream=sample_aspect_ratio,display_aspect_ratio', '-of', 'default=noprint_wrappers=1', path.join(dir, 'm.mov')], { encoding: 'utf8' });
    expect(r.stdout).toContain('sample_aspect_ratio=2:1');
    expect(r.stdout).toContain('display_aspect_ratio=32:9');
  });

  it('without ffmpeg: a clear message and exit 6 before anything is rendered', async () => {
    const dir = tempDir();
    const f = shot(dir);
    const saved = process.env.STRAYLIGHT_FFMPEG;
    process.env.STRAYLIGHT_FFMPEG = path.join(dir, 'no-such-ffmpeg');
    try {
      const r = await cli(['render', f, '--movie', path.join(dir, 'm.mov')]);
      expect(r.code).toBe(ExitCode.toolMissing);
      expect(r.stderr).toMatch(/--movie needs ffmpeg, and ".*no-such-ffmpeg" was not found or does not run; install it \(Debian\/Ubuntu: apt-get install ffmpeg\) or leave out --movie/);
      expect(existsSync(path.join(dir, 'out'))).toBe(false);
    } finally {
      if (saved === undefined) delete process.env.STRAYLIGHT_FFMPEG;
      else process.env.STRAYLIGHT_FFMPEG = saved;
    }
  });

  it('refuses a movie of another kind, and --movie or --over with --shard', async () => {
    const dir = tempDir();
    const f = shot(dir);
    expect((await cli(['render', f, '--movie', 'x.avi'])).stderr).toContain('--movie: the file must end in .mov (ProRes 4444 with alpha) or .mp4 (H.264 review), found "x.avi"');
    expect((await cli(['render', f, '--movie', 'x.mov', '--shard', '0/2'])).code).toBe(ExitCode.usage);
    expect((await cli(['render', f, '--over', 'p.####.png', '--shard', '0/2'])).code).toBe(ExitCode.usage);
  });

  it('--over alone writes review frames: the pass plus the plate in linear light, then sRGB, beside the pass', async () => {
    const dir = tempDir();
    const f = shot(dir, { last: 3 });
    mkdirSync(path.join(dir, 'plate'));
    const grey = new FloatImage(64, 36);
    for (let i = 0; i < grey.data.length; i += 4) grey.data.set([0.2158, 0.2158, 0.2158, 0], i); // sRGB code 128 (IEC 61966-2-1)
    for (let k = 1; k <= 3; k++) writeFileSync(path.join(dir, 'plate', `p.${String(k).padStart(4, '0')}.png`), encodePng(grey, { bitDepth: 16, transfer: 'linear', alpha: 'none' }));
    const r = await cli(['render', f, '--over', path.join(dir, 'plate', 'p.####.png')]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain('(3 frames over the plate)');
    const png = decode(readFileSync(path.join(dir, 'out', 'f.over.0002.png')));
    expect([png.width, png.height, png.depth, png.channels]).toEqual([64, 36, 8, 3]);
    // far from the light the plate shows through (the glow adds a little); at the light, white
    const corner = png.data[(35 * 64 + 63) * 3] as number;
    expect(corner).toBeGreaterThanOrEqual(128);
    expect(corner).toBeLessThanOrEqual(131);
    const lightX = Math.round(4 + (56 * 1) / 2); // frame 2 of 3: halfway along the path
    expect(png.data[(18 * 64 + lightX) * 3]).toBe(255);
  });
});
