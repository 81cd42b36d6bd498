// The sequence manifest: JSON beside the frames recording what made them and what they hold.
//
// shotHash is a SHA-256 of everything that decides a frame's bytes: the resolved shot without the
// things that only name, place or range the files (the shot file's path and the source locations
// inside it, the output path template, the folders of mattes and lens files, the lens's name and
// note, the frame range, timecode), plus straylight's version and the matte files' names, sizes
// and times. So copying, renaming, re-indenting or commenting a shot keeps the hash; any other
// change (a key, a light, the lens, a flare setting, the output format, a matte file) changes it,
// and every frame is rendered again. Records of an older hash stay until their frame is rendered
// again (a frame record carries its own hash when it differs from the manifest's).
// Each shard of a farm render writes a manifest of its own; processes sharing one (disjoint
// --frames into one folder) merge their records under a lock file.

import { createHash } from 'node:crypto';
import { closeSync, existsSync, openSync, readdirSync, readFileSync, rmSync, statSync, writeSync } from 'node:fs';
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
  /** the shot hash of the render that wrote it, when it is not the manifest's own */
  shotHash?: string;
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
  /**
   * frames a render has set out to write and not yet recorded: a file under such a frame's name is
   * one of ours that a killed render left (whole, since frames are renamed into place)
   */
  pending?: number[];
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
  const { file: _file, output, frame, mattes, lens, ...rest } = shot;
  const { template: _t, ...outputRest } = output;
  const { first: _f, last: _l, timecodeStartFrames: _tc, dropFrame: _df, ...frameRest } = frame;
  void _file;
  void _t;
  void _f;
  void _l;
  void _tc;
  void _df;
  // where a matte was named in the shot, and the folder its files are in, do not change a pixel
  // (the files themselves are in the fingerprint); nor do a lens file's path, name and note
  const matteKeys = mattes.map(({ at: _at, atPath: _ap, template, ...m }) => ({ ...m, file: path.basename(template) }));
  const lensKey = lens ? { fNumber: lens.fNumber, model: { ...lens.model, name: '', note: '' } } : undefined;
  return createHash('sha256')
    .update(canonical({ tool: TOOL_VERSION, ...rest, lens: lensKey, mattes: matteKeys, output: outputRest, frame: frameRest, matteFiles: mattesFingerprint(shot) }))
    .digest('hex');
}

/** The shot hash a frame record belongs to. */
export function recordHash(m: Manifest, rec: ManifestFrame): string {
  return rec.shotHash ?? m.shotHash;
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

/**
 * Every manifest of this sequence in its folder (the whole render and each shard's). A manifest
 * that cannot be read is left out (its frames get checked or rendered again) and named in
 * `unreadable` when given.
 */
export function readManifests(template: string, unreadable?: string[]): { file: string; manifest: Manifest }[] {
  const dir = path.dirname(template);
  if (!existsSync(dir)) return [];
  const name = sequenceName(template);
  const re = new RegExp(`^${name.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}\\.manifest(\\.shard-\\d+-of-\\d+)?\\.json$`);
  const out: { file: string; manifest: Manifest }[] = [];
  for (const f of readdirSync(dir).filter((n) => re.test(n)).sort()) {
    const file = path.join(dir, f);
    try {
      const m = JSON.parse(readFileSync(file, 'utf8')) as Manifest;
      if (m.version === 1 && m.frames && typeof m.frames === 'object' && typeof m.shotHash === 'string') out.push({ file, manifest: m });
      else unreadable?.push(file);
    } catch {
      unreadable?.push(file);
    }
  }
  return out;
}

export function writeManifest(file: string, m: Manifest): void {
  writeFileAtomic(file, Buffer.from(`${JSON.stringify(m, null, 1)}\n`));
}

/** How long a manifest lock may be held before another process takes it over, ms. */
const STALE_LOCK_MS = 60_000;
/** ...or, when its process is not running on this machine, this long. */
const DEAD_LOCK_MS = 2_000;
/**
 * Temporary files are removed only when this old and their process is not running here: a frame
 * takes seconds to write, and on a farm another machine's process ids are not ours to judge.
 */
const STALE_TEMP_MS = 10 * 60_000;
const sleeper = new Int32Array(new SharedArrayBuffer(4));

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/**
 * Run `fn` holding the manifest's lock file (created exclusively beside it; a lock whose process is
 * gone, or older than a minute, is taken over). Held only for a read-merge-write, so processes
 * sharing a manifest wait milliseconds for each other.
 */
export function withManifestLock<T>(manifestFile: string, fn: () => T, timeoutMs = 20_000): T {
  const lock = path.join(path.dirname(manifestFile), `.${path.basename(manifestFile)}.lock`);
  const start = Date.now();
  let fd: number | undefined;
  for (;;) {
    try {
      fd = openSync(lock, 'wx');
      writeSync(fd, String(process.pid));
      break;
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw e;
      let stale = false;
      try {
        const text = readFileSync(lock, 'utf8');
        const pid = Number(text);
        // a process id means nothing on another machine sharing the folder: a lock whose process is
        // gone here is taken over only once it is a few seconds old (locks are held for milliseconds).
        // An empty lock that old was left by a process killed between creating it and writing its id.
        const age = Date.now() - statSync(lock).mtimeMs;
        const gone = text.trim() === '' || (Number.isInteger(pid) && pid > 0 && !alive(pid));
        stale = age > STALE_LOCK_MS || (gone && age > DEAD_LOCK_MS);
      } catch {
        // the holder removed it meanwhile (or wrote nothing yet): try again
      }
      if (stale) rmSync(lock, { force: true });
      else if (Date.now() - start > timeoutMs) throw Object.assign(new Error(`${lock} is held by another render`), { code: 'ELOCKED' });
      else Atomics.wait(sleeper, 0, 0, 5);
    }
  }
  try {
    return fn();
  } finally {
    closeSync(fd);
    rmSync(lock, { force: true });
  }
}

/**
 * Hidden temporary files a write left behind in the sequence's folder (a killed process's
 * half-written frame or manifest), with the process that wrote each: `.NAME.PID.N.tmp`.
 */
export function strayTempFiles(template: string): { file: string; pid: number; mtimeMs: number }[] {
  const dir = path.dirname(template);
  if (!existsSync(dir)) return [];
  const t = parseFrameTemplate(path.basename(template));
  if (typeof t === 'string') return [];
  const esc = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
  const frameRe = new RegExp(`^${esc(t.prefix)}-?\\d+${esc(t.suffix)}$`);
  const manifestRe = new RegExp(`^${esc(sequenceName(template))}\\.manifest(\\.shard-\\d+-of-\\d+)?\\.json$`);
  const out: { file: string; pid: number; mtimeMs: number }[] = [];
  for (const name of readdirSync(dir)) {
    const m = /^\.(.+)\.(\d+)\.(\d+)\.tmp$/.exec(name);
    if (!m || !(frameRe.test(m[1]) || manifestRe.test(m[1]))) continue;
    const file = path.join(dir, name);
    try {
      out.push({ file, pid: Number(m[2]), mtimeMs: statSync(file).mtimeMs });
    } catch {
      // gone meanwhile
    }
  }
  return out.sort((a, b) => (a.file < b.file ? -1 : 1));
}

/** Remove stray temporary files left long ago by processes that are gone; returns how many. */
export function cleanStrayTempFiles(template: string): number {
  let n = 0;
  for (const s of strayTempFiles(template)) {
    if (s.pid === process.pid || alive(s.pid) || Date.now() - s.mtimeMs < STALE_TEMP_MS) continue;
    rmSync(s.file, { force: true });
    n++;
  }
  return n;
}
