import { execFileSync, spawn } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { EXIT, main } from '../../cli/main.js';
import { fitExample, unassignedExample } from '../../services/openapi/examples.js';
import { parseCsv } from '../../src/spectra/csv.js';

/** The CLI as scripts use it: exit codes through pipes, several files, CSV, reports to files, versions. */
function run(args: string[]) {
  let out = '';
  let err = '';
  const code = main(args, { out: (s) => (out += s), err: (s) => (err += s), isTty: false });
  return { code, out, err };
}

const dir = mkdtempSync(join(tmpdir(), 'branchwise-cli-scripts-'));
const good = join(dir, 'co.json');
writeFileSync(good, JSON.stringify(fitExample));
const bad = join(dir, 'broken.json');
writeFileSync(bad, '{"lines": [');
const shifted = join(dir, 'shifted.json');
writeFileSync(
  shifted,
  JSON.stringify({
    ...unassignedExample,
    lines: unassignedExample.lines.map((l) => ({ ...l, position: l.position + 0.2 })),
  }),
);

/**
 * Run the real entry point (through tsx) in a shell pipeline into `head -c 100`, which closes the pipe after 100
 * bytes, and report the CLI's own exit status (bash's PIPESTATUS) and what it wrote to stderr.
 */
let runs = 0;
function closedPipe(args: string[]): Promise<{ code: number; stderr: string }> {
  const errFile = join(dir, `stderr-${runs++}.txt`);
  const quoted = args.map((a) => `'${a}'`).join(' ');
  const script = `node --import tsx cli/branchwise.ts ${quoted} 2>'${errFile}' | head -c 100 >/dev/null; echo "\${PIPESTATUS[0]}"`;
  return new Promise((resolve, reject) => {
    const child = spawn('bash', ['-c', script], { stdio: ['ignore', 'pipe', 'inherit'] });
    let out = '';
    child.stdout.on('data', (d) => (out += d));
    child.on('error', reject);
    child.on('close', () => resolve({ code: Number(out.trim()), stderr: readFileSync(errFile, 'utf8') }));
  });
}

