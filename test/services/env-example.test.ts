import { readFileSync } from 'node:fs';
import { parseEnv } from 'node:util';
import { describe, expect, it } from 'vitest';
import { loadConfig } from '../../services/config.js';

/** `.env.example` says that every value it shows is the default: a reader tunes the service from it. */
describe('.env.example', () => {
  const text = readFileSync('.env.example', 'utf8');
  const shown = parseEnv(text);
  it('shows the defaults of `npm start`: read as an environment, it gives the configuration of an empty one', () => {
    const { workers: _w, ...fromFile } = loadConfig({ ...shown, WORKERS: '1' });
    const { workers: _d, ...defaults } = loadConfig({ WORKERS: '1' });
    expect(fromFile).toEqual(defaults);
  });
  it('lists every variable the configuration reads', () => {
    const source = readFileSync('services/config.ts', 'utf8');
    const read = new Set([
      ...[...source.matchAll(/From\(env, '([A-Z_]+)'/g)].map((m) => m[1] as string),
      ...[...source.matchAll(/env\.([A-Z_]+)/g)].map((m) => m[1] as string),
    ]);
    expect(read.size).toBeGreaterThan(20);
    expect([...read].filter((name) => !(name in shown))).toEqual([]);
  });
  it('does not promise that a .env file is read (nothing loads one): it says how to pass it', () => {
    expect(text).toContain('--env-file=.env');
  });
});
