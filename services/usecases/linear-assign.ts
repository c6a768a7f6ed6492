import { assignLinearLines, type LinearAssignResult } from '../../src/linear/assign.js';
import type { LinearLineInput } from '../../src/linear/fit.js';

/**
 * Automatic assignment for the linear fit use case: when a request for a linear species sends no assignment at all,
 * the library's bands are assigned first (src/linear/assign.ts) and the fit runs on the lines so assigned. Lines
 * given with an assignment are never touched (an assignment on any line turns this off, as for diatomics a given
 * band does). Returns the lines with assignments filled in and the indices assigned automatically.
 */
export function withAutomaticLinearAssignment(
  species: string,
  lines: readonly LinearLineInput[],
  intensities: readonly (number | undefined)[],
  options: { readonly temperature?: number; readonly maxOffset?: number },
): { lines: LinearLineInput[]; automatic: ReadonlySet<number>; result?: LinearAssignResult } {
  if (lines.some((l) => l.assignment !== undefined)) return { lines: [...lines], automatic: new Set() };
  const result = assignLinearLines(
    species,
    lines.map((l, i) => ({
      position: l.position,
      ...(l.uncertainty !== undefined ? { uncertainty: l.uncertainty } : {}),
      ...(intensities[i] !== undefined ? { intensity: intensities[i] as number } : {}),
    })),
    {
      ...(options.temperature !== undefined ? { temperature: options.temperature } : {}),
      ...(options.maxOffset !== undefined ? { maxOffset: options.maxOffset } : {}),
    },
  );
  const automatic = new Set<number>();
  const out = lines.map((l, i) => {
    const a = result.lines[i]?.assignment;
    if (!a) return { ...l };
    automatic.add(i);
    return { ...l, assignment: a };
  });
  return { lines: out, automatic, result };
}
