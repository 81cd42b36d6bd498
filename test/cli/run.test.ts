// The CLI driven in-process: exit codes, messages, and stdout kept for results only.

import { existsSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { decode } from 'fast-png';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { ExitCode } from '../../src/errors.js';
import { MINIMAL_SHOT, cli, tempDir } from '../helpers.js';


function shotFile(text = MINIMAL_SHOT): string {
  const dir = tempDir();
  const f = path.join(dir, 'shot.yaml');
  writeFileSync(f, text);
  return f;
}

describe('straylight CLI', () => {
  it('--version prints the version, the same as package.json\'s', async () => {
    const pkg = JSON.parse(readFileSync(path.resolve('package.json'), 'utf8')) as { version: string };
    const r = await cli(['--version']);
    expect(r.code).toBe(ExitCode.ok);
    expect(r.stdout.trim()).toBe(pkg.version);
  });

  it('check prints the summary on stdout, with the SMPTE timecode range', async () => {
    const f = shotFile(MINIMAL_SHOT.replace('rate: 24', 'rate: 25\n  timecode: "10:00:00:00"'));
    const r = await cli(['check', f]);
    expect(r.code).toBe(ExitCode.ok);
    expect(r.stderr).toBe('');
    expect(r.stdout).toContain('range     1-3 (3 frames, 0.120 s)');
    expect(r.stdout).toContain('timecode  10:00:00:00 - 10:00:00:02');
    expect(r.stdout).toContain('light     sun: 6504 K, radius 4 px');
  });

  it('a bad shot exits 3 with file:line:col messages and a count on stderr', async () => {
    const f = shotFile(MINIMAL_SHOT.replace('height: 48', 'height: -2'));
    const r = await cli(['render', f]);
    expect(r.code).toBe(ExitCode.badInput);
    expect(r.stdout).toBe('');
    expect(r.stderr).toBe(`${f}:4:11: frame.height: expected a whole number from 1 to 16384, found -2\nstraylight: 1 problem found; nothing was rendered\n`);
    expect(existsSync(path.join(path.dirname(f), 'out'))).toBe(false);
  });

  it('a missing shot file exits 3 with one line', async () => {
    const r = await cli(['check', '/nonexistent/shot.yaml']);
    expect(r.code).toBe(ExitCode.badInput);
    expect(r.stderr).toBe('/nonexistent/shot.yaml: cannot read the shot file: no such file\n');
  });

  it('an unknown option exits 2', async () => {
    const r = await cli(['render', shotFile(), '--fast']);
    expect(r.code).toBe(ExitCode.usage);
    expect(r.stderr).toContain("error: unknown option '--fast'");
  });

  it('--frames outside the shot exits 2 and names the range', async () => {
    const r = await cli(['render', shotFile(), '--frames', '2-9']);
    expect(r.code).toBe(ExitCode.usage);
    expect(r.stderr).toBe("--frames: 2-9 lies outside the shot's range 1-3\n");
  });

  it('--jobs must be a positive whole number', async () => {
    const r = await cli(['render', shotFile(), '--jobs', '0']);
    expect(r.code).toBe(ExitCode.usage);
    expect(r.stderr).toContain('--jobs: expected a whole number of at least 1, found "0"');
  });

  it('render --quiet writes the frames and prints nothing', async () => {
    const f = shotFile();
    const r = await cli(['render', f, '--quiet']);
    expect(r).toEqual({ code: 0, stdout: '', stderr: '' });
    for (const n of ['0001', '0002', '0003']) expect(existsSync(path.join(path.dirname(f), 'out', `f.${n}.png`))).toBe(true);
  });

  it('render reports progress and a summary on stderr, nothing on stdout', async () => {
    const f = shotFile();
    const r = await cli(['render', f, '--frames', '2-3']);
    expect(r.code).toBe(0);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/render: 2\/2 frames, [\d.]+ fps, ETA 0s\n/);
    expect(r.stderr).toMatch(/rendered 2 frames to .*f\.####\.png in [\d.]+ s\n$/);
  });

  it('a resumed render counts kept frames apart: its rate and ETA are those of the frames it renders', async () => {
    const f = shotFile();
    expect((await cli(['render', f, '--quiet'])).code).toBe(0);
    rmSync(path.join(path.dirname(f), 'out', 'f.0002.png'));
    const r = await cli(['render', f]);
    expect(r.code).toBe(0);
    // frames 1 and 3 are kept at once, before anything renders: no rate yet, so no ETA
    expect(r.stderr).toContain('render: 1/3 frames, 1 kept, 0.00 fps, ETA --\nrender: 2/3 frames, 2 kept, 0.00 fps, ETA --\n');
    expect(r.stderr).toMatch(/render: 3\/3 frames, 2 kept, [\d.]+ fps, ETA 0s\n/);
    expect(r.stderr).toMatch(/rendered 1 frame to .*f\.####\.png \(2 already there, kept\) in [\d.]+ s\n$/);
    rmSync(path.join(path.dirname(f), 'out', 'f.0003.png'));
    const j = await cli(['render', f, '--progress', 'json']);
    const events = j.stderr.trim().split('\n').map((l) => JSON.parse(l) as { event: string; fps?: number });
    expect(events.map((e) => e.event)).toEqual(['skipped', 'skipped', 'written', 'summary']);
    expect(events[0].fps).toBe(0);
    expect(events[1].fps).toBe(0);
    expect(events[2].fps).toBeGreaterThan(0);
  });

  it('--out rejects a template without a frame number', async () => {
    const r = await cli(['render', shotFile(), '--out', 'x.png']);
    expect(r.code).toBe(ExitCode.usage);
    expect(r.stderr).toBe('--out: the path needs a frame-number placeholder: #### or %04d\n');
  });

  it('still writes one frame of the shot\'s size', async () => {
    const f = shotFile();
    const out = path.join(path.dirname(f), 'still.png');
    const r = await cli(['still', f, '--frame', '2', '--out', out]);
    expect(r).toEqual({ code: 0, stdout: `${out}: frame 2, 64x48 16-bit PNG, srgb\n`, stderr: '' });
    const png = decode(readFileSync(out));
    expect([png.width, png.height, png.depth]).toEqual([64, 48, 16]);
  });

  it('an output folder that cannot be made exits 4 with one line, before rendering', async () => {
    const f = shotFile();
    const r = await cli(['render', f, '--out', '/proc/straylight-none/f.####.png']);
    expect(r.code).toBe(ExitCode.framesFailed);
    expect(r.stderr).toBe('cannot write to the output folder /proc/straylight-none: a folder cannot be made there\n');
  });

  it('still refuses a frame outside the shot\'s range, as render --frames does', async () => {
    const f = shotFile();
    const r = await cli(['still', f, '--frame', '9', '--out', path.join(path.dirname(f), 'x.png')]);
    expect(r.stderr).toBe("--frame: 9 lies outside the shot's range 1-3\n");
    expect(r.code).toBe(ExitCode.usage);
    expect(existsSync(path.join(path.dirname(f), 'x.png'))).toBe(false);
  });

  it('a binary file given as the shot exits 3 with one line', async () => {
    const f = shotFile();
    writeFileSync(f, Buffer.from([0x89, 0x50, 0x4e, 0x47, 0, 0, 0xff, 0xfe]));
    const r = await cli(['check', f]);
    expect(r.code).toBe(ExitCode.badInput);
    expect(r.stderr).toBe(`${f}: not a text file (a YAML shot file was expected)\n`);
  });

  it('a long bad value is shortened in the message', async () => {
    const f = shotFile(MINIMAL_SHOT.replace('rate: 24', `rate: ${'x'.repeat(500)}`));
    const r = await cli(['check', f]);
    expect(r.stderr.split('\n')[0]).toBe(`${f}:5:9: frame.rate: expected a frame rate such as 24, 25, 30, 23.976 or "24000/1001", found "${'x'.repeat(57)}..."`);
  });

  it('--help exits 0 and lists the commands', async () => {
    const r = await cli(['--help']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/render \[options\] <shot>/);
    expect(r.stdout).toMatch(/check \[options\] <file>/);
    expect(r.stdout).toMatch(/still \[options\] <shot>/);
  });
});

describe('straylight lens', () => {
  it('reports the computed focal length and a ghost table, strongest first', async () => {
    const r = await cli(['lens', 'double-gauss-50']);
    expect(r.code).toBe(0);
    expect(r.stderr).toBe('');
    expect(r.stdout).toContain('focal     50.00 mm (computed from the prescription at the d line)');
    expect(r.stdout).toContain('ghosts    45 two-reflection paths from 10 reflecting surfaces; strongest first:');
    const strengths = [...r.stdout.matchAll(/^\s+\d+\s+\d+-\d+\s+\d+ then \d+\s+\S+\s+\S+\s+(\S+)/gm)].map((m) => Number(m[1]));
    expect(strengths.length).toBe(20);
    for (let k = 1; k < strengths.length; k++) expect(strengths[k]).toBeLessThanOrEqual(strengths[k - 1]);
  });

  it('--json gives the same figures as data, and --plot writes a PNG', async () => {
    const dir = tempDir();
    const plot = path.join(dir, 'lens.png');
    const r = await cli(['lens', 'triplet-50', '--json', '--plot', plot]);
    expect(r.code).toBe(0);
    const report = JSON.parse(r.stdout);
    expect(report.focalLengthMm).toBeCloseTo(50, 3);
    expect(report.ghosts).toHaveLength(15);
    const png = decode(readFileSync(plot));
    // the page is as wide as the lens needs at its height (at least 900), and 620 high
    expect(png.height).toBe(620);
    expect(png.width).toBeGreaterThanOrEqual(900);
  });

  it('an unknown lens exits 3 with a hint', async () => {
    const r = await cli(['lens', 'zoom-35']);
    expect(r.code).toBe(ExitCode.badInput);
    expect(r.stderr).toMatch(/^zoom-35: not a preset lens or a lens file/);
  });
});

describe('straylight visibility', () => {
  it('lists frame, light, position, visibility and effective intensity; --plot writes a PNG', async () => {
    const dir = tempDir();
    const { mkdirSync } = await import('node:fs');
    const { encodePng } = await import('../../src/io/png.js');
    const { FloatImage } = await import('../../src/raster/image.js');
    mkdirSync(path.join(dir, 'm'));
    // frame 2's matte covers the left half of the frame
    for (const f of [1, 2, 3]) {
      const img = new FloatImage(64, 48);
      if (f === 2) for (let y = 0; y < 48; y++) for (let x = 0; x < 32; x++) img.data.fill(1, (y * 64 + x) * 4, (y * 64 + x) * 4 + 3);
      writeFileSync(path.join(dir, 'm', `c.${f}.png`), encodePng(img, { bitDepth: 8, transfer: 'linear', alpha: 'none' }));
    }
    const f = path.join(dir, 'shot.yaml');
    writeFileSync(f, MINIMAL_SHOT.replace('output:', 'mattes: [{ name: c, kind: alpha, path: m/c.#.png }]\noutput:'));
    const plot = path.join(dir, 'vis.png');
    const r = await cli(['visibility', f, '--plot', plot]);
    expect(r.code).toBe(0);
    const rows = r.stdout.trim().split('\n');
    expect(rows[0]).toBe('frame,light,x,y,visibility,effective_intensity,depth');
    const vis = rows.slice(1).map((l) => Number(l.split(',')[4]));
    // an edge through the centre hides half the disk (within the 128-point pattern's 0.02)
    expect(vis[0]).toBe(1);
    expect(vis[1]).toBeCloseTo(0.5, 2);
    expect(vis[2]).toBe(1);
    const [frame, light, x, y, , eff] = rows[2].split(',');
    expect([frame, light, x, y]).toEqual(['2', 'sun', '32.000', '24.000']);
    expect(Number(eff)).toBeCloseTo(vis[1] * 1, 4); // intensity 0 stops: gain 1
    expect(decode(readFileSync(plot)).width).toBe(1200);
  });
});

describe('output that cannot be written', () => {
  // As root, permission bits stop nothing, so these use places no process can write: sysfs (EACCES)
  // and a folder under /proc (a folder cannot be made there). Each command says so in one line,
  // exit 4, before any work and with no stack trace.
  const cases: [string, (shot: string) => string[], string][] = [
    ['render --out', (s) => ['render', s, '--out', '/sys/kernel/f.####.png'], 'cannot write to the output folder /sys/kernel: permission denied'],
    ['still', (s) => ['still', s, '--frame', '1', '--out', '/proc/self/nope/f.png'], 'cannot write to the output folder /proc/self/nope: a folder cannot be made there'],
    ['sheet', (s) => ['sheet', s, '-o', '/sys/kernel/sheet.png'], 'cannot write to the output folder /sys/kernel: permission denied'],
    ['batch --report', (s) => ['batch', s, '--report', '/sys/kernel/r.json'], "cannot write to the report's folder /sys/kernel: permission denied"],
    ['lens --plot', () => ['lens', 'triplet-50', '--plot', '/sys/kernel/lens.png'], 'cannot write to the output folder /sys/kernel: permission denied'],
    ['visibility --plot', (s) => ['visibility', s, '--plot', '/sys/kernel/v.png'], 'cannot write to the output folder /sys/kernel: permission denied'],
    ['visibility --csv', (s) => ['visibility', s, '--csv', '/proc/self/nope/v.csv'], 'cannot write to the output folder /proc/self/nope: a folder cannot be made there'],
  ];
  for (const [name, args, message] of cases) {
    it(`${name}: one line, exit 4`, async () => {
      const dir = tempDir();
      writeFileSync(path.join(dir, 'shot.yaml'), MINIMAL_SHOT);
      if (name === 'sheet') expect((await cli(['render', path.join(dir, 'shot.yaml'), '--quiet'])).code).toBe(0);
      const r = await cli(args(path.join(dir, 'shot.yaml')));
      expect(r.stderr).toBe(`${message}\n`);
      expect(r.code).toBe(4);
    });
  }
});
