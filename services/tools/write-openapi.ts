import { mkdirSync, writeFileSync } from 'node:fs';
import { openapiDocument, openapiTypes } from './openapi-document.js';

/**
 * npm run openapi: regenerate openapi/openapi.json from the zod schemas, and openapi/types.d.ts (TypeScript types
 * of every path, for typed clients such as openapi-fetch) from that document.
 */
mkdirSync('openapi', { recursive: true });
const doc = await openapiDocument();
writeFileSync('openapi/openapi.json', doc);
writeFileSync('openapi/types.d.ts', await openapiTypes(JSON.parse(doc)));
console.log('wrote openapi/openapi.json and openapi/types.d.ts');
