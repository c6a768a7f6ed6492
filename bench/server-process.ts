import { type ChildProcess, execFileSync, spawn } from 'node:child_process';
import { readFileSync } from 'node:fs';

/**
 * How the service runs in a load script. `npm-start`: as `npm start` runs it (the built dist/, built first when a
 * source changed; every default of an empty environment: worker pool, load shedding, deadlines, pino at info), with
 * one exception, the rate limit raised to 10 000 000 a minute, so that it is on and pays its cost per request but
 * never answers one load generator's address 429. `relaxed` (the earlier bench setting, from the TypeScript
 * sources): rate limit, shedding and workers off, pino at warn.
 */
export type ServiceSetting = 'npm-start' | 'relaxed';

const SETTINGS: Record<ServiceSetting, Record<string, string>> = {
  'npm-start': { RATE_LIMIT_PER_MINUTE: '10000000' },
  relaxed: { LOG_LEVEL: 'warn', RATE_LIMIT_PER_MINUTE: '0', WORKERS: '0', MAX_EVENT_LOOP_DELAY_MS: '0' },
};

/** The node arguments of `npm start` (package.json's start script: `node [flags] dist/services/server.js`). */
const startArgs = (JSON.parse(readFileSync('package.json', 'utf8')) as { scripts: { start: string } }).scripts.start
  .trim()
  .split(/\s+/)
  .slice(1);

/**
 * The service (or another entry, e.g. bench/bare-server.ts, from its TypeScript source) in its own process group,
 * for load scripts; resolves when it is ready.
 */
export async function startServer(
  port: number,
  entry = 'services/server.ts',
  extraEnv: Record<string, string> = {},
  setting: ServiceSetting = 'npm-start',
): Promise<{ stop: () => void; child: ChildProcess }> {
  const service = entry === 'services/server.ts';
  const built = service && setting === 'npm-start';
  if (built) execFileSync('node', ['scripts/build.mjs', '--if-stale'], { stdio: 'ignore' });
  const child = spawn(built ? 'node' : 'npx', built ? startArgs : ['tsx', entry], {
    env: {
      ...process.env,
      ...(service ? SETTINGS[setting] : {}),
      ...extraEnv,
      PORT: String(port),
      HOST: '127.0.0.1',
    },
    stdio: 'ignore',
    detached: true,
  });
  const stop = () => {
    if (child.pid) process.kill(-child.pid, 'SIGTERM');
  };
  for (let i = 0; i < 100; i++) {
    try {
      if ((await fetch(`http://127.0.0.1:${port}${service ? '/readyz' : '/healthz'}`)).ok) return { stop, child };
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  stop();
  throw new Error(`the server on port ${port} did not become ready`);
}
