// The rule "the same shot gives byte-identical frames whatever the worker count, shard or order"
// for the inputs that are read as a whole before frames are drawn: a camera and lights from a glTF
// scene (the rooftop-crane demo) and a plate matte whose clear level is taken over the whole shot
// (the park-lamp demo). Each is rendered in one process, then on two workers in three shards given
// in reverse order, over a few frames where the lights are partly covered.

import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { cli, tempDir } from '../helpers.js';

const ROOT = path.resolve(import.meta.dirname, '../..');
const hash = (f: string) => createHash('sha256').update(readFileSync(f)).digest('hex');

describe('byte-identical frames from scenes and plates', () => {
  for (const [shot, frames] of [['rooftop-crane', [26, 31]], ['park-lamp', [1026, 1031]]] as const) {
    it(`${shot}: one worker, or two workers in three shards in reverse order`, async () => {
      const a = tempDir();
      const b = tempDir();
      const file = path.join(ROOT, 'shots', `${shot}.yaml`);
      const range = `${frames[0]}-${frames[1]}`;
      const one = await cli(['render', file, '--frames', range, '--jobs', '1', '--out', path.join(a, 'f.####.exr'), '--quiet']);
      expect(one.code).toBe(0);
      for (const k of [2, 1, 0]) {
        const r = await cli(['render', file, '--frames', range, '--jobs', '2', '--shard', `${k}/3`, '--out', path.join(b, 'f.####.exr'), '--quiet']);
        expect(r.code).toBe(0);
      }
      for (let f = frames[0]; f <= frames[1]; f++) {
        const name = `f.${String(f).padStart(4, '0')}.exr`;
        expect(hash(path.join(b, name))).toBe(hash(path.join(a, name)));
      }
    });
  }
});
