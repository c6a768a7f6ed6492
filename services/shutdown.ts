import type { FastifyInstance } from 'fastify';

/**
 * Graceful shutdown: /readyz answers 503 at once (load balancers stop sending work), batches end at their next
 * line with a closing record that says where to resume, requests already on open connections are
 * served and their connections closed (no keep-alive), new connections are refused, in-flight
 * work finishes; then the process exits. If that takes longer than the grace period (SHUTDOWN_GRACE_MS, kept
 * below the orchestrator's own: terminationGracePeriodSeconds, stop_grace_period; 0: no wait), the exit is forced,
 * with status 1. A second signal forces it at once. No other timer bounds the shutdown.
 */
export function shutdownOnSignals(
  app: FastifyInstance,
  graceMs: number,
  exit: (code: number) => void = (code) => process.exit(code),
): (signal: string) => Promise<void> {
  let closing = false;
  return async (signal: string) => {
    if (closing) {
      // A second signal (an operator's second Ctrl-C, an orchestrator giving up) forces the exit at once.
      app.log.warn({ signal }, 'second signal during shutdown; exiting now');
      return exit(1);
    }
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
