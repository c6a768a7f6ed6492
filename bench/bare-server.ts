/**
 * The floor for `npm run bench`: a bare fastify server (no plugins, default JSON parser) whose routes answer
 * precomputed bytes. Started in its own process like the real service; BARE_BODIES names a JSON file
 * { "<route>": "<response text>" }; each route parses the request body like any JSON route and answers the text.
 */
import { readFileSync } from 'node:fs';
import Fastify from 'fastify';

const bodies = JSON.parse(readFileSync(process.env.BARE_BODIES as string, 'utf8')) as Record<string, string>;
const app = Fastify({ logger: false, bodyLimit: 64 * 1024 * 1024 });
app.get('/healthz', async () => ({ status: 'ok' }));
for (const [route, text] of Object.entries(bodies)) {
  app.post(`/${route}`, async (_req, reply) => reply.type('application/json').send(text));
}
await app.listen({ host: '127.0.0.1', port: Number(process.env.PORT) });
