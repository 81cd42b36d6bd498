// Tracks found in a plate, as straylight's own inputs: one frame,x,y,intensity CSV per light and a
// ready shot file naming them, with each light's colour (linear RGB) and intensity in stops over
// the frame's white, measured from the plate.

import type { Track } from './track.js';

export interface PlateLight {
  name: string;
  /** every frame from its first sighting to its last; predicted where it was hidden */
  rows: { frame: number; x: number; y: number; stops: number; predicted: boolean }[];
  /** linear RGB at unit luminance */
  colour: [number, number, number];
  /** median apparent radius, px */
  radiusPx: number;
  /** the brightest luminance seen */
  peak: number;
  /** its core was clipped (a display-referred plate's white) on most sightings: the level is a floor */
  clipped: boolean;
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

/** `lift`: stops added to every measured level (clipped lights are brighter than their plate says). */
export function plateLights(tracks: Track[], lift: number, clip: number): PlateLight[] {
  return tracks.map((t, i) => {
    const seen = t.points.filter((p) => p.blob);
    const level = new Map(seen.map((p) => [p.frame, Math.log2(Math.max(p.blob!.flux / p.blob!.area, 1e-6)) + lift]));
    const rows = t.points.map((p, k) => {
      let stops = level.get(p.frame);
      if (stops === undefined) {
        // hidden: between the sightings either side
        const before = [...t.points.slice(0, k)].reverse().find((q) => q.blob)!;
        const after = t.points.slice(k + 1).find((q) => q.blob)!;
        const s = (p.frame - before.frame) / (after.frame - before.frame);
        stops = level.get(before.frame)! + (level.get(after.frame)! - level.get(before.frame)!) * s;
      }
      return { frame: p.frame, x: p.x, y: p.y, stops, predicted: p.predicted };
    });
    const sum = [0, 0, 0];
    for (const p of seen) for (let c = 0; c < 3; c++) sum[c] += p.blob!.rgb[c];
    const lum = 0.2126 * sum[0] + 0.7152 * sum[1] + 0.0722 * sum[2];
    const colour: [number, number, number] = lum > 0 ? [sum[0] / lum, sum[1] / lum, sum[2] / lum] : [1, 1, 1];
    const clippedSightings = seen.filter((p) => p.blob!.peak >= clip).length;
    return {
      name: `light-${i + 1}`,
      rows,
      colour,
      radiusPx: median(seen.map((p) => p.blob!.radius)),
      peak: Math.max(...seen.map((p) => p.blob!.peak)),
      clipped: clippedSightings * 2 > seen.length,
    };
  });
}

export function trackCsv(light: PlateLight): string {
  const hidden = light.rows.filter((r) => r.predicted).map((r) => r.frame);
  const lines = [`# ${light.name}, tracked from the plate by straylight lights`];
  if (hidden.length) lines.push(`# predicted (hidden wholly or in part; placed between whole sightings): frames ${spans(hidden)}`);
  lines.push('frame,x,y,intensity');
  for (const r of light.rows) lines.push(`${r.frame},${r.x.toFixed(3)},${r.y.toFixed(3)},${r.stops.toFixed(3)}`);
  return lines.join('\n') + '\n';
}

/** 3,4,5,9 -> "3-5, 9" */
export function spans(frames: number[]): string {
  const out: string[] = [];
  for (let i = 0; i < frames.length; ) {
    let j = i;
    while (j + 1 < frames.length && frames[j + 1] === frames[j] + 1) j++;
    out.push(i === j ? `${frames[i]}` : `${frames[i]}-${frames[j]}`);
    i = j + 1;
  }
  return out.join(', ');
}

export interface ShotTextOptions {
  plate: string;
  csv: (light: PlateLight) => string;
  width: number;
  height: number;
  rate: string;
  first: number;
  last: number;
  threshold: number;
  output: string;
}

/** A ready shot file (YAML, with comments) for the lights. Paths are as they should appear in it. */
export function shotText(lights: PlateLight[], o: ShotTextOptions): string {
  const n = (v: number) => Number(v.toFixed(4));
  const lightLines = lights.flatMap((l) => [
    `  - name: ${l.name}`,
    `    track: ${o.csv(l)}     # frame,x,y,intensity (stops); frames ${l.rows[0].frame}-${l.rows[l.rows.length - 1].frame}`,
    `    colour: { rgb: [${l.colour.map(n).join(', ')}] }   # linear, from the plate`,
    `    radius: ${n(Math.max(0.5, l.radiusPx))}`,
    `    occluded_by: [plate]`,
  ]);
  return [
    `# Made by straylight lights from ${o.plate}: ${lights.length} light${lights.length === 1 ? '' : 's'} tracked over frames ${o.first}-${o.last}.`,
    `# The plate itself dims each light where something covers its bright core (mattes: plate).`,
    `version: 1`,
    `frame: { width: ${o.width}, height: ${o.height}, rate: ${o.rate}, first: ${o.first}, last: ${o.last} }`,
    `lights:`,
    ...lightLines,
    `mattes:`,
    `  - { name: plate, kind: plate, path: ${o.plate}, threshold: ${n(o.threshold)} }`,
    `# a starting point: name the lens the plate was shot with (straylight lens --all lists the presets)`,
    `lens: { preset: double-gauss-50, f_number: 4 }`,
    `output: { path: ${o.output}, format: ${o.output.toLowerCase().endsWith('.png') ? 'png16' : 'exr'} }`,
    '',
  ].join('\n');
}
