import { execFile, execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../services/app.js';
import { loadConfig } from '../../services/config.js';

/**
 * examples/python/branchwise_lab.py run against the live service (started with the `npm start` defaults), where
 * python3 with `requests` is installed; otherwise the test is skipped and says why.
 */
const python = (() => {
  try {
    const v = execFileSync(
      'python3',
      ['-c', 'import requests, sys; print(sys.version.split()[0], requests.__version__)'],
      {
        encoding: 'utf8',
        stdio: 'pipe',
      },
    );
    return { ok: true, why: `python ${v.trim().replace(' ', ', requests ')}` };
  } catch (e) {
    const msg = String((e as { stderr?: string }).stderr ?? (e as Error).message);
    return {
      ok: false,
      why: /No module named/.test(msg)
        ? 'skipped: python3 has no `requests` module'
        : 'skipped: no python3 on this machine',
    };
  }
})();

let app: FastifyInstance;
let base = '';
beforeAll(async () => {
  if (!python.ok) return;
  app = await buildApp({ config: loadConfig({ PORT: '0' }) });
  await app.listen({ host: '127.0.0.1', port: 0 });
  base = `http://127.0.0.1:${(app.server.address() as AddressInfo).port}`;
});
afterAll(async () => {
  await app?.close();
});

describe(`the Python example for lab scripts (${python.why})`, () => {
  it.skipIf(!python.ok)(
    'fits a list, checks a CSV, posts a JCAMP-DX file, streams a batch and saves the report',
    async () => {
      const out = mkdtempSync(join(tmpdir(), 'branchwise-python-'));
      const { stdout } = await promisify(execFile)(
        'python3',
        ['examples/python/branchwise_lab.py', '--base-url', base, '--out-dir', out],
        { env: { ...process.env, PYTHONDONTWRITEBYTECODE: '1' }, timeout: 120_000 },
      );
      const steps = stdout
        .trim()
        .split('\n')
        .map((l) => JSON.parse(l) as Record<string, unknown>);
      const step = (name: string) => steps.filter((s) => s.step === name);
      // CO 1-0 band origin 2143.27 cm-1 (Huber & Herzberg; from memory); the demo scan has 0.002 cm-1 noise.
      const [fit] = step('fit');
      expect(fit?.species).toBe('12C-16O');
      expect(Math.abs((fit?.origin as number) - 2143.27)).toBeLessThan(0.01);
      expect(step('check-csv')[0]?.verdict).toMatch(/^(pass|warn|fail)$/);
      const jcamp = step('fit-jcamp')[0];
      expect(jcamp?.lines).toBe(41);
      expect(Math.abs((jcamp?.origin as number) - (fit?.origin as number))).toBeLessThan(0.01);
      expect(step('batch').map((b) => [b.line, b.status])).toEqual([
        [1, 200],
        [2, 200],
        [3, 400],
      ]);
      expect(step('batch')[2]?.problem).toBe('VALIDATION_FAILED');
      const report = step('report')[0];
      expect(readFileSync(report?.path as string, 'utf8')).toMatch(/^<!doctype html>/i);
    },
    180_000,
  );
});
