// The resolved shot: every default applied, units normalised, paths absolute. The rest of the
// program sees only this form. Plain data: it crosses to worker threads by structured clone.

import type { SourceLoc } from '../errors.js';
import type { GhostQuality } from '../optics/ghost-system.js';
import type { LensModel } from '../optics/lens.js';
import type { FrameRate } from '../timeline/frame-rate.js';
import type { Key, PathShape } from '../timeline/track.js';
import type { Vec2 } from '../timeline/path.js';
import type { ResolvedCamera, WorldPlacement } from '../scene/camera.js';
import type { ColourSpace } from '../colour/spaces.js';

export type OutputFormat = 'png16' | 'png8' | 'exr';
export type Transfer = 'srgb' | 'linear';
/** none: RGB to add; premultiplied: alpha = the pass's largest channel (clipped); emission: alpha 0
 * under premultiplied light (OpenEXR only), so "over" adds exactly */
export type AlphaMode = 'none' | 'premultiplied' | 'emission';
export type IntensityUnit = 'stops' | 'linear';

export interface ResolvedFrame {
  widthPx: number;
  heightPx: number;
  /** width of a pixel over its height (2 for a 2x anamorphic squeeze stored unsqueezed) */
  pixelAspect: number;
  rate: FrameRate;
  first: number;
  last: number;
  /** optical centre in pixels */
  opticalCentre: Vec2;
  /** timecode of the first frame, as a frame count from 00:00:00:00 */
  timecodeStartFrames: number;
  dropFrame: boolean;
}

export interface ResolvedMatte {
  name: string;
  kind: 'alpha' | 'depth' | 'plate';
  /** plate mattes: the luminance (linear) at which the plate counts a light's core as bright */
  plate?: { threshold: number };
  /** absolute frame-path template */
  template: string;
  /** r/g/b/a (PNG), any channel name (OpenEXR); undefined: the format's default (PNG r; EXR Z or A) */
  channel?: string;
  /** matte frame = shot frame + offset */
  offset: number;
  /** outside the matte sequence's frames: hold its first/last frame, or nothing covers */
  before: 'hold' | 'clear';
  after: 'hold' | 'clear';
  invert: boolean;
  /** depth mattes: how a stored value v in [0, 1] becomes scene depth */
  depth?: { encoding: 'normalised' | 'inverted' | 'linear'; near: number; far: number; scale: number; tolerance: number };
  /** a matte of another size: an error, or stretched over the frame */
  resize: 'error' | 'stretch';
  /** where the path was given, for errors found when reading the files */
  at: SourceLoc;
  atPath: string;
}

export interface ShutterSettings {
  /** degrees of the frame interval the shutter is open */
  angleDeg: number;
  /** stratified time samples across the open shutter */
  samples: number;
  /** where it opens, degrees relative to the frame's time (default: centred, -angle/2) */
  phaseDeg: number;
  /** smear: each span of the path drawn once and smeared along it (render/shutter-smear.ts); exact: every light drawn at every sample */
  method: 'smear' | 'exact';
}

export interface ResolvedLight {
  name: string;
  path: PathShape;
  /** position keys in pixels (empty for a light placed in the world) */
  position: Key<Vec2>[];
  /** a light placed in the 3-D world (a point, a direction, or a node of the camera's scene), projected through the shot's camera */
  world?: WorldPlacement;
  intensityUnit: IntensityUnit;
  /** intensity keys in intensityUnit (stops are interpolated in stops: fades are exponential); for a
   * light of the scene with a KHR_lights_punctual light, a trim on top of the scene's own level */
  intensity: Key<number>[];
  /** linear Rec.709 RGB with unit luminance */
  colour: [number, number, number];
  /** where the colour came from, for reports */
  colourSpec: { kelvin: number } | { rgb: [number, number, number]; space?: ColourSpace };
  radiusPx: number;
  /** names of the mattes that can cover this light */
  occludedBy: string[];
  /** the light's own depth keys (scene units), for depth mattes */
  depth?: Key<number>[];
  offFrame: 'clear' | 'hold' | 'hidden';
  limbDarkening: number;
  /** the light's own flare settings (the shot's with the light's `flare` keys on top); absent: the shot's */
  flare?: LightFlare;
}

