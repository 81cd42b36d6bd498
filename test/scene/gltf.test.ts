// Scene import against the glTF 2.0 specification and the KHR_lights_punctual extension, with
// small scenes written by glTF-Transform's Document API: interpolation (Appendix C), the camera
// conventions (3.10), light units and the spot cone, lights behind the camera, and every kind
// of bad scene input as one located line with the bad-input exit code.

import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { Document, NodeIO } from '@gltf-transform/core';
import { KHRLightsPunctual } from '@gltf-transform/extensions';
import { describe, expect, it } from 'vitest';
import { loadShot } from '../../src/io/load-shot.js';
import { readScene } from '../../src/io/scene-read.js';
import { renderFrame } from '../../src/render/render-frame.js';
import { lightState } from '../../src/render/frame-state.js';
import { sampleAt, slerp } from '../../src/scene/sample.js';
import { cli, tempDir } from '../helpers.js';

type Interp = 'LINEAR' | 'STEP' | 'CUBICSPLINE';

/** A scene: a camera node (optionally animated) and lights, written as .glb. */
async function writeScene(file: string, opts: { cameraT?: number[][]; times?: number[]; rotations?: number[][]; interp?: Interp; ortho?: boolean; noCamera?: boolean; lights?: { name: string; type: 'point' | 'spot' | 'directional'; at: number[]; intensity: number; rotation?: number[]; inner?: number; outer?: number }[] } = {}) {
  const doc = new Document();
  const buffer = doc.createBuffer();
  const scene = doc.createScene('S');
  const cam = doc.createNode('Cam');
  if (!opts.noCamera) {
    const c = doc.createCamera('lens').setType(opts.ortho ? 'orthographic' : 'perspective');
    if (!opts.ortho) c.setYFov(2 * Math.atan(18 / 50 / (16 / 9))).setAspectRatio(16 / 9).setZNear(0.1);
    else c.setXMag(1).setYMag(1).setZNear(0.1).setZFar(100);
    cam.setCamera(c);
  }
  scene.addChild(cam);
  if (opts.times) {
    const anim = doc.createAnimation('move');
    const input = doc.createAccessor().setType('SCALAR').setArray(new Float32Array(opts.times)).setBuffer(buffer);
    if (opts.cameraT) {
      const out = doc.createAccessor().setType('VEC3').setArray(new Float32Array(opts.cameraT.flat())).setBuffer(buffer);
      const s = doc.createAnimationSampler().setInput(input).setOutput(out).setInterpolation(opts.interp ?? 'LINEAR');
      anim.addSampler(s).addChannel(doc.createAnimationChannel().setTargetNode(cam).setTargetPath('translation').setSampler(s));
    }
    if (opts.rotations) {
      const out = doc.createAccessor().setType('VEC4').setArray(new Float32Array(opts.rotations.flat())).setBuffer(buffer);
      const s = doc.createAnimationSampler().setInput(input).setOutput(out).setInterpolation(opts.interp ?? 'LINEAR');
      anim.addSampler(s).addChannel(doc.createAnimationChannel().setTargetNode(cam).setTargetPath('rotation').setSampler(s));
    }
  }
  const ext = doc.createExtension(KHRLightsPunctual);
  for (const l of opts.lights ?? []) {
    const light = ext.createLight(l.name).setType(l.type).setIntensity(l.intensity).setColor([1, 1, 1]);
    if (l.type === 'spot') light.setInnerConeAngle(l.inner ?? 0).setOuterConeAngle(l.outer ?? Math.PI / 4);
    const n = doc.createNode(l.name).setTranslation(l.at as [number, number, number]).setExtension('KHR_lights_punctual', light);
    if (l.rotation) n.setRotation(l.rotation as [number, number, number, number]);
    scene.addChild(n);
  }
  await new NodeIO().registerExtensions([KHRLightsPunctual]).write(file, doc);
}

function shotFile(dir: string, camera: string, lights: string, extra = ''): string {
  const f = path.join(dir, 'shot.yaml');
  writeFileSync(f, `version: 1\nframe: { width: 320, height: 180, rate: 24, first: 1, last: 24 }\ncamera: ${camera}\nlights:\n${lights}\n${extra}output: { path: "out/f.####.png" }\n`);
  return f;
}

