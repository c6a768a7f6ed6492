import { mkdirSync, writeFileSync } from 'node:fs';
import { openapiDocument } from './openapi-document.js';

/** npm run openapi: regenerate openapi/openapi.json from the zod schemas. */
mkdirSync('openapi', { recursive: true });
writeFileSync('openapi/openapi.json', await openapiDocument());
console.log('wrote openapi/openapi.json');
