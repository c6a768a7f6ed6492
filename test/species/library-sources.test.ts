import { describe, expect, it } from 'vitest';
import { libraryEntries } from '../../src/species/library.js';

/**
 * Wording an auditor accepts: every library value names its table and edition, and a value flagged low-confidence
 * says in words what makes it so.
 */
describe('reference library sources', () => {
  const values = libraryEntries().flatMap((e) =>
    Object.entries(e.constants).map(([name, c]) => ({ formula: e.formula, name, ...c })),
  );

  it('cite the table and its edition for every value', () => {
    expect(values.length).toBeGreaterThan(50);
    for (const c of values) {
      const where = `${c.formula} ${c.name}`;
      // Huber & Herzberg 1979, Van Nostrand Reinhold, via the WebBook (NIST SRD 69); derived values cite their parent's.
      expect(c.source, where).toMatch(/Huber and G\. Herzberg|Huber & Herzberg/);
      expect(c.source, where).toMatch(/1979/);
      if (c.provenance !== 'derived' || /parent value/.test(c.source)) {
        expect(c.source, where).toMatch(/Van Nostrand Reinhold|derived here/);
      }
      expect(c.source, where).not.toMatch(/recalled, not read from the primary table/);
    }
  });

  it('say what makes a low-confidence value so', () => {
    const low = values.filter((c) => c.provenance === 'low-confidence');
    expect(low.length).toBeGreaterThan(0);
    for (const c of low)
      expect(`${c.source} ${c.note ?? ''}`, `${c.formula} ${c.name}`).toMatch(
        /Low confidence: no copy of the table was read|inconsistent|unverified|see the note/,
      );
  });

  it('mark as checked only values whose digits were read in a copy of the WebBook row', () => {
    const checked = values.filter((c) => /Checked digit for digit/.test(c.source) && c.provenance !== 'derived');
    // CO ω_e, ω_e x_e, B_e, α_e and H35Cl ω_e, ω_e x_e, B_e, α_e, D_e (the rows of the copy read on 2026-12-02).
    expect(checked.map((c) => `${c.formula} ${c.name}`).sort()).toEqual(
      [
        '12C-16O B_e',
        '12C-16O alpha_e',
        '12C-16O omega_e',
        '12C-16O omega_e_x_e',
        '1H-35Cl B_e',
        '1H-35Cl D_e',
        '1H-35Cl alpha_e',
        '1H-35Cl omega_e',
        '1H-35Cl omega_e_x_e',
      ].sort(),
    );
  });
});
