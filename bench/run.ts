// `npm run bench`: stage costs at production sizes, as ratios measured in one run.
// Each figure is the median of several runs after a warm-up. Later stages add their rows here.

import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { flareShot, type SequenceRun } from './sequence-child.js';
import type { ShutterRow } from './shutter.js';
import { addGhosts } from '../src/elements/ghosts/index.js';
import { encodePng } from '../src/io/png.js';
import { presetPath } from '../src/io/presets.js';
import { prepareLens, type GhostQuality } from '../src/optics/ghost-system.js';
import { FloatImage } from '../src/raster/image.js';
import { renderFrame } from '../src/render/render-frame.js';
import { parseLensText } from '../src/shot/lens-file.js';
import { resolveShot } from '../src/shot/resolve.js';
import { planWorkers } from '../src/render/memory.js';
import type { ResolvedShot } from '../src/shot/types.js';

const RUNS = Number(process.env.BENCH_RUNS ?? 5);

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

function time(fn: () => void, runs = RUNS): number {
  fn(); // warm-up
  const t: number[] = [];
  for (let i = 0; i < runs; i++) {
    const start = performance.now();
    fn();
    t.push(performance.now() - start);
  }
  return median(t);
}

/** A shot like the demo's: two lights with glow, one near the frame edge; no lens. */
function glowShot(width: number, height: number): ResolvedShot {
  const text = `version: 1
frame: { width: ${width}, height: ${height}, rate: 24, first: 1, last: 1 }
lights:
  - { name: beacon, position: [${width * 0.4}, ${height * 0.25}], intensity: 13, radius: 10, colour: { kelvin: 2800 } }
  - { name: lamp, position: [${width * 0.98}, ${height * 0.76}], intensity: 6, radius: 5, colour: { kelvin: 4500 } }
flare:
  glow: { fraction: 0.02, size: 8, falloff: 2.6 }
output: { path: "bench.####.png" }
`;
  return resolveShot(text, 'bench.yaml', { readText: () => '' });
}

const rows: [string, string][] = [];
const ms = (v: number) => `${v.toFixed(1)} ms`;

// --- foundation: frame synthesis vs PNG encoding at 1920x1080
const shot = glowShot(1920, 1080);
let img = renderFrame(shot, 1);
const synth = time(() => {
  img = renderFrame(shot, 1);
});
const encode16 = time(() => encodePng(img, { bitDepth: 16, transfer: 'srgb', alpha: 'none' }));
const encode8 = time(() => encodePng(img, { bitDepth: 8, transfer: 'srgb', alpha: 'none' }));
rows.push(['disk + glow, 2 lights, 1920x1080', ms(synth)]);
rows.push(['PNG encode 1920x1080, 16-bit sRGB', ms(encode16)]);
rows.push(['PNG encode 1920x1080, 8-bit sRGB', ms(encode8)]);
rows.push(['ratio disk + glow / 16-bit encode', (synth / encode16).toFixed(2)]);

// --- ghosts: the many-element preset at each quality, one bright light at 1920x1080
const { model: zoom } = parseLensText(readFileSync(presetPath('zoom-like-35'), 'utf8'), 'zoom-like-35.yaml', 'zoom-like-35');
const view = { widthPx: 1920, heightPx: 1080, pixelAspect: 1, opticalCentre: [960, 540] as const };
for (const quality of ['draft', 'low', 'medium', 'high'] as GhostQuality[]) {
  let prep = 0;
  const system = (() => {
    const t = performance.now();
    const s = prepareLens(zoom!, quality, 1e-6);
    prep = performance.now() - t;
    return s;
  })();
  const stats = { drawn: 0, skipped: 0 };
  const flux = 2 ** 14 * Math.PI * 100;
  // the frame buffer is reused, as renderFrame reuses its target; clearing it is counted
  const g = new FloatImage(1920, 1080);
  const ghostMs = time(() => {
    g.data.fill(0);
    stats.drawn = 0;
    stats.skipped = 0;
    addGhosts(g, system, view, { xPx: 1400, yPx: 300, flux: [flux, flux, flux] }, { fNumber: 4, gain: 1, quality }, stats);
  }, quality === 'high' ? 3 : RUNS);
  // the yardstick is timed again beside each row: the machine's speed drifts between minutes
  const encodeNow = time(() => encodePng(img, { bitDepth: 16, transfer: 'srgb', alpha: 'none' }));
  rows.push([`ghosts zoom-like-35 (${system.kept} kept, ${stats.drawn} drawn), ${quality}`, `${ms(ghostMs)}  (x${(ghostMs / encodeNow).toFixed(2)} of encode timed beside it; lens prep ${prep.toFixed(0)} ms)`]);
}

