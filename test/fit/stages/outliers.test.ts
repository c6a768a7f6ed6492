import { describe, expect, it } from 'vitest';
import { type LevelSelection, selectLevelModel } from '../../../src/fit/level-selection.js';
import { type OutlierOptions, rejectOutliers } from '../../../src/fit/outliers.js';
import type { Observation } from '../../../src/models/linear-model.js';
import { CO_12_16 } from '../../helpers/independent-lines.js';
import { generated } from './observations-of.js';

// Stage 3 on its own: lines of the independent generator (¹²C¹⁶O, Huber & Herzberg constants from memory) with
// gross errors put in by hand. Computed inside `it` (mutation testing).

const options = (o: Partial<OutlierOptions> = {}): OutlierOptions => ({
  maxOrder: 5,
  mode: 'a-posteriori',
  termSignificance: 0.01,
  rejectionThreshold: 4,
  maxRejectedFraction: 0.2,
  ...o,
});

/** CO 1-0 and 2-0, σ = 0.001 cm⁻¹ stated, J″ ≤ jMax, and gross errors (cm⁻¹) added to the lines at `at`. */
function list(jMax: number, gross: ReadonlyMap<number, number>): Observation[] {
  const { obs } = generated({
    molecule: CO_12_16,
    bands: [
      { upper: 1, lower: 0, jMax },
      { upper: 2, lower: 0, jMax },
    ],
    sigma: 0.001,
    seed: 21,
  });
  return obs.map((o) => (gross.has(o.index) ? { ...o, position: o.position + (gross.get(o.index) as number) } : o));
}

const initialOf = (obs: readonly Observation[], maxOrder = 5): LevelSelection =>
  selectLevelModel(obs, maxOrder, 'a-posteriori', 0.01);

