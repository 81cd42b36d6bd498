// What the preview page looks at: the shot as last loaded (or why it could not be), its frames at
// draft size with each element as a layer, so the page's switches and gains recompose a frame
// without rendering it again, the plate under it, where the ghosts land, and the visibility curve.
// Every picture is made in memory from the shot's own inputs: nothing is served from disk by path.

import path from 'node:path';
import { existsSync } from 'node:fs';
import { formatDiagnostic, ShotError, StraylightError } from '../errors.js';
import { expandFramePath } from '../format/frame-path.js';
import { loadShot } from '../io/load-shot.js';
import { encodePng } from '../io/png.js';
import { readFrameLinear } from '../io/read-frame.js';
import { resampleArea } from '../review/source.js';
import type { GhostQuality } from '../optics/ghost-system.js';
import { prepareLens, type LensSystem } from '../optics/ghost-system.js';
import { diskFlux } from '../elements/core.js';
import { evalScalar } from '../timeline/track.js';
import { FloatImage } from '../raster/image.js';
import { lightState } from '../render/frame-state.js';
import { scaleShot, withGhostQuality } from '../render/overrides.js';
import { activeElements } from '../render/passes.js';
import { visibilityRows } from '../render/visibility-curves.js';
import type { ElementName, ResolvedShot } from '../shot/types.js';
import { framesToTimecode, nominalRate } from '../timeline/timecode.js';
import { availableParallelism } from 'node:os';
import { PreviewPool } from './pool.js';

export interface PreviewOptions {
  /** the shot file, as the user gave it */
  shotFile: string;
  /** a plate frame template shown under the pass (added in linear light) */
  plate?: string;
  quality: GhostQuality;
  /** fraction of the shot's frame size the preview renders at (default: at most 960 pixels wide) */
  scale?: number;
  /** drawing threads (default: one per core, at most 4) */
  threads?: number;
}

/** The page's setting for one element: on or off, and a gain on top of the shot's. */
export interface ElementSetting {
  on: boolean;
  gain: number;
}

export interface PreviewState {
  version: number;
  shot: string;
  /** located problems, as `check` prints them; empty when the shot loaded */
  errors: string[];
  /** when the shot cannot be loaded, the page keeps showing the last version that could */
  showing?: {
    version: number;
    first: number;
    last: number;
    fps: number;
    rate: string;
    timecodes: string[];
    widthPx: number;
    heightPx: number;
    fullWidthPx: number;
    fullHeightPx: number;
    quality: GhostQuality;
    /** every element that can add light, and whether the shot has it on */
    elements: { name: ElementName; enabled: boolean }[];
    lights: string[];
    plate: boolean;
    lens?: string;
  };
}

/** The preview's width when no scale is given (a 1920-wide shot at half size). */
const PREVIEW_WIDTH = 960;
/** Encoded frames kept, by their settings: enough to play a few hundred draft frames. */
const PNG_BYTES = 384 * 1024 * 1024;
/** How many of the strongest ghosts the overlay names (per light). */
const NAMED_GHOSTS = 12;
/** A ghost is named when its paraxial peak reaches this (display units: about code 8 of 8-bit sRGB). */
const NAMED_PEAK = 1e-3;

interface Loaded {
  version: number;
  full: ResolvedShot;
  /** what the preview renders: every element on (the page switches them), draft size and quality */
  base: ResolvedShot;
  /** the shot's own on/off per element */
  enabled: Record<ElementName, boolean>;
  elements: ElementName[];
  /** the lens's ghosts ranked (for the overlay), made when first asked */
  system?: LensSystem;
  visibility?: { frames: number[]; lights: { name: string; visibility: number[] }[] };
}

export class PreviewSession {
  private loaded?: Loaded;
  private errors: string[] = [];
  private version = 0;
  private files = new Set<string>();
  private readonly pool: PreviewPool;
  private pngs = new Map<string, Buffer>();
  private pngBytes = 0;

  constructor(readonly opts: PreviewOptions) {
    this.pool = new PreviewPool(opts.threads ?? Math.min(4, availableParallelism()));
  }

  /** Stop the drawing threads. */
  close(): Promise<void> {
    return this.pool.close();
  }