// --- the sequence renderer: frames per second with 1 and 2 workers, full flare at 1920x1080.
// Each render runs in a fresh process, as `straylight render` does: run here, the 1-worker render
// (which renders in the main thread) would start with the JIT already warmed by the rows above,
// which no user's render has. Each round runs 1, 2, 2, 1 so a drift in the machine's speed over the
// round weighs on both counts alike; BENCH_ROUNDS rounds (default 2), each count's figure the mean
// of its runs. 48 frames, the demo's length: start-up (lens preparation, worker spawn, each
// worker's JIT warm-up on its first frames) is part of the figure; the second half of the frames
// gives the steady rate. Beside each run: its CPU time (all threads) and the machine's steal time
// (what the hypervisor took from our virtual CPUs), which separates a slow program from a busy host.
const seqFrames = Number(process.env.BENCH_FRAMES ?? 48);
const rounds = Math.max(1, Number(process.env.BENCH_ROUNDS ?? 2));
const child = path.join(path.dirname(fileURLToPath(import.meta.url)), 'sequence-child.js');
function sequenceRun(jobs: number, width: number, height: number, frames: number): SequenceRun {
  const out = execFileSync(process.execPath, [child, String(jobs), String(width), String(height), String(frames)], { encoding: 'utf8' });
  return JSON.parse(out.trim().split('\n').pop()!) as SequenceRun;
}
const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
const roundRuns: SequenceRun[][] = [];
for (let r = 0; r < rounds; r++) roundRuns.push([1, 2, 2, 1].map((jobs) => sequenceRun(jobs, 1920, 1080, seqFrames)));
const seqRuns = roundRuns.flat();
// the same 48 frames at 1080p with motion blur (8 samples, the smear method), 2 workers
const blurRun = JSON.parse(execFileSync(process.execPath, [child, '2', '1920', '1080', String(seqFrames), 'blur'], { encoding: 'utf8' }).trim().split('\n').pop()!) as SequenceRun;
const of = (runs: SequenceRun[], jobs: number) => runs.filter((r) => r.jobs === jobs);
const fpsOf = (runs: SequenceRun[], jobs: number) => mean(of(runs, jobs).map((r) => r.fps));
const fps = { 1: fpsOf(seqRuns, 1), 2: fpsOf(seqRuns, 2) };
const steady = { 1: mean(of(seqRuns, 1).map((r) => r.steadyFps)), 2: mean(of(seqRuns, 2).map((r) => r.steadyFps)) };
const startup = of(seqRuns, 2).flatMap((r) => r.startupMs);
const runsOf = (jobs: number) => of(seqRuns, jobs).map((r) => r.fps.toFixed(2)).join(', ');
const secs = (v: number) => `${(v / 1000).toFixed(1)} s`;
const stealOf = (jobs: number) => of(seqRuns, jobs).map((r) => (r.stealMs === null ? '-' : secs(r.stealMs))).join(', ');
rows.push([`sequence 1920x1080, double-gauss-50 + glow, ${seqFrames} frames, --jobs 1`, `${fps[1].toFixed(2)} fps (runs ${runsOf(1)}; second half ${steady[1].toFixed(2)} fps)`]);
rows.push([`sequence 1920x1080, same, --jobs 2`, `${fps[2].toFixed(2)} fps (runs ${runsOf(2)}; second half ${steady[2].toFixed(2)} fps)`]);
rows.push([`sequence 1920x1080, same with motion blur (180 degrees, 8 samples), --jobs 2`, `${blurRun.fps.toFixed(2)} fps (second half ${blurRun.steadyFps.toFixed(2)} fps; x${(fps[2] / blurRun.fps).toFixed(2)} the time without)`]);
rows.push([
  'ratio jobs 2 / jobs 1 (target >= 1.85 on 2 cores)',
  `${(fps[2] / fps[1]).toFixed(2)} (rounds ${roundRuns.map((rr) => (fpsOf(rr, 2) / fpsOf(rr, 1)).toFixed(2)).join(', ')}; second half ${(steady[2] / steady[1]).toFixed(2)})`,
]);
rows.push(['CPU time per render, jobs 1 vs jobs 2 (all threads)', `${secs(mean(of(seqRuns, 1).map((r) => r.cpuMs)))} vs ${secs(mean(of(seqRuns, 2).map((r) => r.cpuMs)))}`]);
rows.push(['steal time during each render (jobs 1; jobs 2)', `${stealOf(1)}; ${stealOf(2)}`]);
// what the machine allows: one full-frame pass (read-modify-write of a 1920x1080 RGBA float frame,
// 33 MB, like the glow or the veil) timed on 1 thread and on 2 threads at once. A rendered frame
// makes several such passes, so their slowdown bounds the ratio above from below the core count.
{
  const code = `const { parentPort } = require('node:worker_threads');
    const a = new Float32Array(1920 * 1080 * 4);
    for (let i = 0; i < a.length; i++) a[i] += 1; // fault the pages in
    const t = performance.now();
    for (let r = 0; r < 16; r++) for (let i = 0; i < a.length; i++) a[i] += 0.5;
    parentPort.postMessage(performance.now() - t);`;
  const pass = async (n: number) => {
    const { Worker } = await import('node:worker_threads');
    const ms = await Promise.all(
      Array.from({ length: n }, () => new Promise<number>((resolve) => {
        const w = new Worker(code, { eval: true });
        w.once('message', (v: number) => {
          resolve(v);
          void w.terminate();
        });
      })),
    );
    return ms.reduce((a, b) => a + b, 0) / n / 16;
  };
  const one = await pass(1);
  const two = await pass(2);
  rows.push(['one full-frame pass (33 MB read-modify-write), 1 thread vs 2 at once', `${ms(one)} vs ${ms(two)} (x${(two / one).toFixed(2)} with two at once)`]);
}
rows.push(['worker start-up (spawn, receive the prepared lens, ready)', startup.map((v) => `${v.toFixed(0)} ms`).join(', ')]);

