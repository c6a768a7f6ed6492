import { readFileSync } from 'node:fs';
import { availableParallelism } from 'node:os';

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
  /** Largest accepted request body in bytes on the line-list and spectrum routes. Default 32 MiB. */
  readonly bodyLimit: number;
  /** Largest body on the small routes (predictions, GraphQL). Default 1 MiB. */
  readonly smallBodyLimit: number;
  /** Most lines in one fit request. Default 100 000. */
  readonly maxLines: number;
  /** Bearer API keys; empty: no authentication. From API_KEYS (comma-separated) and/or API_KEYS_FILE (one a line). */
  readonly apiKeys: readonly string[];
  /** Origins allowed by CORS; empty (the default): CORS closed. CORS_ORIGINS, comma-separated. */
  readonly corsOrigins: readonly string[];
  /** Requests per minute per API key (or per address without keys); 0 turns rate limiting off. Default 600. */
  readonly rateLimitPerMinute: number;
  /** Worker threads for large fits; 0 runs everything on the event loop. Default: cores − 1 (at least 1). */
  readonly workers: number;
  /** Requests with more lines (or spectra with more points / 100) than this go to the worker pool. Default 2 000. */
  readonly workerThreshold: number;
  /**
   * Threads (the calling one included) over which the pseudo-Voigt group fits of one spectrum of 200 000 points or
   * more are spread; 1: one thread. Default min(4, cores). PEAK_THREADS.
   */
  readonly peakThreads: number;
  /** Whole-request timeout in ms (0: none). Default 120 000. */
  readonly requestTimeoutMs: number;
  /** Event-loop delay in ms above which the service sheds load with 503 (0: off). Default 1 000. */
  readonly maxEventLoopDelayMs: number;
  /** Heap in bytes above which the service sheds load with 503 (0: off, the default). */
  readonly maxHeapUsedBytes: number;
  /** Resident set in bytes above which the service sheds load with 503 (0: off, the default). MAX_RSS_BYTES. */
  readonly maxRssBytes: number;
  /** Jobs waiting for a worker beyond which new work is refused with 503 + Retry-After (0: no bound). Default 16. */
  readonly maxQueue: number;
  /**
   * Sum of the estimated sizes (lines; a spectrum counts a hundredth of its points) of the jobs admitted at once,
   * running or queued; beyond it new work is refused with 503 + Retry-After, before its body is read when its
   * Content-Length tells (about 100 bytes a line). Default 150 000: one 100 000-line fit (≈ 700 MB at its peak)
   * and smaller work beside it. MAX_ACTIVE_LINES.
   */
  readonly maxActiveLines: number;
  /** Time a request's work may take once admitted, in ms; then it is stopped and answered 503 (0: none). Default 60 000. */
  readonly processingDeadlineMs: number;
  /**
   * Bodies of at least this many bytes on the work routes are parsed, validated and answered in a worker thread
   * (when WORKERS > 0); 0: always on the event loop. Default 262 144 (256 KiB). OFFLOAD_BYTES.
   */
  readonly offloadBytes: number;
  /** Largest point or row count of a JCAMP-DX or CSV body (checked before allocating). Default 5 000 000. */
  readonly maxPoints: number;
  /**
   * Which proxy hops to believe for the client address (rate limits, logs): "false" (default: the socket's
   * address), "true" (the left-most X-Forwarded-For), a hop count, or comma-separated addresses/CIDRs. TRUST_PROXY.
   * @see https://fastify.dev/docs/latest/Reference/Server/#trustproxy
   */
  readonly trustProxy: boolean | number | string[];
  /** Time given to in-flight work after SIGTERM before the process exits (status 1), in ms; 0: none. A second signal exits at once. Default 25 000 (below k8s terminationGracePeriodSeconds 35 and compose stop_grace_period 35 s). SHUTDOWN_GRACE_MS. */
  readonly shutdownGraceMs: number;
  /** Whether /metrics shows the Node.js version (nodejs_version_info). Default false. METRICS_RUNTIME_VERSION. */
  readonly metricsRuntimeVersion: boolean;
  /**
   * Check every REST response against its zod schema before sending it (VALIDATE_RESPONSES). Default false: the
   * schemas are checked by the tests, and a production request pays only for JSON.stringify.
   */
  readonly validateResponses: boolean;
}