  /** The files the shot read the last time it was loaded (the shot itself at least) and its matte folders. */
  watched(): string[] {
    const out = new Set(this.files);
    out.add(path.resolve(this.opts.shotFile));
    for (const m of this.loaded?.full.mattes ?? []) out.add(path.dirname(m.template));
    return [...out];
  }

  /** (Re)load the shot: on success it becomes what the page shows; on failure its errors do. */
  async load(): Promise<{ ok: boolean; errors: string[]; ms: number }> {
    const t0 = performance.now();
    const files = new Set<string>();
    this.version++;
    try {
      const full = await loadShot(this.opts.shotFile, { onRead: (f) => files.add(f) });
      const enabled = Object.fromEntries(Object.entries(full.elements).map(([k, v]) => [k, v.enabled])) as Record<ElementName, boolean>;
      const allOn = { ...full, elements: Object.fromEntries(Object.entries(full.elements).map(([k, v]) => [k, { ...v, enabled: true }])) as ResolvedShot['elements'] };
      const base = scaleShot(withGhostQuality(allOn, this.opts.quality), this.opts.scale ?? Math.min(1, PREVIEW_WIDTH / full.frame.widthPx));
      this.loaded = { version: this.version, full, base, enabled, elements: activeElements(base) };
      this.pool.use(this.version, base, this.loaded.elements);
      this.errors = [];
      this.pngs.clear();
      this.pngBytes = 0;
    } catch (e) {
      this.errors = e instanceof ShotError ? e.diagnostics.map(formatDiagnostic) : e instanceof StraylightError ? e.message.split('\n') : [`${this.opts.shotFile}: ${e instanceof Error ? e.message : String(e)}`];
    }
    this.files = files;
    return { ok: this.errors.length === 0, errors: this.errors, ms: performance.now() - t0 };
  }

  state(): PreviewState {
    const l = this.loaded;
    const out: PreviewState = { version: this.version, shot: this.opts.shotFile, errors: this.errors };
    if (!l) return out;
    const f = l.full.frame;
    const timecodes: string[] = [];
    for (let n = f.first; n <= f.last; n++) timecodes.push(framesToTimecode(f.timecodeStartFrames + (n - f.first), f.rate, f.dropFrame));
    out.showing = {
      version: l.version,
      first: f.first,
      last: f.last,
      fps: f.rate.num / f.rate.den,
      rate: f.rate.den === 1 ? String(f.rate.num) : `${f.rate.num}/${f.rate.den} (${nominalRate(f.rate)} nominal)`,
      timecodes,
      widthPx: l.base.frame.widthPx,
      heightPx: l.base.frame.heightPx,
      fullWidthPx: f.widthPx,
      fullHeightPx: f.heightPx,
      quality: this.opts.quality,
      elements: l.elements.map((name) => ({ name, enabled: l.enabled[name] })),
      lights: l.full.lights.map((x) => x.name),
      plate: Boolean(this.opts.plate),
      ...(l.full.lens ? { lens: l.full.lens.source } : {}),
    };
    return out;
  }

  /** Whether a frame number is one of the shot's (as last loaded). */
  hasFrame(n: number): boolean {
    const f = this.loaded?.full.frame;
    return Boolean(f && Number.isInteger(n) && n >= f.first && n <= f.last);
  }

