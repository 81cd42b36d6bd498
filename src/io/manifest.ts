// The sequence manifest: JSON beside the frames recording what made them and what they hold.
//
// shotHash is a SHA-256 of everything that decides a frame's bytes: the resolved shot without the
// things that only name or range the files (the shot file's path, the output path template, the
// frame range, timecode), plus straylight's version and the matte files' names, sizes and times.
// Any other change (a key, a light, the lens, a flare setting, the output format, a matte file)
// changes the hash, and every frame is rendered again.
// Each shard of a farm render writes a manifest of its own, so no two processes share one file.

import { createHash } from 'node:crypto';
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import type { ResolvedShot } from '../shot/types.js';
import { writeFileAtomic } from './atomic-write.js';
import { expandFramePath, parseFrameTemplate } from '../format/frame-path.js';
import { framesOnDisk } from './read-frame.js';
import { VERSION } from '../version.js';

export const TOOL_VERSION = `straylight ${VERSION}`;

export interface Shard {
  /** 0-based index of this share */
  k: number;
  n: number;
}

export interface ManifestFrame {
  size: number;
  sha256: string;
}

export interface Manifest {
  version: 1;
  tool: string;
  shotHash: string;
  shot: string;
  /** the file-name pattern, relative to the manifest's folder */
  template: string;
  first: number;
  last: number;
  shard?: Shard;
  frames: Record<string, ManifestFrame>;
}

/** Stable JSON: object keys sorted, so the hash does not depend on key order. */
function canonical(v: unknown): string {
  if (Array.isArray(v)) return `[${v.map(canonical).join(',')}]`;
  if (v && typeof v === 'object' && !ArrayBuffer.isView(v)) {
    return `{${Object.keys(v as object)
      .sort()
      .map((k) => `${JSON.stringify(k)}:${canonical((v as Record<string, unknown>)[k])}`)
      .join(',')}}`;
  }
  return JSON.stringify(v);
}

/**
 * The mattes' files as they are now: each frame's name, size and modification time (as make does;
 * hashing every matte's bytes on every run would cost too much for long EXR depth sequences).
 */
export function mattesFingerprint(shot: ResolvedShot): string[] {
  const out: string[] = [];
  for (const m of shot.mattes) {
    for (const f of framesOnDisk(m.template)) {
      const file = expandFramePath(m.template, f);
      const st = statSync(file);
      out.push(`${m.name}:${f}:${st.size}:${Math.round(st.mtimeMs)}`);
    }
  }
  return out;
}

export function shotHash(shot: ResolvedShot): string {
  const { file: _file, output, frame, ...rest } = shot;
  const { template: _t, ...outputRest } = output;
  const { first: _f, last: _l, timecodeStartFrames: _tc, dropFrame: _df, ...frameRest } = frame;
  void _file;
  void _t;
  void _f;
  void _l;
  void _tc;
  void _df;
  return createHash('sha256')
    .update(canonical({ tool: TOOL_VERSION, ...rest, output: outputRest, frame: frameRest, matteFiles: mattesFingerprint(shot) }))
    .digest('hex');
}

/** Base name of a sequence: the template's file name without its frame number and extension. */
function sequenceName(template: string): string {
  const t = parseFrameTemplate(path.basename(template));
  if (typeof t === 'string') throw new Error(t);
  const stem = `${t.prefix}#${t.suffix}`.replace(/\.[^.]*$/, '');
  return stem.replace(/[._-]?#[._-]?/, '') || 'sequence';
}

export function manifestPath(template: string, shard?: Shard): string {
  const tag = shard && shard.n > 1 ? `.shard-${shard.k}-of-${shard.n}` : '';
  return path.join(path.dirname(template), `${sequenceName(template)}.manifest${tag}.json`);
}

/** Every manifest of this sequence in its folder (the whole render and each shard's). */
export function readManifests(template: string): { file: string; manifest: Manifest }[] {
  const dir = path.dirname(template);
  if (!existsSync(dir)) return [];
  const name = sequenceName(template);
  const re = new RegExp(`^${name.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}\\.manifest(\\.shard-\\d+-of-\\d+)?\\.json$`);
  const out: { file: string; manifest: Manifest }[] = [];
  for (const f of readdirSync(dir).filter((n) => re.test(n)).sort()) {
    try {
      const m = JSON.parse(readFileSync(path.join(dir, f), 'utf8')) as Manifest;
      if (m.version === 1 && m.frames && typeof m.shotHash === 'string') out.push({ file: path.join(dir, f), manifest: m });
    } catch {
      // an unreadable manifest is as good as none: its frames get checked or rendered again
    }
  }
  return out;
}

export function writeManifest(file: string, m: Manifest): void {
  writeFileAtomic(file, Buffer.from(`${JSON.stringify(m, null, 1)}\n`));
}
