import { ScienceError } from '../errors.js';
import { type FitOptions, type FitResult, fitLineListDetailed, type Warning } from '../fit/fit-lines.js';
import type { Band } from '../models/transitions.js';
import { constantsFor } from '../species/library.js';
import { elementsOnly, type Isotopologue, parseSpecies } from '../species/parse.js';
import { type MassValue, reducedMass } from '../species/reduced-mass.js';
import { assignAndFit, type BandSummary, type Calibration, type PeakInput } from './assign-lines.js';
import { isotopologuesMeant } from './candidates.js';
import { type IdentificationCandidate, identifySpecies } from './identify.js';
import { assignByStructure } from './structure.js';

export interface AnalyseOptions {
  readonly fit?: FitOptions;
  /** Gas temperature in K for Boltzmann weights (default 296). */
  readonly temperature?: number;
  /** Largest instrument offset searched, cm⁻¹ (default 0.5). */
  readonly maxOffset?: number;
  /** Band to number when assigning from the band structure alone (default 1-0). */
  readonly structureBand?: Band;
  /** Lowest score (0 … 1) at which an identification is accepted. Default 0.5. */
  readonly minIdentificationScore?: number;
}

export interface AssignmentReport {
  /** given: every line came assigned; reference: predicted from the library; structure: band structure alone. */
  readonly method: 'given' | 'reference' | 'structure';
  readonly species: readonly string[];
  readonly identification?: readonly IdentificationCandidate[];
  readonly calibration?: Calibration;
  readonly bands: readonly BandSummary[];
  readonly unexplained: readonly number[];
}

export interface Analysis {
  readonly result: FitResult;
  readonly assignment: AssignmentReport;
  readonly notes: ReadonlyMap<number, string>;
}

/**
 * The whole path from a line list (assigned, partly assigned or bare) to constants: identify the species when
 * none is declared, assign what is unassigned (against the library, or from the band structure for a species it
 * cannot predict), then fit.
 */
