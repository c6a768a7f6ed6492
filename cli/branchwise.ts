#!/usr/bin/env node
import { main } from './main.js';

// A reader that closes the pipe early (`branchwise fit … | head`) is not an error: stop writing and leave with the
// status already decided (0 pass, 1 warn, 2 fail …), never with a stack trace or the 1 that would read as "warn".
for (const stream of [process.stdout, process.stderr]) {
  stream.on('error', (e: NodeJS.ErrnoException) => {
    if (e.code === 'EPIPE') process.exit(process.exitCode ?? 0);
    throw e;
  });
}

process.exitCode = main(process.argv.slice(2), {
  out: (s) => process.stdout.write(s),
  err: (s) => process.stderr.write(s),
  isTty: Boolean(process.stderr.isTTY),
});
