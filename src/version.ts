// The release version, kept equal to package.json's (test/cli/run.test.ts checks). It is part of
// every sequence manifest's shot hash: bump it when a change alters rendered pixels, so resumed
// renders re-render instead of mixing old and new frames.
export const VERSION = '0.5.1';
