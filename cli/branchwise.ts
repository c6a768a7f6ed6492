#!/usr/bin/env node
import { main } from './main.js';

process.exitCode = main(process.argv.slice(2), {
  out: (s) => process.stdout.write(s),
  err: (s) => process.stderr.write(s),
  isTty: Boolean(process.stderr.isTTY),
});