describe('glTF animation sampling (glTF 2.0 specification, Appendix C)', () => {
  it('LINEAR rotations slerp: halfway from identity to 90 degrees about +Y is 45 degrees about +Y', () => {
    const h = Math.SQRT1_2;
    const q = sampleAt({ interpolation: 'LINEAR', times: [0, 1], values: [0, 0, 0, 1, 0, h, 0, h], size: 4 }, 0.5);
    expect(q[1]).toBeCloseTo(Math.sin(Math.PI / 8), 12);
    expect(q[3]).toBeCloseTo(Math.cos(Math.PI / 8), 12);
    // a quarter of the way: 22.5 degrees (slerp moves at constant angular speed; a normalised lerp would not)
    const r = sampleAt({ interpolation: 'LINEAR', times: [0, 1], values: [0, 0, 0, 1, 0, h, 0, h], size: 4 }, 0.25);
    expect(2 * Math.atan2(r[1], r[3])).toBeCloseTo(Math.PI / 8, 12);
    // the shorter arc: q and -q are one rotation
    const s = slerp([0, 0, 0, 1], [0, -h, 0, -h], 0.5);
    expect(Math.abs(s[1])).toBeCloseTo(Math.sin(Math.PI / 8), 12);
  });

  it('CUBICSPLINE: the Hermite spline with tangents scaled by the key interval, worked by hand', () => {
    // keys at t = 0 and 2: v0 = 0 with out-tangent b0 = 1, v1 = 1 with in-tangent a1 = 0.
    // At u = 1/2: (2u^3-3u^2+1) v0 + td (u^3-2u^2+u) b0 + (-2u^3+3u^2) v1 + td (u^3-u^2) a1
    //           = 0 + 2 (1/8) 1 + (1/2) 1 + 0 = 0.75
    const values = [/* key 0: a, v, b */ 0, 0, 0, 0, 0, 0, 1, 0, 0, /* key 1 */ 0, 0, 0, 1, 0, 0, 0, 0, 0];
    expect(sampleAt({ interpolation: 'CUBICSPLINE', times: [0, 2], values, size: 3 }, 1)[0]).toBeCloseTo(0.75, 12);
    expect(sampleAt({ interpolation: 'CUBICSPLINE', times: [0, 2], values, size: 3 }, 2)[0]).toBe(1);
  });

  it('STEP holds each key until the next; before the first and after the last the ends hold', () => {
    const smp = { interpolation: 'STEP' as const, times: [1, 2], values: [5, 0, 0, 7, 0, 0], size: 3 as const };
    expect(sampleAt(smp, 1.99)[0]).toBe(5);
    expect(sampleAt(smp, 2)[0]).toBe(7);
    expect(sampleAt(smp, -3)[0]).toBe(5);
    expect(sampleAt(smp, 9)[0]).toBe(7);
  });

  it('reads an animated camera from a .glb and samples it at each frame time (frame n at n/24 s)', async () => {
    const dir = tempDir();
    // the camera slides from x = 0 at t = 0 to x = 2 at t = 1 s; a point light 10 m ahead at x = 1
    await writeScene(path.join(dir, 's.glb'), { times: [0, 1], cameraT: [[0, 0, 0], [2, 0, 0]], lights: [{ name: 'L', type: 'point', at: [1, 0, -10], intensity: 100 }] });
    const shot = await loadShot(shotFile(dir, '{ scene: s.glb, node: Cam }', '  - { name: l, from_scene: L }'));
    // at frame 12 (0.5 s) the camera is at x = 1: the light is dead centre
    const s = lightState(shot, shot.lights[0], 12);
    expect(s.xPx).toBeCloseTo(160, 6);
    expect(s.yPx).toBeCloseTo(90, 6);
    // at frame 0 it is 1 m right of the axis at 10 m: 0.1 x 50/36 x 320 px right of the centre
    expect(lightState(shot, shot.lights[0], 0).xPx).toBeCloseTo(160 + 0.1 * (50 / 36) * 320, 4);
    // 100 cd at 10 m is 1 lux (KHR_lights_punctual: candela / d^2), white_lux 1: gain 1
    expect(lightState(shot, shot.lights[0], 12).gain).toBeCloseTo(1, 5);
    // shutter samples fall between frames: at frame 6.5 (0.2708 s) the camera is at x = 0.5417
    expect(lightState(shot, shot.lights[0], 6.5).xPx).toBeCloseTo(160 + ((1 - 6.5 / 12) / 10) * (50 / 36) * 320, 3);
    // scene_frame_offset 12 moves scene time 0 to frame 12
    const later = await loadShot(shotFile(dir, '{ scene: s.glb, node: Cam, scene_frame_offset: 12 }', '  - { name: l, from_scene: L }'));
    expect(lightState(later, later.lights[0], 24).xPx).toBeCloseTo(160, 6);
  });
});

