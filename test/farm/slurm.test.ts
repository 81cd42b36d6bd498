// The farm round trip on a real single-node Slurm (Debian slurm-wlm; brought up here in a
// temporary folder by scripts/slurm-local.sh, as ../shared/design/FARM.md describes): submit a
// shot as 4 array tasks plus the dependent verify job, wait, and compare every frame byte for byte
// with a local render. Needs root and slurm-wlm (scripts/install-test-tools.sh installs it).

import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { pngBytes, tempDir } from '../helpers.js';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const bin = path.join(root, 'bin', 'straylight.js');
const slurm = path.join(root, 'scripts', 'slurm-local.sh');
let slurmDir = '';
let env: NodeJS.ProcessEnv = {};

beforeAll(() => {
  // not tempDir(): that is removed after each test, and the daemons need their folder until the end
  slurmDir = mkdtempSync(path.join(tmpdir(), 'straylight-slurm-'));
  const conf = execFileSync('bash', [slurm, 'start', slurmDir], { encoding: 'utf8' }).trim();
  env = { ...process.env, SLURM_CONF: conf };
}, 60_000);

afterAll(() => {
  if (!slurmDir) return;
  spawnSync('bash', [slurm, 'stop', slurmDir]);
  rmSync(slurmDir, { recursive: true, force: true });
});

const shotText = (out: string) => `version: 1
frame: { width: 160, height: 90, rate: 24, first: 1, last: 12 }
lights:
  - name: sun
    position: [{ frame: 1, x: 20, y: 20 }, { frame: 12, x: 150, y: 40 }]
    intensity: 13
    radius: 3
lens: { preset: triplet-50, f_number: 5.6 }
flare: { ghosts: { quality: draft } }
output: { path: "${out}/f.####.png" }
`;


describe('farm on Slurm', () => {
  it('renders a shot as 4 array tasks, verifies it in a dependent job, and matches a local render byte for byte', () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'farm.yaml'), shotText('farm'));
    writeFileSync(path.join(dir, 'local.yaml'), shotText('local'));
    const submitted = execFileSync(process.execPath, [bin, 'farm', 'slurm', path.join(dir, 'farm.yaml'), '--tasks', '4', '--jobs-per-task', '1', '--submit'], { env, encoding: 'utf8' });
    const m = /render job (\d+) \(array of 4\), verify job (\d+)/.exec(submitted);
    expect(m).not.toBeNull();
    // wait for both jobs to leave the queue
    const deadline = Date.now() + 120_000;
    for (;;) {
      const q = execFileSync('squeue', ['-h', '-j', `${m![1]},${m![2]}`], { env, encoding: 'utf8' }).trim();
      if (q === '' || Date.now() > deadline) break;
      spawnSync('sleep', ['0.5']);
    }
    const verifyLog = readdirSync(path.join(dir, 'farm', 'slurm')).find((f) => f.startsWith('verify-'))!;
    const log = readFileSync(path.join(dir, 'farm', 'slurm', verifyLog), 'utf8');
    expect(log.startsWith(`${path.join(dir, 'farm', 'f.####.png')}: 12 of 12 frames present and intact (1-12)\n`)).toBe(true);
    // and the whole sequence is screened for flashing once the shards are in
    expect(log).toContain('flash screening: 12 frames, 1-12 at 24 fps, over black\nnothing found above the general or red flash thresholds');
    // each array task rendered its own shard
    expect(readdirSync(path.join(dir, 'farm')).filter((f) => f.includes('.manifest.shard-')).sort()).toEqual([0, 1, 2, 3].map((k) => `f.manifest.shard-${k}-of-4.json`));
    execFileSync(process.execPath, [bin, 'render', path.join(dir, 'local.yaml'), '--quiet']);
    const local = pngBytes(path.join(dir, 'local'));
    expect(Object.keys(local)).toHaveLength(12);
    expect(pngBytes(path.join(dir, 'farm'))).toEqual(local);
  }, 180_000);
});
