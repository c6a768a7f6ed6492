import { renderReport } from '../report/html.js';
import type { CheckRequest } from '../schemas/checks.js';
import { runCheck } from './check.js';

/** POST /v1/reports: the checks, rendered as one self-contained HTML document. */
export function runReport(req: CheckRequest, now: Date = new Date()): string {
  return renderReport(
    runCheck(req),
    now
      .toISOString()
      .replace('T', ' ')
      .replace(/\.\d+Z$/, ' UTC'),
  );
}