describe('lights of the KHR_lights_punctual extension', () => {
  it('a spot or a sun shining away from the camera gives it no light', async () => {
    const dir = tempDir();
    // both unturned: a spot shines along its -Z, away from a camera at the origin looking down -Z;
    // a directional light shines down -Z too, so it stands behind the camera
    await writeScene(path.join(dir, 's.glb'), {
      lights: [
        { name: 'Spot', type: 'spot', at: [0, 0, -10], intensity: 400 },
        { name: 'Sun', type: 'directional', at: [0, 0, 0], intensity: 8 },
      ],
    });
    const shot = await loadShot(shotFile(dir, '{ scene: s.glb }', '  - { name: spot, from_scene: Spot }\n  - { name: sun, from_scene: Sun }'));
    const spot = lightState(shot, shot.lights[0], 1);
    expect([spot.xPx, spot.yPx, spot.gain]).toEqual([160, 90, 0]);
    expect(lightState(shot, shot.lights[1], 1)).toMatchObject({ placed: false, gain: 0 });
  });

  it('a spot facing the camera, turned 30 degrees: the extension\'s cone falloff', async () => {
    const dir = tempDir();
    // turned 180 degrees about Y it faces the camera; 150 degrees leaves it 30 degrees off
    const about = (deg: number) => [0, Math.sin((deg * Math.PI) / 360), 0, Math.cos((deg * Math.PI) / 360)];
    const inner = (20 * Math.PI) / 180;
    const outer = (40 * Math.PI) / 180;
    await writeScene(path.join(dir, 's.glb'), {
      lights: [
        { name: 'Full', type: 'spot', at: [0, 0, -10], intensity: 400, inner, outer, rotation: about(180) },
        { name: 'Part', type: 'spot', at: [0, 0, -10], intensity: 400, inner, outer, rotation: about(150) },
      ],
    });
    const shot = await loadShot(shotFile(dir, '{ scene: s.glb }', '  - { name: full, from_scene: Full }\n  - { name: part, from_scene: Part }'));
    expect(lightState(shot, shot.lights[0], 1).gain).toBeCloseTo(4, 5); // 400 cd at 10 m: 4 lux
    const sc = 1 / Math.max(0.001, Math.cos(inner) - Math.cos(outer));
    const att = Math.min(1, Math.max(0, Math.cos((30 * Math.PI) / 180) * sc - Math.cos(outer) * sc)) ** 2;
    expect(att).toBeGreaterThan(0.05);
    expect(att).toBeLessThan(0.95);
    expect(lightState(shot, shot.lights[1], 1).gain).toBeCloseTo(4 * att, 5);
  });
});

describe('a camera given by keys in the shot', () => {
  it('pan turns about +Y (90 degrees looks down -X), look_at centres its point, focal length scales the frame', async () => {
    const dir = tempDir();
    const lights = '  - { name: a, position_3d: [-10, 0, 0], intensity: 0 }\n  - { name: b, position_3d: [1, 0, -10], intensity: 0 }';
    const panned = await loadShot(shotFile(dir, '{ position: [0, 0, 0], rotation: [90, 0, 0], focal_length: 50 }', lights));
    expect(lightState(panned, panned.lights[0], 1).xPx).toBeCloseTo(160, 9);
    expect(lightState(panned, panned.lights[1], 1).placed).toBe(false); // now behind the camera
    const aimed = await loadShot(shotFile(dir, '{ position: [3, 2, 5], look_at: [1, 0, -10], focal_length: 50 }', lights));
    const b = lightState(aimed, aimed.lights[1], 1);
    expect([b.xPx, b.yPx].map((v) => Number(v.toFixed(9)))).toEqual([160, 90]);
    const straight = await loadShot(shotFile(dir, '{ position: [0, 0, 0], rotation: [0, 0, 0], focal_length: [{ frame: 1, value: 25 }, { frame: 24, value: 100 }] }', lights));
    expect(lightState(straight, straight.lights[1], 1).xPx).toBeCloseTo(160 + 0.1 * (25 / 36) * 320, 9);
    expect(lightState(straight, straight.lights[1], 24).xPx).toBeCloseTo(160 + 0.1 * (100 / 36) * 320, 9);
    // a pan keyed from 0 to 10 degrees over frames 1-2 is at 5 degrees halfway (a shutter sample):
    // panning left moves a point straight ahead to the right by tan(5) x f/sensor x width
    const panning = await loadShot(shotFile(dir, '{ position: [0, 0, 0], rotation: [{ frame: 1, pan: 0, tilt: 0, roll: 0 }, { frame: 2, pan: 10, tilt: 0, roll: 0 }], focal_length: 50 }', '  - { name: h, position_3d: [0, 0, -1000], intensity: 0 }'));
    expect(lightState(panning, panning.lights[0], 1.5).xPx).toBeCloseTo(160 + Math.tan((5 * Math.PI) / 180) * (50 / 36) * 320, 6);
    // tilt up 10 degrees: a point on the horizon drops below the centre by tan(10) x f/sensor x width
    const tilted = await loadShot(shotFile(dir, '{ position: [0, 0, 0], rotation: [0, 10, 0], focal_length: 50 }', '  - { name: h, position_3d: [0, 0, -1000], intensity: 0 }'));
    expect(lightState(tilted, tilted.lights[0], 1).yPx).toBeCloseTo(90 + Math.tan((10 * Math.PI) / 180) * (50 / 36) * 320, 6);
  });

  it('a sun by azimuth and elevation sits where the camera sees that direction', async () => {
    const dir = tempDir();
    const shot = await loadShot(shotFile(dir, '{ position: [5, 1, 3], rotation: [0, 0, 0], focal_length: 36 }', '  - { name: sun, direction: { azimuth: 10, elevation: 5 }, intensity: 4 }'));
    const s = lightState(shot, shot.lights[0], 1);
    // azimuth from -Z towards +X, elevation up: (cos5 sin10, sin5, -cos5 cos10), seen at infinity
    const x = Math.cos((5 * Math.PI) / 180) * Math.sin((10 * Math.PI) / 180);
    const z = Math.cos((5 * Math.PI) / 180) * Math.cos((10 * Math.PI) / 180);
    expect(s.xPx).toBeCloseTo(160 + (x / z) * (36 / 36) * 320, 9);
    expect(s.yPx).toBeCloseTo(90 - (Math.sin((5 * Math.PI) / 180) / z) * 320, 9);
  });
});