// --- peak memory at 3840x2160 with 2 workers, in a fresh process: the whole process with its
// worker threads, as getrusage's maximum RSS
{
  const r = sequenceRun(2, 3840, 2160, 6);
  rows.push(['peak RSS, 3840x2160 sequence, 2 workers (target < 1 GiB)', `${r.maxRssMiB.toFixed(0)} MiB`]);
  // 8K, against the memory planner's estimate (an upper bound: render lowers --jobs by it)
  const dir = mkdtempSync(path.join(tmpdir(), 'straylight-bench-'));
  try {
    const plan = planWorkers(flareShot(7680, 4320, 2, dir), 2, Infinity);
    const r8 = sequenceRun(2, 7680, 4320, 2);
    const est = (plan.main + 2 * plan.perWorker) / 2 ** 20;
    rows.push(['peak RSS, 7680x4320 sequence, 2 workers, vs the planner\'s estimate', `${r8.maxRssMiB.toFixed(0)} MiB (estimate ${est.toFixed(0)} MiB, x${(est / r8.maxRssMiB).toFixed(2)})`]);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

// --- starburst kernel and the light-centred elements at 1920x1080 and 3840x2160
{
  const { starburstKernel } = await import('../src/optics/diffraction.js');
  const { addStarburst } = await import('../src/elements/starburst.js');
  const { addStreak, addVeil } = await import('../src/elements/streak.js');
  const { addGlow } = await import('../src/elements/glow.js');
  let kernel = starburstKernel({ blades: 6, rotationDeg: 0, roundness: 0.15 });
  const pre = time(() => {
    kernel = starburstKernel({ blades: 6, rotationDeg: 0, roundness: 0.15 });
  }, 3);
  rows.push(['starburst kernel precompute (512x512 FFT, 9 wavelengths)', ms(pre)]);
  for (const [w, h] of [[1920, 1080], [3840, 2160]]) {
    const img = new FloatImage(w, h);
    const e: [number, number, number] = [100, 100, 100];
    const sb = time(() => addStarburst(img, kernel, { xPx: w / 2, yPx: h / 2, energy: e, binPx: 0.8 * (w / 1920) }, 1));
    const sbBig = time(() => addStarburst(img, kernel, { xPx: w / 2, yPx: h / 2, energy: e, binPx: 2 * (w / 1920) }, 1));
    const gl = time(() => addGlow(img, { xPx: w / 2, yPx: h / 2, energy: e, sizePx: 8, falloff: 2.6 }, 1));
    const ve = time(() => addVeil(img, e, 1));
    const st = time(() => addStreak(img, { xPx: w / 2, yPx: h / 2, energy: e, lengthPx: 200, thicknessPx: 1 }, 1));
    rows.push([`${w}x${h}: starburst (small / large bins), glow, veil, streak`, `${ms(sb)} / ${ms(sbBig)}, ${ms(gl)}, ${ms(ve)}, ${ms(st)}`]);
  }
}

// --- occlusion: visibility per light per frame (128 points, one alpha matte), and the shutter
{
  const { diskVisibility, alphaCoverage } = await import('../src/occlusion/visibility.js');
  const matte = { width: 1920, height: 1080, values: new Float32Array(1920 * 1080) };
  for (let i = 0; i < matte.values.length; i++) matte.values[i] = (i % 1920) > 960 ? 1 : 0;
  const lookups = [alphaCoverage(matte, false, 'clear')];
  const per = time(() => {
    for (let k = 0; k < 1000; k++) diskVisibility(950 + (k % 20), 540, 12, lookups);
  });
  rows.push(['visibility, one light, 128 points, one matte (per frame)', `${((per / 1000) * 1000).toFixed(1)} us`]);
  // the shutter rows in a process of their own (bench/shutter.ts): run here, after the rows above,
  // the 1080p smear row read x2.79 against x1.69-2.14 in a fresh process
  const shutterRows = JSON.parse(execFileSync(process.execPath, [path.join(path.dirname(fileURLToPath(import.meta.url)), 'shutter.js')], { encoding: 'utf8' }).trim().split('\n').pop()!) as ShutterRow[];
  for (const r of shutterRows) {
    rows.push([`frame ${r.width}x${r.height} with the lens, 8 shutter samples (smear; exact) vs 1`, `${ms(r.smearMs)}; ${ms(r.exactMs)} vs ${ms(r.oneMs)} (x${(r.smearMs / r.oneMs).toFixed(2)}; x${(r.exactMs / r.oneMs).toFixed(2)})`]);
  }
}

// --- OpenEXR: half ZIP writing next to 16-bit PNG, and reading mattes back (PIZ and ZIP)
{
  const { encodeExr } = await import('../src/io/exr.js');
  const { decodeExr } = await import('../src/format/exr-read.js');
  for (const [w, h] of [[1920, 1080], [3840, 2160]]) {
    const frame = renderFrame(glowShot(w, h), 1);
    const runs = w > 2000 ? 3 : RUNS;
    const exr = time(() => encodeExr(frame, { type: 'half', compression: 'zip', alpha: 'none', pixelAspect: 1 }), runs);
    const png = time(() => encodePng(frame, { bitDepth: 16, transfer: 'srgb', alpha: 'none' }), runs);
    const zipBytes = encodeExr(frame, { type: 'half', compression: 'zip', alpha: 'none', pixelAspect: 1 });
    const read = time(() => decodeExr(zipBytes), runs);
    rows.push([`${w}x${h}: EXR half ZIP write vs 16-bit PNG; EXR read`, `${ms(exr)} vs ${ms(png)} (x${(exr / png).toFixed(2)}); read ${ms(read)}`]);
  }
}

// --- layered OpenEXR: a 1920x1080 half ZIP frame of a shot with all seven elements, written
// with its element layers and as the combined image alone (target: at most 3x)
{
  const { encodeExr } = await import('../src/io/exr.js');
  const { renderLayers } = await import('../src/render/passes.js');
  const dir = mkdtempSync(path.join(tmpdir(), 'straylight-bench-'));
  const base = flareShot(1920, 1080, 1, dir);
  const shot = { ...base, streak: { ...base.streak, fraction: 0.02 }, veil: { fraction: 0.01 }, dust: { ...base.dust, fraction: 0.02 }, starburst: { ...base.starburst, size: 20 }, output: { ...base.output, format: 'exr' as const, passes: 'layers' as const } };
  const { combined, layers } = renderLayers(shot, 1);
  const opts = { type: 'half' as const, compression: 'zip' as const, alpha: 'none' as const, pixelAspect: 1 };
  const one = time(() => encodeExr(combined, opts), 3);
  const all = time(() => encodeExr(combined, { ...opts, layers }), 3);
  rows.push([`1920x1080 EXR half ZIP: combined + ${layers.length} element layers vs combined alone (target < 3x)`, `${ms(all)} vs ${ms(one)} (x${(all / one).toFixed(2)})`]);
  rmSync(dir, { recursive: true, force: true });
}

// --- validation: resolving a shot of 100 and of 1,000 lights (the cap), YAML parse included;
// linear validation keeps the ratio near 10
{
  const lightsShot = (n: number) =>
    `version: 1\nframe: { width: 1920, height: 1080, rate: 24, first: 1, last: 48 }\nlights:\n${Array.from({ length: n }, (_, i) => `  - { name: l${i}, position: [${i % 1920}, ${i % 1080}], intensity: 3 }`).join('\n')}\noutput: { path: "f.####.png" }\n`;
  const t100 = lightsShot(100);
  const t1000 = lightsShot(1000);
  const a = time(() => resolveShot(t100, 'bench.yaml', { readText: () => '' }));
  const b = time(() => resolveShot(t1000, 'bench.yaml', { readText: () => '' }));
  rows.push(['check: resolve a shot of 100 vs 1,000 lights (the cap)', `${ms(a)} vs ${ms(b)} (x${(b / a).toFixed(1)})`]);
}

// --- pictures: a chart as SVG and as PNG, the lens drawing, and the batch report's page for 100 shots
{
  const { visibilitySvg } = await import('../src/plot/visibility.js');
  const { lensSvg } = await import('../src/plot/lens.js');
  const { svgToPng } = await import('../src/io/svg-png.js');
  const { batchHtml } = await import('../src/render/batch-report.js');
  const chart = {
    title: 'bench',
    first: 1001,
    last: 1240,
    timecode: (n: number) => String(n),
    curves: [0, 1, 2].map((k) => ({ name: `light ${k}`, values: Array.from({ length: 240 }, (_, i) => 0.5 + 0.5 * Math.sin(i / 9 + k)), offFrame: Array.from({ length: 240 }, (_, i) => i < 20) })),
  };
  const svgMs = time(() => visibilitySvg(chart));
  const svg = visibilitySvg(chart);
  const pngMs = time(() => svgToPng(svg));
  const zoomFile = presetPath('zoom-like-35');
  const zoom = parseLensText(readFileSync(zoomFile, 'utf8'), zoomFile, 'zoom-like-35').model!;
  const zoomSystem = prepareLens(zoom, 'medium', 0);
  const lensMs = time(() => svgToPng(lensSvg(zoom, zoomSystem)));
  const shotEntry = { shot: 'shots/x.yaml', status: 'ok' as const, frames: 240, written: 240, skipped: 0, failed: [], seconds: 60, flashes: [], warnings: [], range: { first: 1001, last: 1240, timecode: '01:00:00:00 - 01:00:09:23' }, lens: 'preset zoom-like-35, f/4', visibility: svg };
  const report = { tool: 'bench', started: new Date(0).toISOString(), finished: new Date(3600e3).toISOString(), shots: Array.from({ length: 100 }, () => shotEntry) };
  const pageMs = time(() => batchHtml(report));
  rows.push(['pictures: visibility chart SVG; as PNG; lens drawing as PNG (target < 200 ms)', `${ms(svgMs)}; ${ms(pngMs)}; ${ms(lensMs)}`]);
  rows.push(['batch report page for 100 shots, charts inlined (target < 2 s)', ms(pageMs)]);
}

// --- scenes: loading a camera animation of 1,000 keys (glTF binary, read and resolved), and
// sampling the scene (camera pose, lights projected) per frame against rendering that frame
{
  const { Document, NodeIO } = await import('@gltf-transform/core');
  const { loadShot } = await import('../src/io/load-shot.js');
  const { frameState } = await import('../src/render/frame-state.js');
  const dir = mkdtempSync(path.join(tmpdir(), 'straylight-bench-'));
  const doc = new Document();
  const buffer = doc.createBuffer();
  const cam = doc.createNode('Cam').setCamera(doc.createCamera('c').setType('perspective').setYFov(0.6).setAspectRatio(16 / 9).setZNear(0.1));
  doc.createScene('S').addChild(cam);
  const n = 1000;
  const times = Float32Array.from({ length: n }, (_, i) => i / 24);
  const moves = Float32Array.from({ length: 3 * n }, (_, i) => Math.sin(i / 30) * 5);
  const turns = new Float32Array(4 * n);
  for (let i = 0; i < n; i++) turns.set([0, Math.sin(i / 400), 0, Math.cos(i / 400)], 4 * i);
  const input = doc.createAccessor().setType('SCALAR').setArray(times).setBuffer(buffer);
  const anim = doc.createAnimation('a');
  for (const [pathName, arr, type] of [['translation', moves, 'VEC3'], ['rotation', turns, 'VEC4']] as const) {
    const smp = doc.createAnimationSampler().setInput(input).setOutput(doc.createAccessor().setType(type).setArray(arr).setBuffer(buffer)).setInterpolation('LINEAR');
    anim.addSampler(smp).addChannel(doc.createAnimationChannel().setTargetNode(cam).setTargetPath(pathName).setSampler(smp));
  }
  await new NodeIO().write(path.join(dir, 'long.glb'), doc);
  const shotFile = path.join(dir, 'long.yaml');
  writeFileSync(shotFile, `version: 1\nframe: { width: 1920, height: 1080, rate: 24, first: 1, last: 1000 }\ncamera: { scene: long.glb }\nlights:\n  - { name: s, position_3d: [0, 0, -50], intensity: 8 }\noutput: { path: "f.####.png" }\n`);
  const loads: number[] = [];
  for (let r = 0; r < RUNS + 1; r++) {
    const start = performance.now();
    await loadShot(shotFile);
    loads.push(performance.now() - start);
  }
  rows.push(['scene: load a shot whose camera has 1,000 keys (.glb; target < 50 ms)', ms(median(loads.slice(1)))]);
  const demo = await loadShot(path.join(path.dirname(fileURLToPath(import.meta.url)), '..', '..', 'shots', 'rooftop-crane.yaml'));
  const sample = time(() => {
    for (let f = 1; f <= 48; f++) frameState(demo, f);
  }) / 48;
  const frameMs = time(() => renderFrame(demo, 28), 3);
  rows.push(['scene: sampling per frame vs rendering it (rooftop-crane; target < 1%)', `${(sample * 1000).toFixed(1)} us vs ${ms(frameMs)} (${((100 * sample) / frameMs).toFixed(3)}%)`]);
  rmSync(dir, { recursive: true, force: true });
}

// --- plates: finding and tracking lights in a 1920x1080 OpenEXR plate frame against reading it
// (target: detection and tracking add at most 20% to the read)
{
  const { encodeExr } = await import('../src/io/exr.js');
  const { readFrameLinear } = await import('../src/io/read-frame.js');
  const { detectBlobs, luminance } = await import('../src/plate/detect.js');
  const { linkTracks } = await import('../src/plate/track.js');
  const dir = mkdtempSync(path.join(tmpdir(), 'straylight-bench-'));
  const plateFrame = renderFrame(glowShot(1920, 1080), 1);
  for (let i = 0; i < plateFrame.data.length; i += 4) for (let c = 0; c < 3; c++) plateFrame.data[i + c] += 0.05 + 0.02 * Math.sin(i / 7919);
  const file = path.join(dir, 'plate.exr');
  writeFileSync(file, encodeExr(plateFrame, { type: 'half', compression: 'zip', alpha: 'none', pixelAspect: 1 }));
  const frame = readFrameLinear(file);
  const readMs = time(() => readFrameLinear(file));
  const opts = { threshold: { absolute: 0.95 }, minArea: 4, maxCount: 8, clip: Infinity };
  const findMs = time(() => detectBlobs(frame, opts, luminance(frame)));
  const blobs = detectBlobs(frame, opts);
  const seq = Array.from({ length: 48 }, (_, f) => ({ frame: f, blobs: blobs.map((b) => ({ ...b, x: b.x + f, y: b.y + 0.5 * f })) }));
  const linkMs = time(() => linkTracks(seq, { gate: 48, maxGap: 12, minFrames: 3 })) / 48;
  rows.push(['plate 1920x1080 EXR: find lights + track, vs reading the frame (target < 20%)', `${ms(findMs + linkMs)} vs ${ms(readMs)} (+${((100 * (findMs + linkMs)) / readMs).toFixed(0)}%; ${blobs.length} lights)`]);
  rmSync(dir, { recursive: true, force: true });
}

// --- lens preparation per preset (bench/lenses.ts)
{
  const { lensRows } = await import('./lenses.js');
  rows.push(...lensRows(RUNS));
}

// --- the look-dev preview (bench/preview.ts)
{
  const { previewRows } = await import('./preview.js');
  rows.push(...(await previewRows()));
}

console.log(`straylight bench (median of ${RUNS} runs, Node ${process.version})`);
for (const [name, v] of rows) console.log(`  ${name.padEnd(58)} ${v}`);
