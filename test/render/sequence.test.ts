// The sequence renderer: whole files only, failures reported while the rest go on, clean stops.

import { mkdirSync, readdirSync, existsSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { resolveShot } from '../../src/shot/resolve.js';
import { renderSequence, type FrameEvent } from '../../src/render/sequence.js';
import { MINIMAL_SHOT, tempDir } from '../helpers.js';

function shotIn(dir: string) {
  return resolveShot(MINIMAL_SHOT.replace('last: 3', 'last: 5'), path.join(dir, 'shot.yaml'), { readText: () => '' });
}

describe('sequence rendering', () => {
  it('writes every frame under its final name and leaves no temporary files', async () => {
    const dir = tempDir();
    const result = await renderSequence(shotIn(dir));
    expect(result.written).toEqual([1, 2, 3, 4, 5]);
    expect(readdirSync(path.join(dir, 'out')).sort()).toEqual(['f.0001.png', 'f.0002.png', 'f.0003.png', 'f.0004.png', 'f.0005.png', 'f.manifest.json']);
  });

  it('reports a frame it cannot write and renders the others', async () => {
    const dir = tempDir();
    // a folder appearing where frame 3's file should go (after the start-up checks) makes its rename fail
    const events: FrameEvent[] = [];
    const result = await renderSequence(shotIn(dir), {
      onFrame: (e) => {
        events.push(e);
        if (e.kind === 'written' && e.frame === 1) mkdirSync(path.join(dir, 'out', 'f.0003.png'), { recursive: true });
      },
    });
    expect(result.written).toEqual([1, 2, 4, 5]);
    expect(result.failed.map((f) => f.frame)).toEqual([3]);
    expect(events.filter((e) => e.kind === 'failed')).toHaveLength(1);
    expect(readdirSync(path.join(dir, 'out')).filter((n) => n.endsWith('.tmp'))).toEqual([]);
  });

  it('stops between frames when aborted, keeping only whole frames', async () => {
    const dir = tempDir();
    const ctl = new AbortController();
    const result = await renderSequence(shotIn(dir), {
      onFrame: (e) => {
        if (e.kind === 'written' && e.frame === 2) ctl.abort();
      },
      signal: ctl.signal,
    });
    expect(result.interrupted).toBe(true);
    expect(result.written).toEqual([1, 2]);
    expect(readdirSync(path.join(dir, 'out')).sort()).toEqual(['f.0001.png', 'f.0002.png', 'f.manifest.json']);
  });

  it('renders a sub-range to an overriding template', async () => {
    const dir = tempDir();
    const result = await renderSequence(shotIn(dir), { frames: { first: 2, last: 3 }, template: path.join(dir, 'x', 'y_%03d.png') });
    expect(result.written).toEqual([2, 3]);
    expect(existsSync(path.join(dir, 'x', 'y_002.png'))).toBe(true);
    expect(existsSync(path.join(dir, 'out'))).toBe(false);
  });
});
