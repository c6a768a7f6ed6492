/**
 * Service configuration from the environment, read once at start-up. Every setting has a documented default;
 * see .env.example.
 */
export interface Config {
  /** Interface to listen on. Default 127.0.0.1 (the container sets 0.0.0.0). */
  readonly host: string;
  /** TCP port. Default 8080. */
  readonly port: number;
  /** pino log level. Default "info". */
  readonly logLevel: string;
  /** Largest accepted request body in bytes. Default 8 MiB. */
  readonly bodyLimit: number;
  /** Most lines in one fit request. Default 100 000. */
  readonly maxLines: number;
}

function intFrom(env: NodeJS.ProcessEnv, name: string, fallback: number, min: number, max: number): number {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < min || n > max) {
    throw new Error(`environment variable ${name}=${raw} must be a whole number from ${min} to ${max}`);
  }
  return n;
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  return {
    host: env.HOST || '127.0.0.1',
    port: intFrom(env, 'PORT', 8080, 0, 65535),
    logLevel: env.LOG_LEVEL || 'info',
    bodyLimit: intFrom(env, 'BODY_LIMIT', 8 * 1024 * 1024, 1024, 512 * 1024 * 1024),
    maxLines: intFrom(env, 'MAX_LINES', 100_000, 1, 10_000_000),
  };
}

/** Defaults for tests and tools that build the app without an environment. */
export const DEFAULT_CONFIG: Config = loadConfig({});
