import { readFileSync } from 'node:fs';
import { SAFETY_NOTICE } from './notice.js';

/** The package's own version, read from the nearest package.json above this module (source tree or dist/). */
function packageVersion(): string {
  for (const up of ['../package.json', '../../package.json']) {
    try {
      const p = JSON.parse(readFileSync(new URL(up, import.meta.url), 'utf8')) as { name?: string; version?: string };
      if (p.name === 'branchwise' && typeof p.version === 'string') return p.version;
    } catch {
      // not at this level
    }
  }
  return '0.0.0';
}

export const PACKAGE_VERSION = packageVersion();

/** The document-level part of the OpenAPI 3.1 description. */
export const openapiInfo = {
  openapi: '3.1.0',
  info: {
    title: 'branchwise',
    version: PACKAGE_VERSION,
    description: `Molecular constants from vibration–rotation and pure-rotation line lists of diatomic gases. ${SAFETY_NOTICE}`,
    license: { name: 'MIT', identifier: 'MIT' },
  },
  servers: [{ url: '/', description: 'this service (npm start listens on http://127.0.0.1:8080 by default)' }],
  tags: [
    { name: 'fits', description: 'Fit line lists to molecular constants' },
    { name: 'checks', description: 'QA verdicts and line predictions' },
    { name: 'spectra', description: 'Spectra to peak lists' },
    { name: 'batch', description: 'Archives as NDJSON streams' },
    { name: 'species', description: 'The reference library' },
  ],
};