  /** A frame as an 8-bit sRGB PNG with the page's settings; `note` says what it could not add. */
  async frame(n: number, settings: Partial<Record<ElementName, ElementSetting>>, withPlate: boolean): Promise<{ png: Buffer; ms: number; cached: boolean; note?: string }> {
    const l = this.loaded!;
    const t0 = performance.now();
    const eff = l.elements.map((e) => ({ e, on: settings[e]?.on ?? l.enabled[e], gain: settings[e]?.gain ?? 1 }));
    const key = `${l.version}|${n}|${withPlate ? 1 : 0}|${eff.map((x) => `${x.e}:${x.on ? x.gain : 0}`).join(',')}`;
    const hit = this.pngs.get(key);
    if (hit) {
      this.pngs.delete(key); // most recently used last
      this.pngs.set(key, hit);
      return { png: hit, ms: performance.now() - t0, cached: true };
    }
    const gains: Partial<Record<ElementName, number>> = {};
    for (const { e, on, gain } of eff) gains[e] = on ? gain : 0;
    const img = new FloatImage(l.base.frame.widthPx, l.base.frame.heightPx, await this.pool.compose(n, l.version, gains));
    let note: string | undefined;
    if (withPlate && this.opts.plate) {
      const file = expandFramePath(path.resolve(this.opts.plate), n);
      if (!existsSync(file)) note = `no plate frame ${file}`;
      else {
        try {
          const plate = resampleArea(readFrameLinear(file), img.width, img.height);
          for (let p = 0, o = 0; p < plate.rgb.length; p += 3, o += 4) for (let c = 0; c < 3; c++) img.data[o + c] += plate.rgb[p + c];
        } catch (e) {
          note = `plate frame ${file} cannot be read: ${e instanceof Error ? e.message : String(e)}`;
        }
      }
    }
    const png = encodePng(img, { bitDepth: 8, transfer: 'srgb', alpha: 'none' });
    if (!note) this.keep(key, png);
    return { png, ms: performance.now() - t0, cached: false, ...(note ? { note } : {}) };
  }

  /** Where each light is and where its strongest drawn ghosts land, at the preview's size. */
  ghosts(n: number): { lights: { name: string; xPx: number; yPx: number }[]; marks: { light: string; name: string; xPx: number; yPx: number }[] } {
    const l = this.loaded!;
    const lights: { name: string; xPx: number; yPx: number }[] = [];
    const marks: { light: string; name: string; xPx: number; yPx: number }[] = [];
    const lens = l.base.lens;
    if (!lens) return { lights, marks };
    // the ghosts' ranking and paraxial strengths, as the renderer has them (no plans needed)
    l.system ??= prepareLens(lens.model, 'draft', l.base.ghosts.threshold);
    const system = l.system;
    const [cx, cy] = l.base.frame.opticalCentre;
    const pxX = l.base.frame.widthPx / lens.model.sensorWidthMm;
    const pxY = pxX * l.base.frame.pixelAspect;
    const epRadius = system.focalLengthMm / (2 * evalScalar(lens.fNumber, n));
    const epArea = Math.PI * epRadius * epRadius;
    for (const light of l.base.lights) {
      const s = lightState(l.base, light, n);
      if (!s.placed) continue;
      lights.push({ name: light.name, xPx: s.xPx, yPx: s.yPx });
      const g = light.flare?.ghosts ?? l.base.ghosts;
      const [fr, fg, fb] = diskFlux({ xPx: s.xPx, yPx: s.yPx, radiusPx: s.radiusPx, radiance: s.radiance });
      const entering = (0.2126 * fr + 0.7152 * fg + 0.0722 * fb) / epArea;
      let named = 0;
      for (let k = 0; k < system.kept && named < NAMED_GHOSTS; k++) {
        const ghost = system.ranked[k];
        const name = `${ghost.i + 1}-${ghost.j + 1}`;
        if (g.paths[name]?.enabled === false || (g.solo.length > 0 && !g.solo.includes(name))) continue;
        // its paraxial peak on the frame (display units): too faint to see, not named
        if ((entering * ghost.strength * g.gain) / (pxX * pxY) < NAMED_PEAK) continue;
        marks.push({ light: light.name, name, xPx: cx + ghost.k * (s.xPx - cx), yPx: cy + ghost.k * (s.yPx - cy) });
        named++;
      }
    }
    return { lights, marks };
  }

  /** Each light's visibility at every frame (shutter-averaged, as `visibility` reports it). */
  visibility(): { frames: number[]; lights: { name: string; visibility: number[] }[] } {
    const l = this.loaded!;
    if (!l.visibility) {
      const rows = visibilityRows(l.base);
      const frames = [...new Set(rows.map((r) => r.frame))];
      l.visibility = { frames, lights: l.base.lights.map((x) => ({ name: x.name, visibility: rows.filter((r) => r.light === x.name).map((r) => r.visibility) })) };
    }
    return l.visibility;
  }

  private keep(key: string, png: Buffer): void {
    this.pngs.set(key, png);
    this.pngBytes += png.length;
    for (const [k, v] of this.pngs) {
      if (this.pngBytes <= PNG_BYTES) break;
      this.pngs.delete(k);
      this.pngBytes -= v.length;
    }
  }
}
