// Blobs linked frame to frame into tracks: each track predicts where its light is next (its last
// place plus its velocity, per frame of the gap), and the closest blob within the gate is taken,
// nearest pairs first. A track that finds nothing keeps its identity for up to maxGap frames;
// when its light comes back, the frames between are filled by linear interpolation and flagged
// as predicted. A track not seen again ends at its last sighting. A sighting much smaller than the
// light's usual size is the light partly hidden, and its centroid leans towards the visible part:
// such frames are placed by the same interpolation between the whole sightings either side, and
// flagged predicted too (the blob is kept: the light was seen).

import type { Blob } from './detect.js';

export interface TrackPoint {
  frame: number;
  x: number;
  y: number;
  /** a frame the light was not seen whole on (behind something), its place interpolated */
  predicted: boolean;
  /** the blob seen (absent where predicted) */
  blob?: Blob;
}

export interface Track {
  id: number;
  points: TrackPoint[];
}

export interface TrackOptions {
  /** largest distance (px) between a prediction and the blob taken */
  gate: number;
  /** frames a track may go unseen and keep its identity */
  maxGap: number;
  /** tracks seen on fewer frames than this are dropped */
  minFrames: number;
}

/** A sighting under this share of the light's median area is taken as the light partly hidden. */
export const PARTIAL_AREA = 0.85;

/** Partly hidden sightings placed between the whole ones either side (see the head of the file). */
function placePartial(track: Track): Track {
  const seen = track.points.filter((p) => p.blob).map((p) => p.blob!.area).sort((a, b) => a - b);
  const median = seen[Math.floor(seen.length / 2)];
  const whole = (p: TrackPoint) => p.blob !== undefined && p.blob.area >= PARTIAL_AREA * median;
  const points = track.points.map((p, k) => {
    if (whole(p) || (p.predicted && !p.blob)) return p;
    const before = track.points.slice(0, k).reverse().find(whole);
    const after = track.points.slice(k + 1).find(whole);
    if (!before || !after) return p;
    const s = (p.frame - before.frame) / (after.frame - before.frame);
    return { ...p, x: before.x + (after.x - before.x) * s, y: before.y + (after.y - before.y) * s, predicted: true };
  });
  // the hidden frames between partial sightings follow the same line
  return { ...track, points: points.map((p, k) => (p.blob ? p : placeHidden(points, k))) };
}

function placeHidden(points: TrackPoint[], k: number): TrackPoint {
  const p = points[k];
  const before = points.slice(0, k).reverse().find((q) => q.blob && !q.predicted);
  const after = points.slice(k + 1).find((q) => q.blob && !q.predicted);
  if (!before || !after) return p;
  const s = (p.frame - before.frame) / (after.frame - before.frame);
  return { ...p, x: before.x + (after.x - before.x) * s, y: before.y + (after.y - before.y) * s };
}

/** frames: the shot's frame numbers in order, and each frame's blobs. */
export function linkTracks(frames: { frame: number; blobs: Blob[] }[], opts: TrackOptions): Track[] {
  interface Live {
    track: Track;
    /** last sighting */
    last: TrackPoint;
    /** px per frame */
    vx: number;
    vy: number;
  }
  const live: Live[] = [];
  const done: Track[] = [];
  let nextId = 0;
  for (const { frame, blobs } of frames) {
    // every (track, blob) pair within the gate, nearest first
    const pairs: { l: Live; b: number; d: number }[] = [];
    for (const l of live) {
      const gap = frame - l.last.frame;
      const px = l.last.x + l.vx * gap;
      const py = l.last.y + l.vy * gap;
      blobs.forEach((bl, b) => {
        const d = Math.hypot(bl.x - px, bl.y - py);
        if (d <= opts.gate) pairs.push({ l, b, d });
      });
    }
    pairs.sort((p, q) => p.d - q.d || p.l.track.id - q.l.track.id || p.b - q.b);
    const takenTrack = new Set<Live>();
    const takenBlob = new Set<number>();
    for (const { l, b } of pairs) {
      if (takenTrack.has(l) || takenBlob.has(b)) continue;
      takenTrack.add(l);
      takenBlob.add(b);
      const bl = blobs[b];
      const gap = frame - l.last.frame;
      // the frames it was hidden: on the straight line between the two sightings
      for (let g = 1; g < gap; g++) {
        const s = g / gap;
        l.track.points.push({ frame: l.last.frame + g, x: l.last.x + (bl.x - l.last.x) * s, y: l.last.y + (bl.y - l.last.y) * s, predicted: true });
      }
      const p: TrackPoint = { frame, x: bl.x, y: bl.y, predicted: false, blob: bl };
      l.vx = (bl.x - l.last.x) / gap;
      l.vy = (bl.y - l.last.y) / gap;
      l.track.points.push(p);
      l.last = p;
    }
    // tracks unseen too long end; new blobs start tracks
    for (let i = live.length - 1; i >= 0; i--) {
      if (frame - live[i].last.frame > opts.maxGap) done.push(live.splice(i, 1)[0].track);
    }
    blobs.forEach((bl, b) => {
      if (takenBlob.has(b)) return;
      const p: TrackPoint = { frame, x: bl.x, y: bl.y, predicted: false, blob: bl };
      live.push({ track: { id: nextId++, points: [p] }, last: p, vx: 0, vy: 0 });
    });
  }
  done.push(...live.map((l) => l.track));
  return done
    .filter((t) => t.points.filter((p) => p.blob).length >= opts.minFrames)
    .sort((a, b) => a.id - b.id)
    .map((t, i) => placePartial({ id: i, points: t.points }));
}
