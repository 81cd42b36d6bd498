// Known errors: small classes with a stable exit code. Only cli/ turns them into process exits.

/** Exit codes of the `straylight` command (documented in the README). */
export const ExitCode = {
  ok: 0,
  /** an unexpected internal error (a bug): a stack trace is printed */
  internal: 1,
  /** the command line itself is wrong (unknown option, bad flag value) */
  usage: 2,
  /** the shot file or a file it names is invalid: file:line:col messages */
  badInput: 3,
  /** some frames could not be rendered or written; the others were */
  framesFailed: 4,
  /** flash screening flagged the sequence (`flashes`, or `render --fail-on-flash`) */
  flashes: 5,
  /** a system tool the command needs (ffmpeg for --movie) is not installed */
  toolMissing: 6,
  /** not enough memory for even one worker at the shot's frame size; nothing was rendered */
  memory: 7,
  /** the render was interrupted (SIGINT/SIGTERM); finished frames are kept */
  interrupted: 130,
} as const;
export type ExitCode = (typeof ExitCode)[keyof typeof ExitCode];

/** Where in a source file something is. line and col are 1-based. */
export interface SourceLoc {
  file: string;
  line: number;
  col: number;
}

/** One problem found in a user's file. */
export interface Diagnostic {
  loc: SourceLoc;
  /** key path inside the document, e.g. `lights[0].intensity[2].value` ('' for the document) */
  path: string;
  message: string;
}

export function formatDiagnostic(d: Diagnostic): string {
  const where = `${d.loc.file}:${d.loc.line}:${d.loc.col}`;
  return d.path ? `${where}: ${d.path}: ${d.message}` : `${where}: ${d.message}`;
}

/** Base of every error the program expects and reports without a stack. */
export class StraylightError extends Error {
  constructor(
    message: string,
    readonly exitCode: ExitCode,
  ) {
    super(message);
    this.name = new.target.name;
  }
}

/** An invalid shot (or track, or matte): every problem found, in file order. */
export class ShotError extends StraylightError {
  /** `outcome`: what did not happen, for the summary line (a render by default) */
  constructor(
    readonly diagnostics: Diagnostic[],
    readonly outcome = 'nothing was rendered',
  ) {
    super(diagnostics.map(formatDiagnostic).join('\n'), ExitCode.badInput);
  }
}

/** Bad input that is not located inside a file (a missing file, a bad --frames value). */
export class InputError extends StraylightError {
  constructor(message: string) {
    super(message, ExitCode.badInput);
  }
}

/** The output cannot be written at all (a folder that cannot be made); nothing was rendered. */
export class OutputError extends StraylightError {
  constructor(message: string) {
    super(message, ExitCode.framesFailed);
  }
}

export class UsageError extends StraylightError {
  constructor(message: string) {
    super(message, ExitCode.usage);
  }
}

/** A system tool the asked output needs is missing; checked before any work starts. */
export class ToolMissingError extends StraylightError {
  constructor(message: string) {
    super(message, ExitCode.toolMissing);
  }
}

/** Why a file could not be read, in plain words (never a system or library message). */
export function whyNotReadable(e: unknown): string {
  const err = e as NodeJS.ErrnoException;
  switch (err.code) {
    case 'ENOENT':
      return 'no such file';
    case 'EACCES':
    case 'EPERM':
      return 'permission denied';
    case 'EISDIR':
      return 'a folder, not a file';
    case 'ENOTDIR':
      return 'a part of the path is a file, not a folder';
    case 'EIO':
      return 'the device could not read it';
    case 'EFBIG':
      return err.message;
    case 'ELOOP':
      return 'a loop of symbolic links';
    case 'ENAMETOOLONG':
      return 'the name is too long';
    default:
      return err.code ? `the system refused it (${err.code})` : 'it cannot be read';
  }
}
