import { readFileSync } from 'node:fs';
import { Validator } from '@seriousme/openapi-schema-validator';
import { describe, expect, it } from 'vitest';
import { openapiDocument } from '../../services/tools/openapi-document.js';
import { useApp } from '../helpers/app.js';

const app = useApp();

describe('OpenAPI 3.1 document', () => {
  it('the committed openapi/openapi.json equals what the code generates (run `npm run openapi` after a change)', async () => {
    const committed = readFileSync('openapi/openapi.json', 'utf8');
    expect(committed).toBe(await openapiDocument());
  });
  it('is a valid OpenAPI 3.1 document (@seriousme/openapi-schema-validator)', async () => {
    const v = new Validator();
    const res = await v.validate(JSON.parse(readFileSync('openapi/openapi.json', 'utf8')));
    expect(res.errors ?? []).toEqual([]);
    expect(res.valid).toBe(true);
    expect(v.version).toBe('3.1');
  });
  it('is served at /openapi.json', async () => {
    const r = await app().inject({ method: 'GET', url: '/openapi.json' });
    expect(r.statusCode).toBe(200);
    expect(r.json().openapi).toBe('3.1.0');
    expect(Object.keys(r.json().paths)).toEqual(expect.arrayContaining(['/v1/fits', '/v1/species']));
  });
});
