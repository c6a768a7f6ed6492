import type { FastifyInstance } from 'fastify';

/**
 * Graceful shutdown: /readyz answers 503 at once (load balancers stop sending work), batches end at their next
 * line with a closing record that says where to resume, new requests on open connections get 503, in-flight
 * work finishes; then the process exits. If that takes longer than the grace period (SHUTDOWN_GRACE_MS, kept
 * below the orchestrator's own: terminationGracePeriodSeconds, stop_grace_period), the exit is forced.
 */
export function shutdownOnSignals(
  app: FastifyInstance,
  graceMs: number,
  exit: (code: number) => void = (code) => process.exit(code),
): (signal: string) => Promise<void> {
  let closing = false;
  return async (signal: string) => {
    if (closing) return exit(1); // a second signal forces the exit
    closing = true;
    app.appState.ready = false;
    app.log.info({ signal, graceMs }, 'shutting down');
    const timer = setTimeout(() => {
      app.log.warn({ graceMs }, 'in-flight work did not finish within the grace period; exiting');
      exit(1);
    }, graceMs);
    timer.unref();
    await app.close();
    clearTimeout(timer);
    exit(0);
  };
}