describe('rejectOutliers', () => {
  it('three gross errors (10–20σ) in 120 lines are rejected, and only they, with the threshold in the reason', () => {
    const gross = new Map([
      [5, 0.02],
      [40, -0.015],
      [90, 0.01],
    ]);
    const obs = list(29, gross);
    expect(obs).toHaveLength(118);
    const r = rejectOutliers(obs, initialOf(obs), options());
    expect([...r.rejected.keys()].sort((a, b) => a - b)).toEqual([5, 40, 90]);
    for (const why of r.rejected.values()) expect(why).toMatch(/^studentised residual -?\d+\.\d{2,} exceeds 4\.00+$/);
    expect(r.kept.map((o) => o.index)).toEqual(obs.filter((o) => !gross.has(o.index)).map((o) => o.index));
    // The level model is the one refitted to the kept lines.
    expect(r.level.fit.observations).toHaveLength(115);
    expect(r.level.fit.degreesOfFreedom).toBe(115 - r.level.fit.model.parameters.length);
  });

  it('a threshold below the floor is raised to Φ⁻¹(1 − 0.125/n): 3.23 for 202 lines (SciPy 1.17 norm.isf)', () => {
    // With the threshold 2 as asked, about 5 % of the good lines would go; the floor keeps them.
    const gross = new Map([
      [3, 0.03],
      [150, -0.02],
    ]);
    const obs = list(50, gross);
    expect(obs).toHaveLength(202);
    const r = rejectOutliers(obs, initialOf(obs), options({ rejectionThreshold: 2 }));
    expect([...r.rejected.keys()].sort((a, b) => a - b)).toEqual([3, 150]);
    for (const why of r.rejected.values()) expect(why).toMatch(/ exceeds 3\.23$/);
  });

  it('the budget caps the rejections (floor(fraction × lines)), the worst first', () => {
    const gross = new Map([
      [5, 0.02],
      [40, -0.05],
      [90, 0.01],
    ]);
    const obs = list(29, gross);
    // floor(0.02 × 118) = 2: the two largest errors go, the third stays.
    const r = rejectOutliers(obs, initialOf(obs), options({ maxRejectedFraction: 0.02 }));
    expect([...r.rejected.keys()].sort((a, b) => a - b)).toEqual([5, 40]);
    expect(r.kept).toHaveLength(116);
    // floor(0.01 × 118) = 1: only the worst.
    const one = rejectOutliers(obs, initialOf(obs), options({ maxRejectedFraction: 0.01 }));
    expect([...one.rejected.keys()]).toEqual([40]);
  });

  it('the budget holds across rounds: a second round takes only what the first left of it', () => {
    // The starting model was fitted to positions where lines 30 and 75 were still right; round 1 rejects the two
    // errors it sees (5, 40), round 2 sees 30 and 75 but the budget floor(0.03 × 118) = 3 leaves room for one.
    const gross = new Map([
      [5, 0.03],
      [40, -0.03],
      [30, 0.02],
      [75, -0.025],
    ]);
    const obs = list(29, gross);
    const provisional = obs.map((o) =>
      o.index === 30 || o.index === 75 ? { ...o, position: o.position - (gross.get(o.index) as number) } : o,
    );
    const r = rejectOutliers(obs, initialOf(provisional), options({ maxRejectedFraction: 0.03 }));
    expect([...r.rejected.keys()].sort((a, b) => a - b)).toEqual([5, 40, 75]);
  });

  it('the take-back is judged with the fit’s own scale: a 6σ line stays out when the stated σ are 3× too large', () => {
    // σ stated 0.003 for a scatter of 0.001 (s² ≈ 1/9); line 20 is off by 0.006 cm⁻¹: 6 of the scatter, 2 of its σ.
    const { obs } = generated({
      molecule: CO_12_16,
      bands: [
        { upper: 1, lower: 0, jMax: 29 },
        { upper: 2, lower: 0, jMax: 29 },
      ],
      sigma: 0.001,
      reportedSigmaFactor: 3,
      seed: 22,
    });
    const bad = obs.map((o) => (o.index === 20 ? { ...o, position: o.position + 0.006 } : o));
    const r = rejectOutliers(bad, initialOf(bad), options());
    expect([...r.rejected.keys()]).toEqual([20]);
  });

  it('a threshold of 0 turns rejection off: the lines and the level come back as they were', () => {
    const obs = list(20, new Map([[5, 0.05]]));
    const initial = initialOf(obs);
    const r = rejectOutliers(obs, initial, options({ rejectionThreshold: 0 }));
    expect(r.kept).toBe(obs);
    expect(r.level).toBe(initial);
    expect(r.rejected.size).toBe(0);
  });

  it('lines rejected under the starting model are taken back when the refitted model predicts them', () => {
    // The starting model was fitted to positions of five lines that were off by 20σ (as a provisional list may
    // be); the lines as given are right. Round 1 rejects them (and the one real gross error, line 60) from the
    // starting model's residuals; the refit of the rest predicts the five within the threshold, so they come
    // back, and line 60 stays out.
    const obs = list(29, new Map([[60, 0.03]]));
    const moved = new Set([2, 17, 33, 70, 101]);
    const provisional = obs.map((o) => (moved.has(o.index) ? { ...o, position: o.position + 0.02 } : o));
    const calls: number[] = [];
    const refit = (o: readonly Observation[]) => {
      calls.push(o.length);
      return initialOf(o);
    };
    const r = rejectOutliers(obs, initialOf(provisional), options(), refit);
    expect([...r.rejected.keys()]).toEqual([60]);
    expect(r.kept.map((o) => o.index)).toEqual(obs.filter((o) => o.index !== 60).map((o) => o.index));
    // Round 1 drops some of the six (114 lines left for this seed); the take-back refit sees all but line 60.
    expect(calls[0]).toBe(114);
    expect(calls.at(-1)).toBe(117);
    expect(r.level.fit.observations).toHaveLength(117);
  });

  it('rejection that would leave no more lines than parameters + 1 is undone', () => {
    // Six lines of 1-0 (R(0…2), P(1…3)) for T, B″, B′: dropping one leaves 5 > 4 lines, dropping two would not.
    const { obs } = generated({ molecule: CO_12_16, bands: [{ upper: 1, lower: 0, jMax: 3 }], sigma: 0.001, seed: 4 });
    const six = obs.filter((o) => o.lowerJ <= 3 && !(o.upperJ === 4)).slice(0, 5);
    expect(six).toHaveLength(5);
    const bad = six.map((o, i) => (i === 2 ? { ...o, position: o.position + 0.5 } : o));
    const initial = selectLevelModel(bad, 1, 'a-posteriori', 0.01);
    const r = rejectOutliers(bad, initial, options({ maxOrder: 1, maxRejectedFraction: 0.5, rejectionThreshold: 1 }));
    // Five lines, three parameters: removing any line leaves 4 = 3 + 1, so nothing is rejected.
    expect(r.rejected.size).toBe(0);
    expect(r.kept).toHaveLength(5);
  });
});
