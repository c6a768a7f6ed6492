import { SAFETY_NOTICE } from './notice.js';

/** The document-level part of the OpenAPI 3.1 description. */
export const openapiInfo = {
  openapi: '3.1.0',
  info: {
    title: 'branchwise',
    version: '1.0.0',
    description: `Molecular constants from vibration–rotation and pure-rotation line lists of diatomic gases. ${SAFETY_NOTICE}`,
    license: { name: 'MIT', identifier: 'MIT' },
  },
  servers: [{ url: 'http://127.0.0.1:8080' }],
  tags: [
    { name: 'fits', description: 'Fit line lists to molecular constants' },
    { name: 'checks', description: 'QA verdicts and line predictions' },
    { name: 'spectra', description: 'Spectra to peak lists' },
    { name: 'batch', description: 'Archives as NDJSON streams' },
    { name: 'species', description: 'The reference library' },
  ],
};
