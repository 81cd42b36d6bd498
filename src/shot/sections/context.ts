// What every section resolver shares: where problems are collected, the shot's folder (for
// relative paths), and the reader for the files a shot names. Plus the limits sections check.

import type { Diagnostic } from '../../errors.js';

/** What the resolver may read besides the shot itself (track CSVs); injected so shot/ does no I/O. */
export interface ShotReader {
  readText(absolutePath: string): string;
  /** preset lenses: their names, and the file of one */
  presetNames?(): string[];
  presetPath?(name: string): string;
}

export interface ResolveContext {
  /** every problem found, in any order (sorted by location at the end) */
  readonly diagnostics: Diagnostic[];
  /** the shot's folder, absolute: relative paths in the shot start here */
  readonly dir: string;
  /** the shot's folder as the user named it, for messages about files beside it */
  readonly shownDir: string;
  readonly reader: ShotReader;
}

/** Largest frame side accepted (px). */
export const MAX_SIDE_PX = 16384;
/** Largest number of frames in one shot. */
export const MAX_FRAMES = 1_000_000;
/** Positions further than this from the frame (px) are refused as typos. */
export const MAX_COORD_PX = 1_000_000;
