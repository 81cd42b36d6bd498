// The library API: what the CLI uses, for programs that drive straylight directly.

export { ExitCode, ShotError, InputError, UsageError, StraylightError, formatDiagnostic } from './errors.js';
export type { Diagnostic, SourceLoc } from './errors.js';
export { resolveShot, checkOutputTemplate } from './shot/resolve.js';
export type { ResolvedShot, ResolvedLight, ResolvedFrame, ResolvedOutput, GlowSettings } from './shot/types.js';
export { loadShot } from './io/load-shot.js';
export { renderFrame } from './render/render-frame.js';
export { frameState } from './render/frame-state.js';
export { renderSequence, shardFrames } from './render/sequence.js';
export type { SequenceOptions, SequenceResult, FrameEvent, FrameRange } from './render/sequence.js';
export { encodePng } from './io/png.js';
export { FloatImage } from './raster/image.js';
export { framesToTimecode, timecodeToFrames } from './timeline/timecode.js';
export { run } from './cli/run.js';