export function analyseLineList(
  peaks: readonly PeakInput[],
  declared: Isotopologue | undefined,
  options: AnalyseOptions = {},
): Analysis {
  const masses = new Map<string, MassValue>();
  for (const p of peaks) {
    if (p.assignment && !masses.has(p.assignment.species))
      masses.set(p.assignment.species, reducedMass(parseSpecies(p.assignment.species)));
  }
  const unassigned = peaks.filter((p) => !p.assignment).length;
  if (unassigned === 0) {
    const fit = fitLineListDetailed(peaks, masses, options.fit ?? {});
    return {
      result: fit.result,
      assignment: { method: 'given', species: [...masses.keys()], bands: [], unexplained: [] },
      notes: new Map(),
    };
  }

  let species =
    declared ??
    (peaks.find((p) => p.assignment)?.assignment
      ? parseSpecies(peaks.find((p) => p.assignment)?.assignment?.species as string)
      : undefined);
  let identification: IdentificationCandidate[] | undefined;
  const extraWarnings: Warning[] = [];
  if (!species) {
    identification = identifySpecies(peaks, {
      ...(options.temperature ? { temperature: options.temperature } : {}),
      maxOffset: options.maxOffset ?? 0.5,
    });
    const best = identification[0];
    const min = options.minIdentificationScore ?? 0.5;
    if (!best || best.score < min) {
      throw new ScienceError(
        'SPECIES_UNIDENTIFIED',
        `no species of the reference library explains these lines (best: ${best ? `${best.species}, score ${best.score.toFixed(2)}` : 'none'}; needed ${min}); declare "species"`,
        {
          candidates: identification
            .slice(0, 5)
            .map((c) => ({ species: c.species, name: c.name, score: Number(c.score.toFixed(3)) })),
        },
      );
    }
    const runnerUp = identification[1];
    if (runnerUp && runnerUp.score > 0.8 * best.score) {
      extraWarnings.push({
        code: 'IDENTIFICATION_CLOSE',
        message: `identified as ${best.name} (score ${best.score.toFixed(2)}), but ${runnerUp.name} scores ${runnerUp.score.toFixed(2)}`,
      });
    }
    const iso = parseSpecies(best.species);
    // The natural mixture of the identified molecule.
    species = elementsOnly(iso);
  }

  const mixture = isotopologuesMeant(species, 1e-3);
  for (const m of mixture) if (!masses.has(m.iso.formula)) masses.set(m.iso.formula, reducedMass(m.iso));

  if (constantsFor(species)) {
    const r = assignAndFit(peaks, mixture, masses, {
      ...(options.temperature !== undefined ? { temperature: options.temperature } : {}),
      ...(options.maxOffset !== undefined ? { maxOffset: options.maxOffset } : {}),
      ...(options.fit ? { fit: options.fit } : {}),
    });
    const result = { ...r.fit.result, warnings: [...extraWarnings, ...r.warnings, ...r.fit.result.warnings] };
    return {
      result,
      assignment: {
        method: 'reference',
        species: mixture.map((m) => m.iso.formula),
        ...(identification ? { identification } : {}),
        ...(r.calibration ? { calibration: r.calibration } : {}),
        bands: r.bands,
        unexplained: r.unexplained,
      },
      notes: r.notes,
    };
  }

  // No reference constants for these elements: the band structure alone.
  const band = options.structureBand ?? { upper: 1, lower: 0 };
  const free = peaks.map((p, index) => ({ p, index })).filter((x) => !x.p.assignment);
  const s = assignByStructure(
    free.map((x) => x.p),
    species.formula,
    reducedMass(species),
    band,
  );
  if (!s) {
    throw new ScienceError(
      'FIT_NO_ASSIGNED_LINES',
      `${species.formula} has no reference constants, and no P/R band structure could be found in these lines`,
      { species: species.formula },
    );
  }
  const lines: PeakInput[] = peaks.map((p) => p);
  free.forEach((x, k) => {
    const t = s.assigned.get(k);
    if (t)
      lines[x.index] = {
        ...x.p,
        assignment: { species: species.formula, band, branch: t.branch, j: t.j, source: 'auto' },
      };
  });
  masses.set(species.formula, reducedMass(species));
  const fit = fitLineListDetailed(lines, masses, options.fit ?? {});
  const unexplained = lines.flatMap((l, i) => (l.assignment ? [] : [i]));
  const warnings: Warning[] = [
    {
      code: 'ASSIGNED_FROM_STRUCTURE',
      message: `${species.formula} is not in the reference library: lines were numbered from the band gap and the P/R progressions alone, as band ${band.upper}-${band.lower}; the numbering chosen fits with reduced χ² ${s.reducedChiSquare.toPrecision(3)}, the next best with ${s.alternatives[0]?.reducedChiSquare.toPrecision(3) ?? '–'}`,
    },
  ];
  if (unexplained.length > 0) {
    warnings.push({
      code: 'LINES_UNEXPLAINED',
      message: `${unexplained.length} line(s) belong to no progression found; they stay unassigned`,
      lines: unexplained,
    });
  }
  if (!free.every((x) => x.p.intensity !== undefined)) {
    warnings.push({
      code: 'NUMBERING_UNCERTAIN',
      message:
        'without intensities, a numbering that starts from a missing line fits the positions as well as the true one; the choice rests on the Kratzer relation alone: send intensities, or anchor a few lines with given assignments',
    });
  }
  return {
    result: { ...fit.result, warnings: [...warnings, ...fit.result.warnings] },
    assignment: {
      method: 'structure',
      species: [species.formula],
      bands: [
        { species: species.formula, band: `${band.upper}-${band.lower}`, predicted: 0, matched: s.assigned.size },
      ],
      unexplained,
    },
    notes: new Map(),
  };
}
