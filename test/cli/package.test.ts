// The published package: `npm pack` makes a tarball that installs with npm into a prefix of its
// own and runs from another folder (the bundled demo shot, the preset lenses, the licence).

import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { tempDir } from '../helpers.js';

const ROOT = path.resolve(import.meta.dirname, '../..');
const pkg = JSON.parse(readFileSync(path.join(ROOT, 'package.json'), 'utf8')) as { name: string; version: string; license: string; private?: boolean };

describe('the npm package', () => {
  it('is Apache-2.0 licensed and not private', () => {
    expect(pkg.license).toBe('Apache-2.0');
    expect(pkg.private).toBeUndefined();
    expect(readFileSync(path.join(ROOT, 'LICENSE'), 'utf8')).toContain('Apache License\n                           Version 2.0, January 2004');
  });

  it('packs into a tarball that installs into a prefix and checks the bundled demo from another folder', () => {
    const work = tempDir();
    const packed = execFileSync('npm', ['pack', '--silent', '--pack-destination', work], { cwd: ROOT, encoding: 'utf8' }).trim().split('\n').pop()!;
    const tarball = path.join(work, packed);
    expect(existsSync(tarball)).toBe(true);
    const prefix = path.join(work, 'prefix');
    execFileSync('npm', ['install', '-g', '--prefix', prefix, tarball, '--no-audit', '--no-fund', '--loglevel', 'error'], { cwd: work, encoding: 'utf8' });
    const installed = path.join(prefix, 'lib', 'node_modules', pkg.name);
    expect(existsSync(path.join(installed, 'LICENSE'))).toBe(true);
    const bin = path.join(prefix, 'bin', 'straylight');
    const elsewhere = tempDir();
    const version = spawnSync(bin, ['--version'], { cwd: elsewhere, encoding: 'utf8' });
    expect(version.stdout.trim()).toBe(pkg.version);
    const check = spawnSync(bin, ['check', path.join(installed, 'shots', 'harbour-beacon.yaml')], { cwd: elsewhere, encoding: 'utf8' });
    expect(check.stderr).toBe('');
    expect(check.status).toBe(0);
    expect(check.stdout).toMatch(/^light\s+beacon: 2800 K/m);
    // the second demo reads its camera and lights from the glTF scene shipped beside it
    const scene = spawnSync(bin, ['check', path.join(installed, 'shots', 'rooftop-crane.yaml')], { cwd: elsewhere, encoding: 'utf8' });
    expect(scene.stderr).toBe('');
    expect(scene.status).toBe(0);
    expect(scene.stdout).toMatch(/^ {2}path\s+warning-lamp: on the frame 48 of 48 frames/m);
    // the third tracks its lamp in the plate shipped beside it, which is also its matte
    const plate = spawnSync(bin, ['check', path.join(installed, 'shots', 'park-lamp.yaml')], { cwd: elsewhere, encoding: 'utf8' });
    expect(plate.stderr).toBe('');
    expect(plate.status).toBe(0);
    expect(plate.stdout).toMatch(/^matte\s+plate: plate, .*park\.####\.png \(frames 1001-1048\)/m);
    // preset lenses are found beside the installed code, whatever the current folder
    const lens = spawnSync(bin, ['lens', 'double-gauss-50'], { cwd: elsewhere, encoding: 'utf8' });
    expect(lens.status).toBe(0);
    expect(lens.stdout).toMatch(/^lens\s+double-gauss-50 \(preset\)/);
  }, 120_000);
});
