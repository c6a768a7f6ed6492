import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { EXIT, main } from '../../cli/main.js';

function run(args: string[]) {
  let out = '';
  let err = '';
  const code = main(args, { out: (s) => (out += s), err: (s) => (err += s), isTty: false });
  return { code, out, err };
}

describe('branchwise potential', () => {
  it('prints the turning points and the Morse parameters of a library species', () => {
    const r = run(['potential', '--species', 'CO', '--vmax', '3']);
    expect(r.code).toBe(EXIT.pass);
    expect(r.out).toMatch(/r\+ \(Å\)/);
    expect(r.out.split('\n').filter((l) => /^\d\s/.test(l))).toHaveLength(4);
    expect(r.out).toMatch(/Morse: D_e/);
    expect(r.out).toMatch(/Refined curve .*worst \|Δ\(G_v − G_0\)\|/);
    expect(r.out.split('\n').filter((l) => /^ {2}v = \d: E_v/.test(l))).toHaveLength(4);
  });
  it('gives the REST shape with --format json and reads a JSON body', () => {
    const dir = mkdtempSync(join(tmpdir(), 'branchwise-potential-'));
    const file = join(dir, 'hcl.json');
    writeFileSync(file, JSON.stringify({ species: 'HCl', vMax: 2, verify: false }));
    const r = run(['potential', file, '--format', 'json']);
    expect(r.code).toBe(EXIT.pass);
    const j = JSON.parse(r.out);
    expect(j.levels).toHaveLength(3);
    expect(j.verification).toBeUndefined();
  });
  it('exits 3 with a message for refused or incomplete requests', () => {
    expect(run(['potential', '--species', 'HCl', '--vmax', '40']).code).toBe(EXIT.input);
    const r = run(['potential', '--species', 'CO']);
    expect(r.code).toBe(EXIT.input);
    expect(r.err).toMatch(/--vmax/);
  });
});
