/**
 * The one resolution policy (server/problem/resolution.ts): the automatic rule written out by hand for a
 * small scenario, user values overriding it, the cell count without a grid equal to the grid's, the
 * coarsened draw resolution, and the engine limits naming the field.
 */
import { describe, expect, it } from 'vitest';
import { buildProblem, layoutOf } from '../../server/problem/problem.ts';
import { MIN_CELLS_PER_PIECE, cellsOf, checkEngineLimits, chooseResolution, coarsenedProblem, mergedResolution } from '../../server/problem/resolution.ts';
import { makeGrid } from '../../server/numerics/grid.ts';
import { LimitError } from '../../server/model/errors.ts';
import { clearingSegment, hostSegment, testPest, testScenario } from '../helpers/scenario.ts';

const s = testScenario({
  pest: testPest({ growth: { form: 'logistic', rate: 0.5 }, diffusionHost: 2, diffusionOpen: 8, mortalityOpen: 4 }),
  transect: { segments: [hostSegment(6), clearingSegment(0.3), hostSegment(6)] },
  infestation: { fromKm: 0, toKm: 1, density: 1 },
  barrier: { lengthKm: 1, options: [{ name: 'cut', fromKm: 3, widthM: 200, cover: 'clearing' }] },
  horizonYears: 20,
});

describe('automatic resolution', () => {
  it('cell = shortest movement length / 10, step = min(0.05/r, 0.5/m) (own arithmetic of the documented rule)', () => {
    const p = buildProblem(s);
    const r = chooseResolution(p, layoutOf(p));
    // Movement lengths √(D_host/r) = 2 km and √(D_open/max(m, r)) = √2 km; rates r = 0.5, m = 4.
    expect(r.cellKm).toBeCloseTo(Math.SQRT2 / 10, 14);
    expect(r.stepYears).toBeCloseTo(Math.min(0.05 / 0.5, 0.5 / 4), 14);
    expect(r).toMatchObject({ autoCell: true, autoStep: true });
  });
  it('a layout without open ground is resolved on the host scale only', () => {
    const p = buildProblem({ ...s, transect: { ...s.transect, segments: [s.transect.segments[0]] } });
    expect(chooseResolution(p, layoutOf(p)).cellKm).toBeCloseTo(0.2, 14);
  });
  it('user values override the choice; merged resolution takes the finest over the layouts', () => {
    const p = buildProblem({ ...s, numerics: { cellM: 50 } });
    const r = mergedResolution(p, s.barrier!.options);
    expect(r.cellKm).toBe(0.05);
    expect(r.autoCell).toBe(false);
    expect(r.autoStep).toBe(true);
  });
  it('cellsOf counts what makeGrid makes', () => {
    const p = buildProblem(s);
    for (const pieces of [layoutOf(p), layoutOf(p, s.barrier!.options[0])]) {
      const r = chooseResolution(p, pieces);
      const grid = makeGrid([pieces[0].fromKm, ...pieces.map((q) => q.toKm)], r.cellKm, MIN_CELLS_PER_PIECE);
      expect(cellsOf(pieces, r)).toBe(grid.nCells);
    }
  });
});

describe('coarsened draws', () => {
  it('cells factor× the finest automatic choice; adaptive steps at factor² × the tolerance (1e-5 · 3² = 9e-5)', () => {
    const p = buildProblem(s);
    const fine = mergedResolution(p, s.barrier!.options);
    const c = coarsenedProblem(p, 3);
    expect(c.numerics.cellM).toBeCloseTo(3 * fine.cellKm * 1000, 9);
    expect(c.numerics.stepYears).toBeUndefined();
    expect(c.numerics.tolerance).toBeCloseTo(9e-5, 15);
    expect(mergedResolution(c, s.barrier!.options).tolerance).toBeCloseTo(9e-5, 15);
    expect(c.cache).toBe(p.cache);
    expect(coarsenedProblem(p, 1)).toBe(p);
  });
  it('values the user fixed are kept', () => {
    const c = coarsenedProblem(buildProblem({ ...s, numerics: { stepYears: 0.01 } }), 3);
    expect(c.numerics.stepYears).toBe(0.01);
    expect(c.numerics.tolerance).toBeUndefined();
  });
});

describe('engine limits', () => {
  const p = buildProblem(s);
  const pieces = layoutOf(p);
  it('too many cells names numerics.cellM and the limit', () => {
    const r = { cellKm: 1e-5, stepYears: 0.1, autoCell: false, autoStep: true };
    expect(() => checkEngineLimits(pieces, r, 20)).toThrow(LimitError);
    try {
      checkEngineLimits(pieces, r, 20);
    } catch (e) {
      expect((e as LimitError).problems[0]).toMatchObject({ path: 'numerics.cellM', value: 0.01 });
      expect((e as LimitError).problems[0].message).toMatch(/the limit is 200000/);
    }
  });
  it('too many steps names the horizon for an automatic step', () => {
    try {
      checkEngineLimits(pieces, { cellKm: 0.1, stepYears: 1e-6, autoCell: true, autoStep: true }, 20);
      expect.unreachable();
    } catch (e) {
      expect((e as LimitError).problems[0]).toMatchObject({ path: 'horizonYears', value: 20 });
    }
  });
});
