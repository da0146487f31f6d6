/**
 * Discretisation of a layout (server/problem/discretise.ts): habitat edges on faces, per-cell coefficients
 * from the habitat rules, the initial infestation as exact cell averages (partial overlap at its ends), and
 * one discretisation per distinct start (the cache key includes the infestation).
 */
import { describe, expect, it } from 'vitest';
import { buildProblem, deriveProblem, layoutOf } from '../../server/problem/problem.ts';
import { discretise } from '../../server/problem/discretise.ts';
import { habitatCoefficients } from '../../server/model/habitat.ts';
import { clearingSegment, hostSegment, testPest, testScenario } from '../helpers/scenario.ts';

const s = testScenario({
  pest: testPest({ growth: { form: 'logistic', rate: 1 }, diffusionOpen: 4, edgePreferenceOpen: 0.8, mortalityOpen: 2 }),
  transect: { segments: [hostSegment(3, 0.7), clearingSegment(0.4), hostSegment(2.6)] },
  infestation: { fromKm: 0.33, toKm: 1.07, density: 0.9 },
  horizonYears: 5,
});

describe('discretise', () => {
  const p = buildProblem(s);
  const d = discretise(p, layoutOf(p));
  const { grid } = d;
  it('every habitat edge is a face', () => {
    for (const x of [3, 3.4]) expect(Array.from(grid.facesKm).some((f) => Math.abs(f - x) < 1e-12)).toBe(true);
  });
  it('coefficients per cell follow the habitat rules (ρ = w/D)', () => {
    const open = habitatCoefficients(s.pest, 'clearing');
    const host = habitatCoefficients(s.pest, 'host-forest');
    for (let i = 0; i < grid.nCells; i++) {
      const c = grid.centersKm[i] > 3 && grid.centersKm[i] < 3.4 ? open : host;
      expect(d.diffusionAtCells[i]).toBe(c.diffusion);
      expect(d.residenceAtCells[i]).toBe(c.residence);
      expect(d.hostAtCells[i]).toBe(c.host ? 1 : 0);
    }
    expect(open.residence / host.residence).toBeCloseTo(((1 - 0.8) / 4) / (0.8 / 1), 14); // jump k (methods note §1.2)
  });
  it('the initial infestation is held exactly: ∫u0 dx = density × stocking × length', () => {
    let mass = 0;
    for (let i = 0; i < grid.nCells; i++) mass += d.u0[i] * grid.widthsKm[i];
    expect(mass).toBeCloseTo(0.9 * 0.7 * (1.07 - 0.33), 13);
  });
  it('a different start is a different discretisation; the same one is shared', () => {
    const moved = deriveProblem(p, { infestation: { fromKm: 5, toKm: 6, density: 1 } });
    const e = discretise(moved, layoutOf(p), d.resolution);
    expect(e).not.toBe(d);
    expect(e.grid.nCells).toBe(grid.nCells);
    expect(discretise(p, layoutOf(p), d.resolution)).toBe(d);
  });
});