/** A small lens of our own for inline lens keys (as in test/cli/check.test.ts). */
const SURFACES = 'surfaces: [{ radius: 40, gap: 5, glass: N-BK7, semi_diameter: 12 }, { radius: -200, gap: 4, semi_diameter: 12 }, { stop: true, gap: 2 }, { radius: 100, gap: 3, glass: N-BK7, semi_diameter: 10 }, { radius: -100, gap: 40, semi_diameter: 10 }]';

describe('a light leaving the field', () => {
  it('fades smoothly to nothing as it swings out of the hood\'s field, and is dark and finite behind the camera', async () => {
    const dir = tempDir();
    const keys = Array.from({ length: 181 }, (_, i) => `{ frame: ${i}, azimuth: ${i}, elevation: 0 }`).join(', ');
    for (const lens of ['', 'lens: { preset: double-gauss-50, f_number: 4 }\n', `lens: { hood: none, f_number: 4, ${SURFACES} }\n`]) {
      const f = shotFile(dir, '{ position: [0, 0, 0], rotation: [0, 0, 0], focal_length: 50 }', `  - { name: s, direction: [${keys}], intensity: 0 }`, lens);
      const shot = await loadShot(f);
      const field = Array.from({ length: 181 }, (_, t) => lightState(shot, shot.lights[0], t).field);
      expect(field[0]).toBe(1);
      expect(field.every(Number.isFinite)).toBe(true);
      // never rising as the angle grows, no step bigger than a few percent, zero from 90 degrees on
      for (let i = 1; i < field.length; i++) {
        expect(field[i]).toBeLessThanOrEqual(field[i - 1] + 1e-12);
        expect(field[i - 1] - field[i]).toBeLessThan(0.2);
      }
      expect(field.slice(90).every((v) => v === 0)).toBe(true);
      expect(field.some((v) => v > 0 && v < 1)).toBe(true);
    }
  });

  it('a light at the camera itself or on its plane renders nothing, and no NaN', async () => {
    const dir = tempDir();
    const f = shotFile(dir, '{ position: [0, 0, 0], rotation: [0, 0, 0], focal_length: 50 }', '  - { name: here, position_3d: [0, 0, 0], intensity: 4 }\n  - { name: side, position_3d: [5, 0, 0], intensity: 4 }\n  - { name: near, position_3d: [5, 0, -1e-12], intensity: 4 }', 'lens: { preset: double-gauss-50, f_number: 4 }\n');
    const shot = await loadShot(f);
    for (const l of shot.lights) {
      const s = lightState(shot, l, 1);
      expect(Number.isFinite(s.xPx) && Number.isFinite(s.yPx) && Number.isFinite(s.gain)).toBe(true);
      expect(s.gain).toBe(0);
    }
    const img = renderFrame(shot, 1);
    expect(img.data.every((v) => v === 0)).toBe(true);
  });
});

