import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

function files(dir: string): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f);
    return statSync(p).isDirectory() ? files(p) : p.endsWith('.ts') ? [p] : [];
  });
}

describe('layering', () => {
  it('src/ imports nothing from services/ and no network, validation, logging or I/O package', () => {
    const forbidden =
      /from\s+'(\.\.\/)+services|from\s+'(fastify|mercurius|zod|pino|graphql|node:fs|node:http|node:process|node:net)/;
    const offenders = files('src').filter((f) => forbidden.test(readFileSync(f, 'utf8')));
    expect(offenders).toEqual([]);
  });
  it('src/ uses no clock, environment or global random source', () => {
    const impure = /Date\.now|new Date\(|process\.env|Math\.random|performance\.now/;
    expect(files('src').filter((f) => impure.test(readFileSync(f, 'utf8')))).toEqual([]);
  });
});