/** The flare settings the shot's lights are drawn with (the shot's, or a light's own). */
export interface LightFlare {
  glow: GlowSettings;
  ghosts: GhostSettings;
  starburst: StarburstSettings;
  /** the veil: fraction of all visible flux lifted uniformly over the frame */
  veil: { fraction: number };
  streak: StreakSettings;
  dust: DustSettings;
  /** on/off and keyframable gain for each element */
  elements: Record<ElementName, ElementControl>;
}

export interface GlowSettings {
  /** glow energy as a fraction of the light's flux */
  fraction: number;
  /** core scale of the glow's profile, in pixels (frame height units) */
  sizePx: number;
  /** power-law exponent of the far tail: the glow falls as distance^-falloff */
  falloff: number;
}

/** Per element: on or off, and an artistic gain (keyframable) on top of its physical brightness. */
export interface ElementControl {
  enabled: boolean;
  gain: Key<number>[];
}

export type ElementName = 'core' | 'glow' | 'ghosts' | 'starburst' | 'veil' | 'streak' | 'dust';

export interface StarburstSettings {
  /** fraction of the light's flux in the diffraction pattern (0: off) */
  fraction: number;
  /** artistic size on top of the physical scale (1 = physical) */
  size: number;
}

export interface StreakSettings {
  fraction: number;
  lengthPx: number;
  thicknessPx: number;
  /** linear RGB tint, unit luminance; absent: the tint of the lens's coatings (its strongest ghost) */
  tint?: [number, number, number];
}

export interface DustSettings {
  fraction: number;
  density: number;
  reachPx: number;
  seed: number;
}

export interface GhostSettings {
  enabled: boolean;
  /** artistic gain on top of the physical brightness */
  gain: number;
  quality: GhostQuality;
  /** ghosts whose paraxial peak estimate is below this fraction of the entering irradiance are skipped */
  threshold: number;
  /** per ghost, by its name in `straylight lens` ("11-5": reflects at surface 11, then 5) */
  paths: Record<string, GhostPathControl>;
  /** when not empty, only these ghosts are drawn */
  solo: string[];
  /**
   * never from a shot file: draw only some of the ranked ghosts (the preview splits one frame's
   * ghosts between threads; shares that tile [0, 1) add up to the whole)
   */
  share?: GhostShare;
}

/**
 * The ranked ghosts whose place frac(rank x 0.618...) lies in [from, to): the golden-ratio sequence
 * spreads neighbouring ranks over the interval, so any share gets big and small ghosts alike, in
 * proportion to its width (inShare in elements/ghosts/view.ts).
 */
export interface GhostShare {
  from: number;
  to: number;
}


export interface GhostPathControl {
  enabled: boolean;
  /** keyframable gain on top of the ghosts' gain */
  gain: Key<number>[];
  /** linear RGB multiplier at unit luminance (white: no change) */
  tint: [number, number, number];
}

export interface ResolvedLens {
  model: LensModel;
  /** where it came from: "preset NAME", a file path, or "inline" */
  source: string;
  /** f-number keys */
  fNumber: Key<number>[];
}

export interface ResolvedOutput {
  /** absolute path template with a frame placeholder (#### or %04d) */
  template: string;
  format: OutputFormat;
  transfer: Transfer;
  alpha: AlphaMode;
  /** one combined pass, one sequence per element (x.glow.####.png, ...) for balancing later, or
   * one OpenEXR a frame holding the combined image and each element as a layer (glow.R, ...) */
  passes: 'combined' | 'separate' | 'layers';
  /** OpenEXR: pixel type and compression (format exr) */
  exr: { type: 'half' | 'float'; compression: 'none' | 'zips' | 'zip' };
  /** the primaries and white frames are written in (scene-linear; anything but rec709 needs OpenEXR) */
  colourSpace: ColourSpace;
}

/** The shot: its frame and lights, its flare settings (LightFlare's, which a light may override), and the rest. */
export interface ResolvedShot extends LightFlare {
  version: 1;
  /** absolute path of the shot file */
  file: string;
  frame: ResolvedFrame;
  seed: number;
  lights: ResolvedLight[];
  /** absent: the shot names no lens, and no ghosts are rendered */
  lens?: ResolvedLens;
  /** the camera lights placed in the world are seen through (absent: every light is placed in pixels) */
  camera?: ResolvedCamera;
  mattes: ResolvedMatte[];
  shutter: ShutterSettings;
  output: ResolvedOutput;
}