function trustProxyFrom(raw: string | undefined): boolean | number | string[] {
  const v = (raw ?? '').trim();
  if (v === '' || v === 'false') return false;
  if (v === 'true') return true;
  if (/^\d+$/.test(v)) return Number(v);
  return list(v);
}

function boolFrom(env: NodeJS.ProcessEnv, name: string, fallback: boolean): boolean {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  if (raw === 'true' || raw === '1') return true;
  if (raw === 'false' || raw === '0') return false;
  throw new Error(`environment variable ${name}=${raw} must be true or false`);
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

const list = (raw: string | undefined) =>
  (raw ?? '')
    .split(/[,\n]/)
    .map((s) => s.trim())
    .filter((s) => s !== '' && !s.startsWith('#'));

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const keys = [...list(env.API_KEYS), ...(env.API_KEYS_FILE ? list(readFileSync(env.API_KEYS_FILE, 'utf8')) : [])];
  if (keys.some((k) => k.length < 16)) throw new Error('every API key must be at least 16 characters long');
  return {
    host: env.HOST || '127.0.0.1',
    port: intFrom(env, 'PORT', 8080, 0, 65535),
    logLevel: env.LOG_LEVEL || 'info',
    bodyLimit: intFrom(env, 'BODY_LIMIT', 32 * 1024 * 1024, 1024, 512 * 1024 * 1024),
    smallBodyLimit: intFrom(env, 'SMALL_BODY_LIMIT', 1024 * 1024, 1024, 64 * 1024 * 1024),
    maxLines: intFrom(env, 'MAX_LINES', 100_000, 1, 10_000_000),
    apiKeys: keys,
    corsOrigins: list(env.CORS_ORIGINS),
    rateLimitPerMinute: intFrom(env, 'RATE_LIMIT_PER_MINUTE', 600, 0, 10_000_000),
    workers: intFrom(env, 'WORKERS', Math.max(1, availableParallelism() - 1), 0, 256),
    workerThreshold: intFrom(env, 'WORKER_THRESHOLD', 2000, 1, 100_000_000),
    peakThreads: intFrom(env, 'PEAK_THREADS', Math.min(4, availableParallelism()), 1, 64),
    requestTimeoutMs: intFrom(env, 'REQUEST_TIMEOUT_MS', 120_000, 0, 3_600_000),
    maxEventLoopDelayMs: intFrom(env, 'MAX_EVENT_LOOP_DELAY_MS', 1000, 0, 600_000),
    maxHeapUsedBytes: intFrom(env, 'MAX_HEAP_USED_BYTES', 0, 0, Number.MAX_SAFE_INTEGER),
    maxRssBytes: intFrom(env, 'MAX_RSS_BYTES', 0, 0, Number.MAX_SAFE_INTEGER),
    maxQueue: intFrom(env, 'MAX_QUEUE', 16, 0, 100_000),
    maxActiveLines: intFrom(env, 'MAX_ACTIVE_LINES', 150_000, 1, 1_000_000_000),
    processingDeadlineMs: intFrom(env, 'PROCESSING_DEADLINE_MS', 60_000, 0, 3_600_000),
    offloadBytes: intFrom(env, 'OFFLOAD_BYTES', 256 * 1024, 0, 1024 * 1024 * 1024),
    maxPoints: intFrom(env, 'MAX_POINTS', 5_000_000, 8, 100_000_000),
    trustProxy: trustProxyFrom(env.TRUST_PROXY),
    shutdownGraceMs: intFrom(env, 'SHUTDOWN_GRACE_MS', 25_000, 0, 3_600_000),
    metricsRuntimeVersion: boolFrom(env, 'METRICS_RUNTIME_VERSION', false),
    validateResponses: boolFrom(env, 'VALIDATE_RESPONSES', false),
  };
}

/**
 * The defaults of `npm start` (an empty environment): what tests and tools get when they build the app without a
 * configuration. Protections stay on: rate limit, load shedding, worker pool, deadlines.
 */
export const DEFAULT_CONFIG: Config = loadConfig({});
