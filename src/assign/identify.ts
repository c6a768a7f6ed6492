import { libraryEntries } from '../species/library.js';
import { elementsOnly, parseSpecies } from '../species/parse.js';
import { type CandidateOptions, candidateLines, isotopologuesMeant } from './candidates.js';
import { matchLines } from './match.js';
import { estimateOffset } from './offset.js';

export interface IdentificationCandidate {
  /** The molecule as a natural mixture, named by its most abundant isotopologue. */
  readonly species: string;
  readonly name: string;
  /** 0 … 1: share of the strong predicted lines found × share of the strong observed lines explained. */
  readonly score: number;
  readonly matched: number;
  readonly predicted: number;
  readonly offset: number;
}

/**
 * Rank the library's molecules by how well their predicted spectrum (natural isotopic mixture, reference
 * constants) explains the strong observed lines, after each one's own offset estimate. No fit is made: this only
 * chooses what to assign against.
 */
export function identifySpecies(
  peaks: readonly { position: number; intensity?: number }[],
  options: CandidateOptions & { maxOffset?: number } = {},
): IdentificationCandidate[] {
  const positions = peaks.map((p) => p.position);
  const lo = Math.min(...positions) - 1;
  const hi = Math.max(...positions) + 1;
  const withIntensity = peaks.every((p) => p.intensity !== undefined);
  const strongObserved = peaks
    .map((p, index) => ({ index, position: p.position, intensity: p.intensity ?? 1 }))
    .sort((a, b) => b.intensity - a.intensity)
    .slice(0, withIntensity ? Math.max(10, Math.ceil(peaks.length / 2)) : peaks.length);
  // Each pair of elements once as its natural mixture; a parent that is not the most abundant isotopologue of its
  // elements (DCl, DF) as itself, for isotopically enriched samples.
  const seen = new Set<string>();
  const tests: { formula: string; name: string; mixture: ReturnType<typeof isotopologuesMeant> }[] = [];
  for (const e of libraryEntries().filter((x) => !x.derivedFrom)) {
    const iso = parseSpecies(e.formula);
    const natural = isotopologuesMeant(elementsOnly(iso), options.minAbundance ?? 1e-3);
    if (natural[0]?.iso.formula === e.formula) {
      const elements = `${iso.atoms[0].element.symbol}-${iso.atoms[1].element.symbol}`;
      if (seen.has(elements)) continue;
      seen.add(elements);
      tests.push({ formula: e.formula, name: e.name, mixture: natural });
    } else {
      tests.push({ formula: e.formula, name: e.name, mixture: [{ iso, abundance: 1 }] });
    }
  }
  const out: IdentificationCandidate[] = [];
  for (const { formula, name, mixture } of tests) {
    const e = { formula, name };
    const cands = candidateLines(mixture, lo, hi, options)
      .filter((c) => c.j <= 12)
      .sort((a, b) => b.intensity - a.intensity)
      .slice(0, 60);
    if (cands.length < 3) {
      out.push({ species: e.formula, name: e.name, score: 0, matched: 0, predicted: cands.length, offset: 0 });
      continue;
    }
    const est = estimateOffset(
      cands,
      strongObserved.map((p) => p.position),
      options.maxOffset ?? 0.5,
      0.06,
    );
    const offset = est?.offset ?? 0;
    const tol = Math.min(Math.max(4 * (est?.spread ?? 0.05), 0.03), 0.3);
    const { matches } = matchLines(
      cands.map((c, i) => ({ key: String(i), position: c.position + offset, tolerance: tol })),
      strongObserved,
    );
    const predictedWeight = cands.reduce((s, c) => s + Math.sqrt(c.intensity), 0);
    const matchedWeight = matches.reduce(
      (s, m) => s + Math.sqrt((cands[Number(m.prediction.key)] as { intensity: number }).intensity),
      0,
    );
    // Share of the strong observed lines explained, out of as many as the predictions could explain at most.
    const observedShare = matches.length / Math.min(strongObserved.length, cands.length);
    out.push({
      species: e.formula,
      name: e.name,
      score: (matchedWeight / predictedWeight) * Math.min(1, observedShare / 0.5),
      matched: matches.length,
      predicted: cands.length,
      offset,
    });
  }
  return out.sort((a, b) => b.score - a.score);
}
