#!/usr/bin/env node
// Entry for `npx coilcue …`: runs the command line from prebuilt bundles of its TypeScript
// (server/prebuilt.cjs: made with esbuild on the first run after a source changed, ~0.4 s of CPU
// time less per command than compiling ~200 modules each time), or, where they cannot be made,
// through tsx (a runtime dependency), so a fresh `npm install` is all a user needs. tsx's CommonJS
// hook compiles in this thread; its ESM hooks would start a loader thread of their own (~28 MiB
// more resident memory, measured). A CommonJS entry also spares Node's ES module loader: 30–60 ms
// less to start (measured with `coilcue --help`).
//
// The guard: once the command has returned its exit code, stdout and stderr are flushed and the
// process exits with that code, so a handle some step leaked (a thread, a port, a timer) cannot keep
// it alive. With COILCUE_LEAK_CHECK=1 (the command-line tests set it) any handle still open 10 s after
// that point is named on stderr and the exit code becomes 1, so a leak fails a test instead of hiding.
// Ctrl-C exits 130 at once (worker threads end with the process; atomic writes leave no partial
// file under the output name).
'use strict';
/** The command line's main(), prebuilt where possible (its worker threads then load theirs). */
async function loadMain() {
  const dir = await require('../server/prebuilt.cjs').prebuilt();
  if (dir) {
    try {
      const m = require(require('node:path').join(dir, 'cli.cjs'));
      process.env.COILCUE_PREBUILT = dir;
      return m.main;
    } catch {
      // a damaged bundle: run the sources instead
    }
  }
  require('tsx/cjs/api').register();
  require('../server/typebox-bundle.cjs').install(); // TypeBox from one file (the file says why)
  return require('../server/cli/main.ts').main;
}

const INTERRUPTED = 130;
process.once('SIGINT', () => {
  process.stderr.write('\ncoilcue: interrupted\n');
  process.exit(INTERRUPTED);
});

/** Resolves once everything written to `stream` so far has been handed to the OS. */
const flushed = (stream) => new Promise((resolve) => (stream.writableLength === 0 ? resolve() : stream.write('', () => resolve())));

/**
 * Handles that would keep the process alive (a thread, a port, a timer, a server, a child, a
 * watcher); one-shot requests still in flight (file-system requests, tsx's connection attempt to a
 * watch server, closes) end on their own and are not counted, nor is the process's own stdio.
 */
function leakedHandles() {
  const lasting = new Set(['Worker', 'MessagePort', 'Timeout', 'Immediate', 'TCPServerWrap', 'PipeServerWrap', 'ProcessWrap', 'FSEventWrap', 'StatWatcher', 'UDPWrap', 'SignalWrap']);
  return process.getActiveResourcesInfo().filter((r) => lasting.has(r));
}

loadMain()
  .then((main) => main(process.argv.slice(2)))
  .catch((e) => {
    process.stderr.write(`coilcue: internal error: ${e instanceof Error ? e.message : String(e)} (this is a bug; please report it)\n`);
    return 1;
  })
  .then(async (code) => {
    let exit = code;
    if (process.env.COILCUE_LEAK_CHECK === '1') {
      // A thread being terminated when the command returned is closing, not leaked: give it 10 s
      // (generous: a shared, loaded machine); a real leak never closes.
      for (let i = 0; i < 100 && leakedHandles().length; i++) await new Promise((r) => setTimeout(r, 100));
      const leaked = leakedHandles();
      if (leaked.length) {
        process.stderr.write(`coilcue: handles left open after the command returned: ${leaked.join(', ')}\n`);
        exit = 1;
      }
    }
    await Promise.all([flushed(process.stdout), flushed(process.stderr)]);
    process.exit(exit);
  });
