import client from 'prom-client';
import type { Config } from './config.js';

/**
 * Prometheus metrics with bounded labels: routes are the route templates (or "unmatched"), status as its class
 * (2xx …), fit kinds and verdicts from fixed sets. One registry per app, so that tests can build several.
 * @see https://github.com/siimon/prom-client
 */
export interface Metrics {
  readonly registry: client.Registry;
  readonly requestDuration: client.Histogram<'route' | 'method' | 'status'>;
  readonly fitDuration: client.Histogram<'kind'>;
  readonly fitLines: client.Histogram<'kind'>;
  readonly verdicts: client.Counter<'verdict'>;
}

export function createMetrics(config?: Pick<Config, 'metricsRuntimeVersion'>): Metrics {
  const registry = new client.Registry();
  client.collectDefaultMetrics({ register: registry, prefix: 'branchwise_' });
  // The runtime version helps an attacker more than an operator: shown only when configured.
  if (!config?.metricsRuntimeVersion) registry.removeSingleMetric('branchwise_nodejs_version_info');
  return {
    registry,
    requestDuration: new client.Histogram({
      name: 'branchwise_http_request_duration_seconds',
      help: 'HTTP request duration by route template, method and status class',
      labelNames: ['route', 'method', 'status'],
      buckets: [0.001, 0.005, 0.01, 0.05, 0.1, 0.5, 1, 5, 30],
      registers: [registry],
    }),
    fitDuration: new client.Histogram({
      name: 'branchwise_fit_duration_seconds',
      help: 'Time spent in the science for one request, by kind (fit, check, report, peaks)',
      labelNames: ['kind'],
      buckets: [0.001, 0.005, 0.01, 0.05, 0.1, 0.5, 1, 5, 30],
      registers: [registry],
    }),
    fitLines: new client.Histogram({
      name: 'branchwise_fit_lines',
      help: 'Lines per request (a spectrum counts a hundredth of its points), by kind',
      labelNames: ['kind'],
      buckets: [10, 50, 100, 500, 1000, 5000, 10000, 50000, 100000],
      registers: [registry],
    }),
    verdicts: new client.Counter({
      name: 'branchwise_check_verdicts_total',
      help: 'QA verdicts given',
      labelNames: ['verdict'],
      registers: [registry],
    }),
  };
}
