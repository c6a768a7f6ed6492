import { buildApp } from '../app.js';

/** The OpenAPI document as the running code describes it, with stable key order for committing. */
export async function openapiDocument(): Promise<string> {
  const app = await buildApp();
  await app.ready();
  const doc = app.swagger();
  await app.close();
  return `${JSON.stringify(doc, null, 2)}\n`;
}
