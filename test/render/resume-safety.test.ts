// What a render keeps and what it refuses to touch: partial re-renders keep the other frames'
// records; harmless edits of the shot keep its hash; a changed hash keeps old records until each
// frame is rendered again; unreadable manifests are named; two processes with disjoint ranges
// share one manifest; files straylight did not write are never replaced without --force; stray
// temporary files are reported and cleaned; kept frames are screened for flashing too.

import { spawn } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, readFileSync, readdirSync, utimesSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { loadShot } from '../../src/io/load-shot.js';
import { encodePng } from '../../src/io/png.js';
import { FloatImage } from '../../src/raster/image.js';
import { manifestPath, readManifests, shotHash, withManifestLock } from '../../src/io/manifest.js';
import { verifySequence } from '../../src/render/verify.js';
import { cli, pngBytes, tempDir } from '../helpers.js';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const bin = path.join(root, 'bin', 'straylight.js');

/** 24 small frames of a light moving across, with an alpha matte sequence beside the shot. */
function shotWithMatte(dir: string, extra = ''): string {
  mkdirSync(path.join(dir, 'm'), { recursive: true });
  // a small empty matte per frame is enough: `resize: stretch` lays it over the frame
  const png = encodePng(new FloatImage(4, 4), { bitDepth: 8, transfer: 'linear', alpha: 'none' });
  for (let f = 1; f <= 24; f++) writeFileSync(path.join(dir, 'm', `fg.${String(f).padStart(4, '0')}.png`), png);
  const file = path.join(dir, 'shot.yaml');
  writeFileSync(
    file,
    `version: 1
frame: { width: 48, height: 32, rate: 24, first: 1, last: 24 }
lights:
  - name: lamp
    position: [{ frame: 1, x: 4, y: 16 }, { frame: 24, x: 44, y: 16 }]
    intensity: 4
mattes:
  - { name: fg, kind: alpha, path: m/fg.####.png, resize: stretch }
${extra}output: { path: out/f.####.png }
`,
  );
  return file;
}

const manifestOf = (dir: string) => JSON.parse(readFileSync(manifestPath(path.join(dir, 'out', 'f.####.png')), 'utf8')) as { frames: Record<string, unknown>; pending?: number[] };

