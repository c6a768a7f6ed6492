import { Agent, request } from 'node:http';
import { describe, expect, it } from 'vitest';
import { DEFAULT_CONFIG } from '../../services/config.js';
import { useListeningApp } from '../helpers/app.js';

/**
 * A body the service answers without reading (a content type no route takes) must not leave its connection
 * stuck: a client that keeps the connection alive, as Node's and most HTTP clients do, sends its next request on
 * it. Real sockets (inject has none); the defaults of `npm start`.
 */
const { port } = useListeningApp();

interface Answer {
  status: number;
  type: string;
  body: string;
}

/** One request on the agent's single connection; an error (or the agent's socket timing out) rejects. */
function send(agent: Agent, method: string, path: string, body?: Buffer, type?: string): Promise<Answer> {
  return new Promise((resolve, reject) => {
    const headers = body ? { 'content-type': type ?? 'application/json', 'content-length': body.length } : {};
    const r = request({ host: '127.0.0.1', port: port(), method, path, agent, headers }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () =>
        resolve({
          status: res.statusCode ?? 0,
          type: String(res.headers['content-type']),
          body: Buffer.concat(chunks).toString(),
        }),
      );
    });
    r.setTimeout(10_000, () => r.destroy(new Error(`no answer to ${method} ${path}`)));
    r.on('error', reject);
    r.end(body);
  });
}

describe('an unread body does not hold its keep-alive connection', () => {
  for (const size of [100_000, DEFAULT_CONFIG.offloadBytes + 1000, 2 * 1024 * 1024])
    it(`${size} bytes as text/plain: 415 problem, then the next request on the connection is answered`, async () => {
      const agent = new Agent({ keepAlive: true, maxSockets: 1 });
      try {
        const first = await send(agent, 'POST', '/v1/fits', Buffer.alloc(size, 0x20), 'text/plain');
        expect(first.status).toBe(415);
        expect(first.type).toMatch(/^application\/problem\+json/);
        const next = await send(agent, 'GET', '/healthz');
        expect(next.status).toBe(200);
        expect(JSON.parse(next.body).status).toBe('ok');
      } finally {
        agent.destroy();
      }
    });
});
