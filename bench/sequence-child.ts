// One sequence render in a fresh process, as `straylight render` runs: `npm run bench` starts this
// for each worker count so neither count inherits the JIT warm-up of the bench's earlier rows.
// Usage: node dist/bench/sequence-child.js JOBS WIDTH HEIGHT FRAMES
// Prints one JSON line: frames per second over the whole render and over its second half, each
// worker's start-up, the process's peak resident memory (getrusage's maximum RSS), the CPU time of
// all its threads, and the machine's steal time over the render.
//
// Steal time is the time the hypervisor ran something else on this machine's virtual CPUs while
// they had work (Linux /proc/stat, the 8th number of the `cpu` line, in USER_HZ ticks: proc(5)).
// On a shared virtual machine it is what tells a slow run caused by neighbours from a slow program.

import { execFileSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { presetNames, presetPath } from '../src/io/presets.js';
import { renderSequence } from '../src/render/sequence.js';
import { resolveShot } from '../src/shot/resolve.js';
import type { ResolvedShot } from '../src/shot/types.js';

export interface SequenceRun {
  jobs: number;
  fps: number;
  steadyFps: number;
  startupMs: number[];
  maxRssMiB: number;
  /** user + system CPU time of the process (all threads), ms */
  cpuMs: number;
  /** steal time summed over the machine's CPUs during the render, ms (null where not reported) */
  stealMs: number | null;
}

/** The machine's total steal time so far, ms, or null where /proc/stat does not report it. */
export function stealNow(): number | null {
  if (!existsSync('/proc/stat')) return null;
  const cpu = readFileSync('/proc/stat', 'utf8').split('\n')[0].trim().split(/\s+/);
  if (cpu[0] !== 'cpu' || cpu.length < 9) return null;
  return (Number(cpu[8]) * 1000) / ticksPerSecond();
}

let ticks: number | undefined;
function ticksPerSecond(): number {
  if (ticks === undefined) {
    try {
      ticks = Number(execFileSync('getconf', ['CLK_TCK'], { encoding: 'utf8' }).trim()) || 100;
    } catch {
      ticks = 100; // USER_HZ on Linux's common architectures (proc(5))
    }
  }
  return ticks;
}

/** The bench's sequence: one sun crossing the frame through the double-Gauss preset, with glow. */
export function flareShot(width: number, height: number, frames: number, dir: string, shutter = ''): ResolvedShot {
  const text = `version: 1
frame: { width: ${width}, height: ${height}, rate: 24, first: 1, last: ${frames} }
lights:
  - name: sun
    position: [{ frame: 1, x: ${width * 0.2}, y: ${height * 0.3} }, { frame: ${Math.max(2, frames)}, x: ${width * 0.8}, y: ${height * 0.25} }]
    intensity: 13
    radius: 8
    colour: { kelvin: 5200 }
lens: { preset: double-gauss-50, f_number: 4 }
flare:
  glow: { fraction: 0.02, size: 8, falloff: 2.6 }
${shutter}output: { path: "${dir}/f.####.png" }
`;
  return resolveShot(text, path.join(dir, 'bench.yaml'), { readText: (p) => readFileSync(p, 'utf8'), presetNames, presetPath });
}

async function main(): Promise<void> {
  const [jobs, width, height, frames] = process.argv.slice(2, 6).map(Number);
  // a sixth argument, `blur`, opens the shutter (180 degrees, 8 samples, the default method)
  const shutter = process.argv[6] === 'blur' ? 'shutter: { angle: 180, samples: 8 }\n' : '';
  const dir = mkdtempSync(path.join(tmpdir(), 'straylight-bench-'));
  try {
    const shot = flareShot(width, height, frames, dir, shutter);
    const stamps: number[] = [];
    const steal0 = stealNow();
    const cpu0 = process.cpuUsage();
    const t = performance.now();
    const r = await renderSequence(shot, { jobs, force: true, onFrame: () => stamps.push(performance.now()) });
    const wall = performance.now() - t;
    const cpu = process.cpuUsage(cpu0);
    const steal1 = stealNow();
    const half = Math.floor(stamps.length / 2);
    const out: SequenceRun = {
      jobs,
      fps: frames / (wall / 1000),
      steadyFps: (stamps.length - 1 - half) / ((stamps[stamps.length - 1] - stamps[half]) / 1000),
      startupMs: r.startupMs,
      maxRssMiB: process.resourceUsage().maxRSS / 1024,
      cpuMs: (cpu.user + cpu.system) / 1000,
      stealMs: steal0 === null || steal1 === null ? null : steal1 - steal0,
    };
    console.log(JSON.stringify(out));
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (process.argv[1] && fileURLToPath(import.meta.url) === path.resolve(process.argv[1])) await main();
