import type { Provenance } from '../provenance.js';
import { type ReportSection, renderReport } from '../report/html.js';
import { potentialSection } from '../report/potential-section.js';
import type { CheckRequest } from '../schemas/checks.js';
import { runCheck } from './check.js';
import { potentialOfFit } from './potential.js';

export interface ReportOptions {
  /** Software versions and the digest of the request body, printed in the report's header. */
  readonly provenance?: Provenance;
  /** Sections added after the standard ones (e.g. a potential curve), in order. */
  readonly extraSections?: readonly ReportSection[];
  readonly now?: Date;
}

/** POST /v1/reports: the checks, rendered as one self-contained HTML document. */
export function runReport(req: CheckRequest, options: ReportOptions = {}): string {
  const now = options.now ?? new Date();
  const check = runCheck(req);
  // A potential plot when the fit determined two or more vibrational intervals (ω_e x_e).
  const potential = check.fit ? potentialOfFit(check.fit) : undefined;
  return renderReport(check, {
    generatedAt: now
      .toISOString()
      .replace('T', ' ')
      .replace(/\.\d+Z$/, ' UTC'),
    ...(req.sample ? { sample: req.sample } : {}),
    ...(options.provenance ? { provenance: options.provenance } : {}),
    ...(req.spectrum ? { spectrum: req.spectrum } : {}),
    ...(req.lines ? { inputLines: req.lines } : {}),
    ...(req.unit ? { unit: req.unit } : {}),
    extraSections: [...(options.extraSections ?? []), ...(potential ? [potentialSection(potential)] : [])],
  });
}
