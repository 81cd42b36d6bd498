// Parallel, deterministic, resumable rendering: byte-identical frames for any worker count and any
// shard split; resume after a hard kill; a failing frame retried once, then reported.

import { spawn, spawnSync } from 'node:child_process';
import { existsSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { decode } from 'fast-png';
import { describe, expect, it } from 'vitest';
import { manifestPath, readManifests } from '../../src/io/manifest.js';
import { renderSequence } from '../../src/render/sequence.js';
import { resolveShot } from '../../src/shot/resolve.js';
import { presetNames, presetPath } from '../../src/io/presets.js';
import { pngBytes, tempDir } from '../helpers.js';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const bin = path.join(root, 'bin', 'straylight.js');

/** A small shot with a lens and a moving light, so frames differ and ghosts are drawn. */
const SHOT = `version: 1
frame: { width: 160, height: 90, rate: 24, first: 101, last: 112 }
lights:
  - name: sun
    position: [{ frame: 101, x: 20, y: 20 }, { frame: 112, x: 150, y: 40 }]
    intensity: 13
    radius: 3
lens: { preset: triplet-50, f_number: 5.6 }
flare: { ghosts: { quality: draft } }
output: { path: "out/f.####.png" }
`;

function shotIn(dir: string) {
  writeFileSync(path.join(dir, 'shot.yaml'), SHOT);
  return resolveShot(SHOT, path.join(dir, 'shot.yaml'), { readText: (p) => readFileSync(p, 'utf8'), presetNames, presetPath });
}


describe('parallel rendering', () => {
  it('never detaches an ArrayBuffer in a worker (V8 would then recompile every typed-array function)', () => {
    // A worker that transfers a buffer away invalidates V8's "no buffer is ever detached"
    // protector, which throws away all optimised code touching typed arrays in that thread, after
    // its first frame. V8 reports the invalidation under --trace-protector-invalidation.
    const dir = tempDir();
    writeFileSync(path.join(dir, 'shot.yaml'), SHOT);
    const r = spawnSync(process.execPath, ['--trace-protector-invalidation', bin, 'render', 'shot.yaml', '--jobs', '2', '--quiet'], { cwd: dir, encoding: 'utf8' });
    expect(r.status).toBe(0);
    expect(readdirSync(path.join(dir, 'out')).filter((f) => f.endsWith('.png'))).toHaveLength(12);
    expect(r.stdout + r.stderr).not.toMatch(/Invalidating protector cell ArrayBufferDetaching/);
    // the control: this Node reports a transfer under the flag
    const control = spawnSync(process.execPath, ['--trace-protector-invalidation', '-e', 'const b = new ArrayBuffer(8); structuredClone(b, { transfer: [b] });'], { encoding: 'utf8' });
    expect(control.stdout + control.stderr).toMatch(/Invalidating protector cell ArrayBufferDetaching/);
  });

  it('gives byte-identical frames with 1, 2 and 4 workers', async () => {
    const outs: Record<string, string>[] = [];
    for (const jobs of [1, 2, 4]) {
      const dir = tempDir();
      const r = await renderSequence(shotIn(dir), { jobs });
      expect(r.failed).toEqual([]);
      expect(r.written).toHaveLength(12);
      outs.push(pngBytes(path.join(dir, 'out')));
    }
    expect(Object.keys(outs[0])).toHaveLength(12);
    expect(outs[1]).toEqual(outs[0]);
    expect(outs[2]).toEqual(outs[0]);
  });

  it('gives the same frames when the shot is split into shards, rendered in any order', async () => {
    const whole = tempDir();
    await renderSequence(shotIn(whole), { jobs: 1 });
    const split = tempDir();
    const shot = shotIn(split);
    for (const k of [2, 0, 1]) await renderSequence(shot, { shard: { k, n: 3 }, jobs: 2 });
    expect(pngBytes(path.join(split, 'out'))).toEqual(pngBytes(path.join(whole, 'out')));
    // each shard keeps its own manifest
    expect(readManifests(path.join(split, 'out', 'f.####.png')).map((m) => path.basename(m.file))).toEqual([
      'f.manifest.shard-0-of-3.json',
      'f.manifest.shard-1-of-3.json',
      'f.manifest.shard-2-of-3.json',
    ]);
  });

  it('resumes: frames recorded in the manifest and intact on disk are kept; --force renders them again', async () => {
    const dir = tempDir();
    const shot = shotIn(dir);
    await renderSequence(shot, { jobs: 2 });
    const again = await renderSequence(shot, { jobs: 2 });
    expect(again.skipped).toHaveLength(12);
    expect(again.written).toEqual([]);
    // a damaged frame is rendered again; the rest are kept
    writeFileSync(path.join(dir, 'out', 'f.0105.png'), 'not a png');
    const repair = await renderSequence(shot, { jobs: 2 });
    expect(repair.written).toEqual([105]);
    const forced = await renderSequence(shot, { jobs: 2, force: true });
    expect(forced.written).toHaveLength(12);
  });

  it('a changed shot renders every frame again', async () => {
    const dir = tempDir();
    await renderSequence(shotIn(dir), { jobs: 1 });
    const changed = resolveShot(SHOT.replace('intensity: 13', 'intensity: 12'), path.join(dir, 'shot.yaml'), { readText: (p) => readFileSync(p, 'utf8'), presetNames, presetPath });
    const r = await renderSequence(changed, { jobs: 1 });
    expect(r.written).toHaveLength(12);
    expect(r.skipped).toEqual([]);
  });

  it('retries a frame that fails once, then succeeds; reports one that always fails and renders the rest', async () => {
    const dir = tempDir();
    const shot = shotIn(dir);
    const once = await renderSequence(shot, { jobs: 2, fault: { frame: 104, kind: 'throw', times: 'once' } });
    expect(once.failed).toEqual([]);
    expect(once.written).toHaveLength(12);
    const dir2 = tempDir();
    const always = await renderSequence(shotIn(dir2), { jobs: 2, fault: { frame: 104, kind: 'throw', times: 'always' } });
    expect(always.failed.map((f) => f.frame)).toEqual([104]);
    expect(always.written).toHaveLength(11);
    expect(existsSync(path.join(dir2, 'out', 'f.0104.png'))).toBe(false);
  });

  it('survives a worker that crashes: the frame is retried on a fresh worker', async () => {
    const dir = tempDir();
    const r = await renderSequence(shotIn(dir), { jobs: 2, fault: { frame: 107, kind: 'crash', times: 'once' } });
    expect(r.failed).toEqual([]);
    expect(r.written).toHaveLength(12);
    const dir2 = tempDir();
    const r2 = await renderSequence(shotIn(dir2), { jobs: 2, fault: { frame: 107, kind: 'crash', times: 'always' } });
    expect(r2.failed.map((f) => f.frame)).toEqual([107]);
    expect(r2.failed[0].error).toBe('the worker rendering it stopped unexpectedly');
    expect(r2.written).toHaveLength(11);
  });

  it('a render killed with SIGKILL leaves only whole frames, and a re-run completes it byte-identically', async () => {
    const ref = tempDir();
    await renderSequence(shotIn(ref), { jobs: 1 });
    const dir = tempDir();
    shotIn(dir);
    // a bigger frame range so the kill lands mid-render
    const child = spawn(process.execPath, [bin, 'render', path.join(dir, 'shot.yaml'), '--jobs', '2', '--quiet'], { stdio: 'ignore' });
    const out = path.join(dir, 'out');
    await new Promise<void>((resolve) => {
      const poll = setInterval(() => {
        const n = existsSync(out) ? readdirSync(out).filter((f) => /^f\.\d+\.png$/.test(f)).length : 0;
        if (n >= 3) {
          clearInterval(poll);
          child.kill('SIGKILL');
          resolve();
        }
      }, 5);
    });
    await new Promise((resolve) => child.on('exit', resolve));
    // every file under a frame name decodes: no half-written frame
    const named = readdirSync(out).filter((f) => /^f\.\d+\.png$/.test(f));
    expect(named.length).toBeGreaterThan(0);
    for (const f of named) expect(() => decode(readFileSync(path.join(out, f)))).not.toThrow();
    const r = spawnSync(process.execPath, [bin, 'render', path.join(dir, 'shot.yaml'), '--jobs', '2', '--quiet']);
    expect(r.status, r.stderr.toString()).toBe(0);
    expect(pngBytes(out)).toEqual(pngBytes(path.join(ref, 'out')));
    expect(existsSync(manifestPath(path.join(out, 'f.####.png')))).toBe(true);
  });
});

describe('resume and mattes', () => {
  it('a changed matte file renders the frames again', async () => {
    const { mkdirSync, utimesSync } = await import('node:fs');
    const { encodePng } = await import('../../src/io/png.js');
    const { FloatImage } = await import('../../src/raster/image.js');
    const dir = tempDir();
    mkdirSync(path.join(dir, 'm'));
    const matte = path.join(dir, 'm', 'c.0001.png');
    writeFileSync(matte, encodePng(new FloatImage(32, 18), { bitDepth: 8, transfer: 'linear', alpha: 'none' }));
    const text = `version: 1
frame: { width: 32, height: 18, rate: 24, first: 1, last: 2 }
lights: [{ name: a, position: [16, 9], intensity: 1 }]
mattes: [{ name: c, kind: alpha, path: m/c.####.png }]
output: { path: "out/f.####.png" }
`;
    const shot = () => resolveShot(text, path.join(dir, 'shot.yaml'), { readText: () => '' });
    expect((await renderSequence(shot())).written).toEqual([1, 2]);
    expect((await renderSequence(shot())).skipped).toEqual([1, 2]);
    utimesSync(matte, new Date(), new Date(Date.now() + 5000));
    expect((await renderSequence(shot())).written).toEqual([1, 2]);
  });
});

describe('separate passes', () => {
  it('writes one sequence per element that adds light, which sum to the combined frame', async () => {
    const dir = tempDir();
    const { run } = await import('../../src/cli/run.js');
    const shotText = SHOT.replace('flare: { ghosts: { quality: draft } }', 'flare: { ghosts: { quality: draft }, veil: { fraction: 0.01 } }');
    writeFileSync(path.join(dir, 'combined.yaml'), shotText);
    writeFileSync(path.join(dir, 'separate.yaml'), shotText.replace('output: { path: "out/f.####.png" }', 'output: { path: "sep/f.####.png", passes: separate, transfer: linear }').replace('lens:', 'lens:'));
    writeFileSync(path.join(dir, 'linear.yaml'), shotText.replace('output: { path: "out/f.####.png" }', 'output: { path: "lin/f.####.png", transfer: linear }'));
    const quiet = { stdout: () => {}, stderr: () => {}, stderrIsTTY: false };
    expect(await run(['render', path.join(dir, 'separate.yaml'), '--quiet', '--jobs', '2'], quiet)).toBe(0);
    expect(await run(['render', path.join(dir, 'linear.yaml'), '--quiet', '--jobs', '1'], quiet)).toBe(0);
    const names = readdirSync(path.join(dir, 'sep')).filter((f) => f.endsWith('.0105.png')).sort();
    expect(names).toEqual(['f.core.0105.png', 'f.ghosts.0105.png', 'f.glow.0105.png', 'f.starburst.0105.png', 'f.veil.0105.png']);
    // in linear light the passes add up to the combined frame (within 16-bit rounding, and where nothing clips)
    const sum = new Float64Array(160 * 90 * 3);
    for (const n of names) {
      const p = decode(readFileSync(path.join(dir, 'sep', n)));
      for (let i = 0; i < sum.length; i++) sum[i] += p.data[i] / 65535;
    }
    const whole = decode(readFileSync(path.join(dir, 'lin', 'f.0105.png')));
    let worst = 0;
    for (let i = 0; i < sum.length; i++) if (whole.data[i] < 65000) worst = Math.max(worst, Math.abs(sum[i] - whole.data[i] / 65535));
    expect(worst).toBeLessThan(5 / 65535);
    // verify checks every pass
    let out = '';
    expect(await run(['verify', path.join(dir, 'separate.yaml')], { ...quiet, stdout: (s) => (out += s) })).toBe(0);
    expect(out.trim().split('\n')).toHaveLength(5);
  });
});
