import type { FastifyInstance } from 'fastify';

/** Run a use case and record its duration and size in the metrics. */
export async function timed<T>(app: FastifyInstance, kind: string, size: number, f: () => Promise<T>): Promise<T> {
  const end = app.metrics.fitDuration.labels(kind).startTimer();
  app.metrics.fitLines.labels(kind).observe(size);
  try {
    return await f();
  } finally {
    end();
  }
}