describe('resume and output safety', () => {
  it('a partial re-render with --force keeps the records of every other frame', async () => {
    const dir = tempDir();
    const shot = shotWithMatte(dir);
    expect((await cli(['render', shot, '--jobs', '1', '--quiet'])).code).toBe(0);
    expect((await cli(['render', shot, '--jobs', '1', '--quiet', '--frames', '10-12', '--force'])).code).toBe(0);
    expect(Object.keys(manifestOf(dir).frames)).toHaveLength(24);
    const v = await cli(['verify', shot]);
    expect(v.code).toBe(0);
    expect(v.stdout).toContain('24 of 24 frames present and intact');
    // without --force, a partial render of frames not yet recorded keeps the others too
    const dir2 = tempDir();
    const shot2 = shotWithMatte(dir2);
    expect((await cli(['render', shot2, '--jobs', '1', '--quiet', '--frames', '1-5'])).code).toBe(0);
    expect((await cli(['render', shot2, '--jobs', '1', '--quiet', '--frames', '20-24'])).code).toBe(0);
    expect(Object.keys(manifestOf(dir2).frames).map(Number)).toEqual([1, 2, 3, 4, 5, 20, 21, 22, 23, 24]);
  });

  it('keeps the hash when the shot file is commented, re-indented, copied or renamed', async () => {
    const dir = tempDir();
    const file = shotWithMatte(dir);
    const hash = shotHash(await loadShot(file));
    const text = readFileSync(file, 'utf8');
    const commented = `# a note added on top\n${text.replace('mattes:', '# the foreground\nmattes:')}`;
    writeFileSync(path.join(dir, 'commented.yaml'), commented);
    expect(shotHash(await loadShot(path.join(dir, 'commented.yaml')))).toBe(hash);
    writeFileSync(path.join(dir, 'reindented.yaml'), text.replace('  - name: lamp\n    position', '  -   name: lamp\n      position').replace('\n    intensity: 4', '\n      intensity: 4'));
    expect(shotHash(await loadShot(path.join(dir, 'reindented.yaml')))).toBe(hash);
    // a copy in another folder, with the same matte files (copied with their times)
    const other = tempDir();
    mkdirSync(path.join(other, 'm'));
    for (const n of readdirSync(path.join(dir, 'm'))) {
      copyFileSync(path.join(dir, 'm', n), path.join(other, 'm', n));
      const t = new Date(1.7e12);
      utimesSync(path.join(dir, 'm', n), t, t);
      utimesSync(path.join(other, 'm', n), t, t);
    }
    copyFileSync(file, path.join(other, 'renamed.yaml'));
    expect(shotHash(await loadShot(path.join(other, 'renamed.yaml')))).toBe(shotHash(await loadShot(file)));
    // and a real change does change it
    writeFileSync(path.join(dir, 'changed.yaml'), text.replace('intensity: 4', 'intensity: 5'));
    expect(shotHash(await loadShot(path.join(dir, 'changed.yaml')))).not.toBe(hash);
  });

  it('after a harmless edit a render keeps every frame; after a real change old records stay until re-rendered', async () => {
    const dir = tempDir();
    const file = shotWithMatte(dir);
    expect((await cli(['render', file, '--jobs', '1', '--quiet'])).code).toBe(0);
    writeFileSync(file, `# reviewed\n${readFileSync(file, 'utf8')}`);
    const again = await cli(['render', file, '--jobs', '1']);
    expect(again.stderr).toContain('rendered 0 frames');
    expect(again.stderr).toContain('(24 already there, kept)');
    // a real change, rendered for three frames only: the other 21 keep their (old) records
    writeFileSync(file, readFileSync(file, 'utf8').replace('intensity: 4', 'intensity: 5'));
    expect((await cli(['render', file, '--jobs', '1', '--quiet', '--frames', '1-3'])).code).toBe(0);
    const m = manifestOf(dir);
    expect(Object.keys(m.frames)).toHaveLength(24);
    const v = verifySequence(path.join(dir, 'out', 'f.####.png'), { first: 1, last: 24, hash: shotHash(await loadShot(file)) });
    expect(v.intact).toBe(3);
    expect(v.missing).toHaveLength(21);
    expect(v.hashes).toHaveLength(2);
  });

  it('names a manifest it cannot parse and treats it as absent', async () => {
    const dir = tempDir();
    const file = shotWithMatte(dir);
    expect((await cli(['render', file, '--jobs', '1', '--quiet'])).code).toBe(0);
    const manifest = manifestPath(path.join(dir, 'out', 'f.####.png'));
    writeFileSync(manifest, '{"version": 1, "frames": {');
    const r = await cli(['render', file, '--jobs', '1']);
    expect(r.code).toBe(0);
    expect(r.stderr).toContain(`warning: ${manifest} is not a manifest straylight can read; treated as absent (its frames are rendered again)`);
    expect(r.stderr).toContain('rendered 24 frames');
    expect(readManifests(path.join(dir, 'out', 'f.####.png'))).toHaveLength(1);
  });

  it('two processes rendering disjoint ranges into one folder end with every frame recorded', async () => {
    const dir = tempDir();
    const file = shotWithMatte(dir);
    const run = (frames: string) =>
      new Promise<number>((resolve) => {
        const child = spawn(process.execPath, [bin, 'render', file, '--jobs', '1', '--quiet', '--frames', frames], { stdio: 'ignore' });
        child.on('exit', (code) => resolve(code ?? -1));
      });
    expect(await Promise.all([run('1-12'), run('13-24')])).toEqual([0, 0]);
    expect(Object.keys(manifestOf(dir).frames)).toHaveLength(24);
    expect(manifestOf(dir).pending).toBeUndefined();
    expect((await cli(['verify', file])).code).toBe(0);
  });

  it('takes over a manifest lock left by a killed render (empty, or its process gone), not one a live process holds', async () => {
    const { spawnSync } = await import('node:child_process');
    const dir = tempDir();
    const file = shotWithMatte(dir);
    mkdirSync(path.join(dir, 'out'));
    const mine = manifestPath(path.join(dir, 'out', 'f.####.png'));
    const lock = path.join(path.dirname(mine), `.${path.basename(mine)}.lock`);
    const old = (Date.now() - 5000) / 1000;
    // killed between creating the lock and writing its process id into it
    writeFileSync(lock, '');
    utimesSync(lock, old, old);
    expect((await cli(['render', file, '--frames', '1-2', '--quiet'])).code).toBe(0);
    expect(existsSync(lock)).toBe(false);
    // killed while holding it: the process id is of a process that has ended
    const ended = spawnSync(process.execPath, ['-e', '0']).pid;
    writeFileSync(lock, String(ended));
    utimesSync(lock, old, old);
    expect((await cli(['render', file, '--frames', '3-4', '--quiet'])).code).toBe(0);
    expect(Object.keys(manifestOf(dir).frames)).toEqual(['1', '2', '3', '4']);
    // held by a running process (this one): waited for, then refused with a reason
    writeFileSync(lock, String(process.pid));
    utimesSync(lock, old, old);
    expect(() => withManifestLock(mine, () => 0, 300)).toThrow(/held by another render/);
    expect(existsSync(lock)).toBe(true);
  });

  it('never replaces a file it did not write, unless --force says so, and says so before rendering', async () => {
    const dir = tempDir();
    const file = shotWithMatte(dir);
    mkdirSync(path.join(dir, 'out'));
    writeFileSync(path.join(dir, 'out', 'f.0007.png'), 'a colleague\'s frame');
    const r = await cli(['render', file, '--jobs', '1']);
    expect(r.code).toBe(3);
    expect(r.stderr).toBe(`1 file already under the output's frame names was not written by straylight (no manifest beside it records it): ${path.join(dir, 'out', 'f.0007.png')}; nothing was rendered. Choose another output path, or give --force to replace it\n`);
    expect(readdirSync(path.join(dir, 'out'))).toEqual(['f.0007.png']);
    const forced = await cli(['render', file, '--jobs', '1', '--quiet', '--force']);
    expect(forced.code).toBe(0);
    expect(readFileSync(path.join(dir, 'out', 'f.0007.png')).subarray(1, 4).toString()).toBe('PNG');
    // a damaged frame of our own is simply rendered again
    writeFileSync(path.join(dir, 'out', 'f.0009.png'), 'truncated');
    const repair = await cli(['render', file, '--jobs', '1']);
    expect(repair.code).toBe(0);
    expect(repair.stderr).toContain('rendered 1 frame ');
  });

  it('reports stray temporary files in verify; the next render removes old ones of gone processes, not fresh ones', async () => {
    const dir = tempDir();
    const file = shotWithMatte(dir);
    expect((await cli(['render', file, '--jobs', '1', '--quiet'])).code).toBe(0);
    // pid 999999999 is above any Linux pid_max (4194304): no such process
    const stray = path.join(dir, 'out', '.f.0003.png.999999999.0.tmp');
    writeFileSync(stray, 'half a frame');
    // a fresh one (another machine's write in progress, perhaps) is left alone
    const fresh = path.join(dir, 'out', '.f.0004.png.999999998.0.tmp');
    writeFileSync(fresh, 'being written');
    // an hour old: left by an interrupted render
    const hourAgo = new Date(Date.now() - 3600e3);
    utimesSync(stray, hourAgo, hourAgo);
    const v = await cli(['verify', file]);
    expect(v.stdout).toContain(`temporary files left by an interrupted write (safe to delete when no render is running; the next render removes those over 10 minutes old): ${stray}`);
    const r = await cli(['render', file, '--jobs', '1']);
    expect(r.stderr).toContain(`warning: removed 1 temporary file left in ${path.join(dir, 'out')} by an interrupted render`);
    expect(existsSync(stray)).toBe(false);
    expect(existsSync(fresh)).toBe(true);
  });

  it('screens frames kept from an earlier render too: a rerun on a flashing sequence still warns and fails on flash', async () => {
    const dir = tempDir();
    // 3 Hz full-frame flashing: the light's intensity alternates every 4 frames (WCAG 2.3.1: more
    // than 3 flashes in a second fails)
    const keys = Array.from({ length: 24 }, (_, i) => `{ frame: ${i + 1}, value: ${i % 4 < 2 ? 1 : 0}, ease: hold }`).join(', ');
    const file = path.join(dir, 'shot.yaml');
    writeFileSync(file, `version: 1
frame: { width: 48, height: 32, rate: 24, first: 1, last: 24 }
lights:
  - { name: strobe, position: [24, 16], radius: 40, intensity_unit: linear, intensity: [${keys}] }
flare: { glow: { enabled: false } }
output: { path: out/f.####.png }
`);
    const first = await cli(['render', file, '--jobs', '1', '--fail-on-flash']);
    expect(first.code).toBe(5);
    expect(first.stderr).toContain('WARNING: this pass may flash dangerously');
    const bytes = pngBytes(path.join(dir, 'out'));
    const rerun = await cli(['render', file, '--jobs', '1', '--fail-on-flash']);
    expect(rerun.stderr).toContain('(24 already there, kept)');
    expect(rerun.stderr).toContain('WARNING: this pass may flash dangerously');
    expect(rerun.code).toBe(5);
    expect(pngBytes(path.join(dir, 'out'))).toEqual(bytes);
  });
});
