#!/usr/bin/env node
/**
 * npm run build: compile src/, services/ and cli/ into dist/ (tsc -p tsconfig.build.json), make the CLI executable
 * and stamp the build. With --if-stale (npm start), nothing is compiled when dist/ is newer than every source file,
 * tsconfig and the lockfile, so that `npm start` right after `npm ci` (which built once already) starts at once.
 */
import { execFileSync } from 'node:child_process';
import { chmodSync, existsSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

const STAMP = 'dist/.build-stamp';
const SOURCES = ['src', 'services', 'cli'];
const FILES = ['tsconfig.json', 'tsconfig.build.json', 'package-lock.json'];

/** Newest modification time (ms) of the TypeScript sources and the build settings, and the file it belongs to. */
function newestSource() {
  let newest = { time: 0, file: '' };
  const visit = (path) => {
    const st = statSync(path);
    if (st.isDirectory()) {
      for (const name of readdirSync(path)) visit(join(path, name));
    } else if ((/\.(ts|json|html|css)$/.test(path) || FILES.includes(path)) && st.mtimeMs > newest.time) {
      newest = { time: st.mtimeMs, file: path };
    }
  };
  for (const dir of SOURCES) if (existsSync(dir)) visit(dir);
  for (const file of FILES) if (existsSync(file)) visit(file);
  return newest;
}

const ifStale = process.argv.includes('--if-stale');
// --dry-run: say what would be done and stop (for tests).
const dryRun = process.argv.includes('--dry-run');
if (ifStale) {
  if (existsSync(STAMP)) {
    const built = statSync(STAMP).mtimeMs;
    const newest = newestSource();
    if (newest.time <= built) {
      console.log('dist/ is up to date: not rebuilding');
      process.exit(0);
    }
    console.log(`${newest.file} changed since the last build: rebuilding dist/`);
  } else console.log('no build yet: building dist/');
}
if (dryRun) process.exit(0);
const started = Date.now();
execFileSync(process.execPath, ['node_modules/typescript/bin/tsc', '-p', 'tsconfig.build.json'], { stdio: 'inherit' });
if (existsSync('dist/cli/branchwise.js')) chmodSync('dist/cli/branchwise.js', 0o755);
writeFileSync(STAMP, `${new Date().toISOString()}\n`);
console.log(`built dist/ in ${((Date.now() - started) / 1000).toFixed(1)} s`);
