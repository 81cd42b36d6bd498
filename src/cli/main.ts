// Process entry: the only place that reads argv, installs signal handlers and sets the exit code.

import { run } from './run.js';

export function main(): void {
  const controller = new AbortController();
  let signals = 0;
  const onSignal = (sig: NodeJS.Signals) => {
    signals++;
    if (signals > 1) process.exit(130);
    process.stderr.write(`\n${sig}: finishing the frame in hand, then stopping (again to stop at once)\n`);
    controller.abort();
  };
  process.on('SIGINT', onSignal);
  process.on('SIGTERM', onSignal);
  run(process.argv.slice(2), {
    stdout: (s) => process.stdout.write(s),
    stderr: (s) => process.stderr.write(s),
    stderrIsTTY: Boolean(process.stderr.isTTY),
    signal: controller.signal,
  }).then(
    (code) => {
      process.exitCode = code;
    },
    (e) => {
      process.stderr.write(`straylight: internal error: ${(e as Error).stack ?? e}\n`);
      process.exitCode = 1;
    },
  );
}
