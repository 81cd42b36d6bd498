// verify: finds a deleted and a truncated frame; a complete sequence passes; sharded manifests merge.

import { readFileSync, rmSync, truncateSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ExitCode } from '../../src/errors.js';
import { cli, tempDir } from '../helpers.js';


const SHOT = `version: 1
frame: { width: 64, height: 36, rate: 24, first: 1, last: 8 }
lights: [{ name: a, position: [{ frame: 1, x: 5, y: 5 }, { frame: 8, x: 60, y: 30 }], intensity: 2 }]
output: { path: "out/v.####.png" }
`;

function shot(): string {
  const dir = tempDir();
  const f = path.join(dir, 'shot.yaml');
  writeFileSync(f, SHOT);
  return f;
}

describe('straylight verify', () => {
  it('passes a complete sequence, from the shot and from the folder', async () => {
    const f = shot();
    expect((await cli(['render', f, '--quiet', '--jobs', '1'])).code).toBe(0);
    const r = await cli(['verify', f]);
    expect(r.code).toBe(0);
    expect(r.stdout).toBe(`${path.join(path.dirname(f), 'out', 'v.####.png')}: 8 of 8 frames present and intact (1-8)\n`);
    expect((await cli(['verify', path.join(path.dirname(f), 'out')])).code).toBe(0);
  });

  it('finds a deleted and a truncated frame, and exits 4', async () => {
    const f = shot();
    await cli(['render', f, '--quiet', '--jobs', '1']);
    const out = path.join(path.dirname(f), 'out');
    rmSync(path.join(out, 'v.0003.png'));
    truncateSync(path.join(out, 'v.0006.png'), 100);
    const r = await cli(['verify', f, '--json']);
    expect(r.code).toBe(ExitCode.framesFailed);
    const [report] = JSON.parse(r.stdout);
    expect(report.missing).toEqual([3]);
    expect(report.corrupt).toEqual([6]);
    expect(report.intact).toBe(6);
    // and a re-render repairs exactly those two
    const again = await cli(['render', f, '--progress', 'json', '--jobs', '1']);
    const written = again.stderr.split('\n').filter(Boolean).map((l) => JSON.parse(l)).filter((e) => e.event === 'written').map((e) => e.frame);
    expect(written).toEqual([3, 6]);
    expect((await cli(['verify', f])).code).toBe(0);
  });

  it('merges the manifests of shards, and reports frames of a missing shard', async () => {
    const f = shot();
    await cli(['render', f, '--quiet', '--shard', '0/2', '--jobs', '1']);
    const half = await cli(['verify', f, '--json']);
    expect(half.code).toBe(ExitCode.framesFailed);
    expect(JSON.parse(half.stdout)[0].missing).toEqual([2, 4, 6, 8]);
    await cli(['render', f, '--quiet', '--shard', '1/2', '--jobs', '1']);
    expect((await cli(['verify', f])).code).toBe(0);
  });

  it('treats frames from an older version of the shot as missing', async () => {
    const f = shot();
    await cli(['render', f, '--quiet', '--jobs', '1']);
    writeFileSync(f, readFileSync(f, 'utf8').replace('intensity: 2', 'intensity: 3'));
    const r = await cli(['verify', f, '--json']);
    expect(r.code).toBe(ExitCode.framesFailed);
    expect(JSON.parse(r.stdout)[0].missing).toHaveLength(8);
  });

  it('rejects a bad shard', async () => {
    const r = await cli(['render', shot(), '--shard', '2/2']);
    expect(r.code).toBe(ExitCode.usage);
    expect(r.stderr).toBe('--shard: expected K/N with 0 <= K < N (e.g. 0/4), found "2/2"\n');
  });
});
