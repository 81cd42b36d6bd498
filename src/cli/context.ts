// What every command module gets: the streams it prints to, the abort signal, and a way to set
// the exit code without throwing. Only run.ts turns errors into exit codes.

export interface CliIO {
  stdout: (text: string) => void;
  stderr: (text: string) => void;
  stderrIsTTY: boolean;
  /** aborted on SIGINT/SIGTERM: renders stop between frames */
  signal?: AbortSignal;
}

export interface CommandContext {
  io: CliIO;
  /** the exit code the command ends with when it does not throw */
  setExit: (code: number) => void;
}