describe('a CLI scripts can trust', () => {
  it('--version prints the package version and the reference library edition', () => {
    const r = run(['--version']);
    expect(r.code).toBe(EXIT.pass);
    const version = JSON.parse(readFileSync('package.json', 'utf8')).version;
    expect(r.out).toMatch(new RegExp(`^branchwise ${version.replaceAll('.', '\\.')} \\(reference library \\S+\\)\\n$`));
  });

  it('an unknown --format is a usage error, not a silent table', () => {
    const r = run(['fit', good, '--format', 'xml']);
    expect(r.code).toBe(EXIT.usage);
    expect(r.err).toMatch(/--format xml is not one of table, json, csv/);
    expect(r.out).toBe('');
  });

  it('--format csv gives the per-line table (read back by the CSV reader) or, with --table, the constants', () => {
    const r = run(['fit', good, '--format', 'csv']);
    expect(r.code).toBe(EXIT.pass);
    const back = parseCsv(r.out);
    expect(back.kind === 'lines' && back.lines.map((l) => l.position)).toEqual(fitExample.lines.map((l) => l.position));
    const c = run(['fit', good, '--format', 'csv', '--table', 'constants']);
    expect(c.out.split('\r\n')[0]).toBe('group,species,band or level,name,value,uncertainty,unit,display');
    expect(c.out).toMatch(/\r\nband,12C-16O,1-0,origin,2143\.\d+,/);
  });

  it('--table in the table form prints the table it names (each line with its status and reason), not the summary', () => {
    // One line 0.05 cm-1 (25 σ) off: the fit rejects it, and the lines table must show which line and why.
    const off = join(dir, 'one-off.json');
    writeFileSync(
      off,
      JSON.stringify({
        ...fitExample,
        lines: fitExample.lines.map((l, i) => ({
          ...l,
          id: `L${i}`,
          position: i === 3 ? l.position + 0.05 : l.position,
        })),
      }),
    );
    const r = run(['fit', off, '--table', 'lines']);
    expect(r.code).toBe(EXIT.pass);
    const rows = r.out.split('\n');
    expect(rows[1]).toMatch(
      /^index\s+id\s+species\s+band\s+branch\s+j\s+position \(cm-1\).*studentised residual\s+status/,
    );
    expect(rows.filter((l) => /^\d+\s+L\d+\s+12C-16O\s+1-0\s/.test(l))).toHaveLength(fitExample.lines.length);
    expect(rows.find((l) => /^3\s+L3\s/.test(l))).toMatch(/\srejected\s.*exceeds/);
    expect(r.out).not.toMatch(/species\s+level\s+B \(cm-1\)/);
    const c = run(['check', off, '--table', 'constants']);
    expect(c.out.split('\n')[1]).toMatch(
      /^group\s+species\s+band or level\s+name\s+value\s+uncertainty\s+unit\s+display$/,
    );
    expect(c.out).toMatch(/\nband\s+12C-16O\s+1-0\s+origin\s+2143\.\d+\s+\d/);
    expect(c.out).not.toMatch(/\nidentity\s+pass/);
  });

  it('one bad file in a multi-file run: the others keep their JSON, the bad one is named, exit 3', () => {
    const r = run(['fit', good, bad, good, '--format', 'json']);
    expect(r.code).toBe(EXIT.input);
    const results = JSON.parse(r.out) as {
      file: string;
      error?: { code: string; message: string };
      bands?: unknown[];
    }[];
    expect(results.map((x) => x.file)).toEqual([good, bad, good]);
    expect(results[0]?.bands).toHaveLength(1);
    expect(results[2]?.bands).toHaveLength(1);
    expect(results[1]?.error?.code).toBe('INVALID_JSON');
    expect(results[1]?.error?.message).toContain('broken.json');
    expect(r.err).toContain('broken.json');
  });

  it('fit shows band origins, rounded to their uncertainties', () => {
    const r = run(['fit', good]);
    expect(r.code).toBe(EXIT.pass);
    // e.g. "12C-16O  1-0   2143.2712 ± 0.0013": two significant digits in the uncertainty, the value to match.
    const m = /1-0\s+(2143\.(\d+)) ± 0\.(0*)(\d\d)\s/.exec(r.out);
    expect(m, r.out).not.toBeNull();
    expect(m?.[2]?.length).toBe((m?.[3]?.length ?? 0) + 2);
  });

  it('a bad --tolerances file is reported under its own name, whatever is wrong with it', () => {
    const missing = join(dir, 'no-such-profile.json');
    const notJson = join(dir, 'profile-not-json.json');
    writeFileSync(notJson, 'identityOrigin: 0.5');
    const wrong = join(dir, 'profile-wrong.json');
    writeFileSync(wrong, JSON.stringify({ identityOrigin: -1 }));
    for (const [profile, why] of [
      [missing, /no such file/],
      [notJson, /not valid JSON/],
      [wrong, /not a tolerance profile: identityOrigin/],
    ] as const) {
      const r = run(['check', good, '--tolerances', profile]);
      expect(r.code).toBe(EXIT.input);
      expect(r.err).toContain(profile);
      expect(r.err).toMatch(why);
      expect(r.err).not.toContain(good);
    }
  });

  it('report --out writes the HTML report to the file and exits with the verdict', () => {
    const out = join(dir, 'report.html');
    const r = run(['report', shifted, '--out', out]);
    expect(r.code).toBe(EXIT.fail);
    expect(r.out).toBe('');
    const html = readFileSync(out, 'utf8');
    expect(html).toMatch(/^<!doctype html>/i);
    expect(html).toMatch(/class="verdict fail"/);
    // Tied to its input: the SHA-256 of the file's bytes and the software version are printed.
    expect(html).toContain(createHash('sha256').update(readFileSync(shifted)).digest('hex'));
    expect(html).toMatch(/Software<\/th><td>branchwise \d+\.\d+\.\d+/);
  });

  it('a closed pipe (`… | head`) ends quietly with the verdict status, not a crash with 1', async () => {
    // Six fits as JSON are about 200 kB, far more than a pipe buffer, so the writer meets the closed pipe.
    const pass = await closedPipe(['fit', good, good, good, good, good, good, '--format', 'json']);
    expect(pass.stderr).not.toMatch(/Error|EPIPE/);
    expect(pass.code).toBe(EXIT.pass);
    const fail = await closedPipe(['check', shifted, shifted, shifted, shifted, shifted, shifted, '--format', 'json']);
    expect(fail.stderr).not.toMatch(/Error|EPIPE/);
    expect(fail.code).toBe(EXIT.fail);
  }, 60_000);

  it('runs as the package bin through npm exec (what npx does), from the tree `npm ci` builds', () => {
    const pkg = JSON.parse(readFileSync('package.json', 'utf8'));
    expect(pkg.bin.branchwise).toBe('dist/cli/branchwise.js');
    expect(readFileSync('cli/branchwise.ts', 'utf8').startsWith('#!/usr/bin/env node\n')).toBe(true);
    const out = execFileSync('npm', ['exec', '--no', '--', 'branchwise', '--version'], { encoding: 'utf8' });
    expect(out).toMatch(new RegExp(`^branchwise ${pkg.version.replaceAll('.', '\\.')} `));
  }, 60_000);
});
