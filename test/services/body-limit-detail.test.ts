import { describe, expect, it } from 'vitest';
import { buildApp } from '../../services/app.js';
import { DEFAULT_CONFIG } from '../../services/config.js';
import { useApp } from '../helpers/app.js';
import { nextClient } from '../helpers/clients.js';

/**
 * A 413 says which limit the body broke, in bytes and by the name of its setting: /v1/predictions and /graphql take
 * SMALL_BODY_LIMIT (1 MiB by default), the work routes BODY_LIMIT (32 MiB). Before, every 413 said "Request body is
 * too large", and the problem type's page named BODY_LIMIT also where SMALL_BODY_LIMIT applied.
 */
const app = useApp();

describe('413 names its limit', () => {
  it('/v1/predictions past 1 MiB (defaults of npm start): the detail gives 1 MiB and SMALL_BODY_LIMIT', async () => {
    const r = await app().inject({
      method: 'POST',
      url: '/v1/predictions',
      payload: `{"species":"CO","jMax":3}${' '.repeat(1_100_000)}`,
      headers: { 'content-type': 'application/json' },
      remoteAddress: nextClient(),
    });
    expect(r.statusCode).toBe(413);
    expect(r.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(r.json().code).toBe('BODY_TOO_LARGE');
    expect(r.json().detail).toContain('1 MiB (1048576 bytes, SMALL_BODY_LIMIT)');
  });

  it('/v1/fits past a BODY_LIMIT of 2 MiB: the detail gives 2 MiB and BODY_LIMIT', async () => {
    const small = await buildApp({ config: { ...DEFAULT_CONFIG, bodyLimit: 2 * 1024 * 1024 } });
    try {
      const r = await small.inject({
        method: 'POST',
        url: '/v1/fits',
        payload: `{"species":"CO","lines":[]}${' '.repeat(2_200_000)}`,
        headers: { 'content-type': 'application/json' },
      });
      expect(r.statusCode).toBe(413);
      expect(r.json().detail).toContain('2 MiB (2097152 bytes, BODY_LIMIT)');
    } finally {
      await small.close();
    }
  });
});
