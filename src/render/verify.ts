// Is a sequence complete and intact? Every expected frame present, recorded in a manifest of the
// right shot, and its file's size and checksum as recorded.

import { existsSync, readdirSync } from 'node:fs';
import path from 'node:path';
import { readManifests, recordHash, strayTempFiles, type ManifestFrame } from '../io/manifest.js';
import { expandFramePath } from '../format/frame-path.js';
import { fileMatches } from './sequence.js';

export interface VerifyReport {
  template: string;
  first: number;
  last: number;
  intact: number;
  /** frames with no file, or no record in a manifest of this shot */
  missing: number[];
  /** frames whose file differs from its record */
  corrupt: number[];
  /** shot hashes met in the manifests (more than one: frames of different renders are mixed) */
  hashes: string[];
  /** hidden temporary files an interrupted write left beside the frames */
  temporary: string[];
}

export function verifySequence(template: string, expect?: { first: number; last: number; hash: string }): VerifyReport {
  const manifests = readManifests(template);
  const hashes = [...new Set(manifests.flatMap(({ manifest: m }) => [m.shotHash, ...Object.values(m.frames).map((r) => recordHash(m, r))]))];
  const hash = expect?.hash ?? manifests[0]?.manifest.shotHash;
  const records = new Map<number, ManifestFrame>();
  let first = expect?.first ?? Infinity;
  let last = expect?.last ?? -Infinity;
  for (const { manifest } of manifests) {
    if (!expect && manifest.shotHash === hash) {
      first = Math.min(first, manifest.first);
      last = Math.max(last, manifest.last);
    }
    for (const [f, rec] of Object.entries(manifest.frames)) if (recordHash(manifest, rec) === hash) records.set(Number(f), rec);
  }
  const temporary = strayTempFiles(template).map((s) => s.file);
  const report: VerifyReport = { template, first, last, intact: 0, missing: [], corrupt: [], hashes, temporary };
  if (!Number.isFinite(first)) return report;
  for (let f = first; f <= last; f++) {
    const file = expandFramePath(template, f);
    const rec = records.get(f);
    if (!rec || !existsSync(file)) report.missing.push(f);
    else if (!fileMatches(file, rec)) report.corrupt.push(f);
    else report.intact++;
  }
  return report;
}

/** Templates of the sequences whose manifests are in a folder. */
export function sequencesIn(dir: string): string[] {
  if (!existsSync(dir)) return [];
  const templates = new Set<string>();
  for (const name of readdirSync(dir)) {
    if (!/\.manifest(\.shard-\d+-of-\d+)?\.json$/.test(name)) continue;
    for (const { manifest } of readManifests(path.join(dir, name.replace(/\.manifest.*$/, '.#.png')))) {
      templates.add(path.join(dir, manifest.template));
    }
  }
  return [...templates].sort();
}

export function formatVerify(r: VerifyReport): string {
  const total = Number.isFinite(r.first) ? r.last - r.first + 1 : 0;
  const lines = [`${r.template}: ${r.intact} of ${total} frames present and intact (${r.first}-${r.last})`];
  const list = (xs: (number | string)[]) => (xs.length > 20 ? `${xs.slice(0, 20).join(', ')} ... (${xs.length})` : xs.join(', '));
  if (r.missing.length) lines.push(`  missing: ${list(r.missing)}`);
  if (r.corrupt.length) lines.push(`  corrupt (differs from the manifest): ${list(r.corrupt)}`);
  if (r.temporary.length) lines.push(`  temporary files left by an interrupted write (safe to delete when no render is running; the next render removes those over 10 minutes old): ${list(r.temporary)}`);
  if (r.hashes.length > 1) lines.push(`  note: manifests of ${r.hashes.length} different renders of the shot are here; only the current one counts`);
  if (total === 0) lines.push('  no manifest found: render the shot first');
  return lines.join('\n') + '\n';
}