describe('bad scene input: one located line, exit code 3', () => {
  const cases: [string, (dir: string) => Promise<string>, RegExp][] = [
    ['a node that is not there', async (dir) => {
      await writeScene(path.join(dir, 's.glb'));
      return shotFile(dir, '{ scene: s.glb, node: ShotCam }', '  - { name: a, position: [1, 1], intensity: 0 }');
    }, /shot\.yaml:3:31: camera\.node: no node named "ShotCam" in .*s\.glb \(cameras: Cam\)$/],
    ['a scene with no camera', async (dir) => {
      await writeScene(path.join(dir, 's.glb'), { noCamera: true });
      return shotFile(dir, '{ scene: s.glb }', '  - { name: a, position: [1, 1], intensity: 0 }');
    }, /shot\.yaml:3:18: camera\.scene: scene .*s\.glb holds no camera$/],
    ['a damaged .glb', async (dir) => {
      writeFileSync(path.join(dir, 's.glb'), Buffer.from('glTF\u0002\u0000\u0000\u0000this is not a scene'));
      return shotFile(dir, '{ scene: s.glb }', '  - { name: a, position: [1, 1], intensity: 0 }');
    }, /shot\.yaml:3:18: camera\.scene: cannot read scene .*s\.glb: not a glTF 2\.0 binary \(\.glb\) file, or a damaged one$/],
    ['a missing scene file', async (dir) => shotFile(dir, '{ scene: gone.glb }', '  - { name: a, position: [1, 1], intensity: 0 }'), /shot\.yaml:3:18: camera\.scene: cannot read scene .*gone\.glb: no such file$/],
    ['an orthographic camera', async (dir) => {
      await writeScene(path.join(dir, 's.glb'), { ortho: true });
      return shotFile(dir, '{ scene: s.glb, node: Cam }', '  - { name: a, position: [1, 1], intensity: 0 }');
    }, /shot\.yaml:3:31: camera\.node: the camera of node "Cam" is orthographic; straylight projects through perspective cameras only/],
    ['an animation that is not there', async (dir) => {
      await writeScene(path.join(dir, 's.glb'), { times: [0, 1], cameraT: [[0, 0, 0], [1, 0, 0]] });
      return shotFile(dir, '{ scene: s.glb, animation: Walk }', '  - { name: a, position: [1, 1], intensity: 0 }');
    }, /shot\.yaml:3:36: camera\.animation: no animation named "Walk" \(animations: move\) in .*s\.glb$/],
    ['a light node that is not there', async (dir) => {
      await writeScene(path.join(dir, 's.glb'), { lights: [{ name: 'Lamp', type: 'point', at: [0, 0, -5], intensity: 1 }] });
      return shotFile(dir, '{ scene: s.glb }', '  - { name: a, from_scene: Lmap }');
    }, /shot\.yaml:5:28: lights\[0\]\.from_scene: no node named "Lmap" in .*s\.glb \(lights: Lamp\)$/],
    ['a light in the world without a camera', async (dir) => {
      const f = path.join(dir, 'shot.yaml');
      writeFileSync(f, 'version: 1\nframe: { width: 32, height: 18, rate: 24, first: 1, last: 2 }\nlights:\n  - { name: a, position_3d: [0, 0, -5], intensity: 0 }\noutput: { path: "out/f.####.png" }\n');
      return f;
    }, /shot\.yaml:4:5: lights\[0\]: the light "a" is placed in the world; the shot needs a camera/],
  ];
  for (const [what, make, message] of cases) {
    it(what, async () => {
      const dir = tempDir();
      const r = await cli(['check', await make(dir)]);
      expect(r.code).toBe(3);
      const lines = r.stderr.trim().split('\n');
      expect(lines[0]).toMatch(message);
      expect(lines).toHaveLength(2); // the problem, and "nothing was rendered"
    });
  }

  it('a scene with no animation is a still camera, which is fine', async () => {
    const dir = tempDir();
    await writeScene(path.join(dir, 's.glb'), { lights: [{ name: 'Lamp', type: 'point', at: [0, 0, -5], intensity: 25 }] });
    const r = await cli(['check', shotFile(dir, '{ scene: s.glb }', '  - { name: a, from_scene: Lamp }')]);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/a: on the frame 24 of 24 frames \(first 1, last 24\); nearest the centre at frame 1 \(160\.0, 90\.0\), 0 px off; depth 5\.000-5\.000/);
    const scene = await readScene(path.join(dir, 's.glb'));
    expect('scene' in scene && scene.scene.duration).toBe(0);
  });
});
