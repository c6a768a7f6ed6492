import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';

/**
 * `npm start` builds only what is stale: scripts/build.mjs --if-stale compares the build stamp with every source
 * file, tsconfig and the lockfile. Checked on a small tree of its own (--dry-run: the decision only, no compiler).
 */
const script = resolve('scripts/build.mjs');
const decide = (cwd: string) =>
  execFileSync(process.execPath, [script, '--if-stale', '--dry-run'], { cwd, encoding: 'utf8' }).trim();

describe('npm start builds only when something changed', () => {
  it('no stamp: builds; stamp newer than the sources: does nothing; a newer source or lockfile: rebuilds, naming it', () => {
    const dir = mkdtempSync(join(tmpdir(), 'branchwise-build-'));
    for (const d of ['src', 'services/rest', 'cli', 'dist']) mkdirSync(join(dir, d), { recursive: true });
    const files = [
      'src/a.ts',
      'services/rest/b.ts',
      'cli/c.ts',
      'tsconfig.json',
      'tsconfig.build.json',
      'package-lock.json',
    ];
    const t0 = new Date('2026-01-01T00:00:00Z');
    for (const f of files) {
      writeFileSync(join(dir, f), '');
      utimesSync(join(dir, f), t0, t0);
    }
    expect(decide(dir)).toBe('no build yet: building dist/');

    const stamp = join(dir, 'dist/.build-stamp');
    writeFileSync(stamp, '');
    const t1 = new Date('2026-01-02T00:00:00Z');
    utimesSync(stamp, t1, t1);
    expect(decide(dir)).toBe('dist/ is up to date: not rebuilding');

    const t2 = new Date('2026-01-03T00:00:00Z');
    utimesSync(join(dir, 'services/rest/b.ts'), t2, t2);
    expect(decide(dir)).toBe('services/rest/b.ts changed since the last build: rebuilding dist/');

    utimesSync(join(dir, 'services/rest/b.ts'), t0, t0);
    utimesSync(join(dir, 'package-lock.json'), t2, t2);
    expect(decide(dir)).toBe('package-lock.json changed since the last build: rebuilding dist/');
  });
});
