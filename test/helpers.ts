// Shared test helpers: temporary folders and a minimal valid shot.

import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterEach } from 'vitest';

const made: string[] = [];

/** A fresh temporary folder, removed after the test. */
export function tempDir(): string {
  const d = mkdtempSync(path.join(tmpdir(), 'straylight-test-'));
  made.push(d);
  return d;
}

afterEach(() => {
  while (made.length) rmSync(made.pop()!, { recursive: true, force: true });
});

/** Run the CLI in-process and collect what it prints. */
export async function cli(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  const { run } = await import('../src/cli/run.js');
  let stdout = '';
  let stderr = '';
  const code = await run(args, { stdout: (s) => (stdout += s), stderr: (s) => (stderr += s), stderrIsTTY: false });
  return { code, stdout, stderr };
}

/** Every PNG in a folder, by name, as base64 (to compare renders byte for byte). */
export function pngBytes(folder: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const f of readdirSync(folder).filter((n) => n.endsWith('.png')).sort()) out[f] = readFileSync(path.join(folder, f)).toString('base64');
  return out;
}

export function writeFiles(dir: string, files: Record<string, string>): void {
  for (const [name, text] of Object.entries(files)) writeFileSync(path.join(dir, name), text);
}

/** A small valid shot; `extra` lines are spliced in where noted by the caller. */
export const MINIMAL_SHOT = `version: 1
frame:
  width: 64
  height: 48
  rate: 24
  first: 1
  last: 3
lights:
  - name: sun
    position: [32, 24]
    intensity: 0
output:
  path: out/f.####.png
`;
