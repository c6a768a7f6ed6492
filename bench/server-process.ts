import { type ChildProcess, spawn } from 'node:child_process';

/** The service in its own process from the TypeScript sources, for load scripts; resolves when it is ready. */
export async function startServer(
  port: number,
  entry = 'services/server.ts',
  extraEnv: Record<string, string> = {},
): Promise<{ stop: () => void; child: ChildProcess }> {
  const child = spawn('npx', ['tsx', entry], {
    env: {
      ...process.env,
      ...extraEnv,
      PORT: String(port),
      HOST: '127.0.0.1',
      LOG_LEVEL: 'warn',
      RATE_LIMIT_PER_MINUTE: '0',
      WORKERS: '0',
      MAX_EVENT_LOOP_DELAY_MS: '0',
    },
    stdio: 'ignore',
    detached: true,
  });
  const stop = () => {
    if (child.pid) process.kill(-child.pid, 'SIGTERM');
  };
  for (let i = 0; i < 100; i++) {
    try {
      if ((await fetch(`http://127.0.0.1:${port}${entry === 'services/server.ts' ? '/readyz' : '/healthz'}`)).ok)
        return { stop, child };
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  stop();
  throw new Error(`the server on port ${port} did not become ready`);
}
