/**
 * The crossing and approach watches and their levels: the probe distance ℓ·ln(θ/level) + 2·√(D/r) worked out
 * from the cubic's closed-form potential, and the watches fed hand-made states on a hand-made grid.
 */
import { describe, expect, it } from 'vitest';
import { approachCells, crossingProbeKm, CrossingWatch, establishedLevels, isPresent, smallestStocking, windowAheadKm, WINDOW_LEVEL } from '../../../server/analysis/run/watches.ts';
import { geometryBetween } from '../../../server/problem/geometry.ts';
import type { TransectProblem } from '../../../server/problem/problem.ts';
import { clearingSegment, hostSegment, testPest, testScenario } from '../../helpers/scenario.ts';
import { piecewiseGrid } from '../../helpers/solve.ts';
import { expectAllClose } from '../../helpers/close.ts';

// Cubic Allee u·g = r u (h − u)(u − a h) with r = 4, a = 0.2, D = 1 (invented test pest).
const r = 4;
const a = 0.2;
const s = testScenario({
  pest: testPest({ growth: { form: 'allee-cubic', rate: r, alleeThreshold: a }, diffusionHost: 1 }),
  transect: { originKm: 0, segments: [hostSegment(10, 1), clearingSegment(1), hostSegment(10, 0.8)] },
  infestation: { fromKm: 0, toKm: 2, density: 1 },
  detectionLevel: 0.01,
  horizonYears: 5,
});
// Zero of F(u) = r(−u⁴/4 + (1+a)u³/3 − a u²/2) above a at h = 1: 3θ² − 4(1+a)θ + 6a = 0,
// θ = (2(1+a) − √(4(1+a)² − 18a))/3 = (2.4 − √2.16)/3 = 0.310102…
const theta = (2 * (1 + a) - Math.sqrt(4 * (1 + a) ** 2 - 18 * a)) / 3;

describe('levels and distances', () => {
  it('smallest stocking over host segments (the clearing has none)', () => {
    expect(smallestStocking(s)).toBe(0.8);
  });
  it('crossing probe: fringe length at the lowest stocking × ln(θ/level) + two movement lengths', () => {
    // g(0) at h = 0.8 is −r a h² = −0.512 → ℓ = √(1/0.512); movement length √(1/4) = 0.5.
    const lf = Math.sqrt(1 / (r * a * 0.8 * 0.8));
    expectAllClose(crossingProbeKm(s), lf * Math.log(theta / 0.01) + 1, { rtol: 1e-9 });
    expectAllClose(crossingProbeKm(s, theta * 2), lf * 0 + 1, { rtol: 1e-9 }); // level above θ: ratio clipped to 1
    expectAllClose(windowAheadKm(s), 2 * (lf * Math.log(theta / WINDOW_LEVEL) + 1) + 1, { rtol: 1e-9 });
  });
});

/** A fake discretised layout: host (stocking 1) on [0, 4], clearing [4, 5], host (0.8) on [5, 8]; 1 km cells. */
const grid = piecewiseGrid([0, 4, 5, 8], [4, 1, 3]);
const problem = {
  grid,
  hostAtCells: Uint8Array.of(1, 1, 1, 1, 0, 1, 1, 1),
  stockingAtCells: Float64Array.of(1, 1, 1, 1, 0, 0.8, 0.8, 0.8),
} as unknown as TransectProblem;

describe('establishedLevels', () => {
  it('halfway between θ(h) and the capacity h in host cells, Infinity elsewhere', () => {
    const lv = establishedLevels(s, problem);
    expectAllClose(lv[0], 0.5 * (theta + 1), { rtol: 1e-9 });
    expect(lv[4]).toBe(Infinity);
    // At h = 0.8 every root scales with h: θ(0.8) = 0.8 θ(1), capacity 0.8.
    expectAllClose(lv[6], 0.5 * (0.8 * theta + 0.8), { rtol: 1e-9 });
  });
});

describe('CrossingWatch', () => {
  const g = geometryBetween(4, 5);
  const levels = establishedLevels(s, problem);
  const state = (t: number, u: number[]) => ({ t, tPrevious: t, u: Float64Array.from(u), h: new Float64Array(8) });
  it('fires at the first state with a host cell beyond the far edge at its established level, and may stop the run', () => {
    const w = new CrossingWatch(grid, g, levels, true, 100, 0.01); // probe outside the grid: cells only
    w.initialize(state(0, [1, 1, 0, 0, 0, 0, 0, 0]));
    expect(w.crossedYears).toBeNull();
    expect(w.handle(state(1, [1, 1, 1, 1, 0, 0.99 * levels[5], 0, 0]))).toBe(false);
    expect(w.handle(state(2, [1, 1, 1, 1, 0, levels[5], 0, 0]))).toBe(true);
    expect(w.crossedYears).toBe(2);
    expect(w.handle(state(3, [0, 0, 0, 0, 0, 0, 0, 0]))).toBe(true); // keeps the first time
    expect(w.crossedYears).toBe(2);
  });
  it('or the detection level reached at the probe (1.5 km beyond the far edge → cell 6)', () => {
    const w = new CrossingWatch(grid, g, levels, false, 1.5, 0.01);
    expect(w.handle(state(1, [1, 1, 1, 1, 0, 0, 0.009, 0]))).toBe(false);
    expect(w.handle(state(2, [1, 1, 1, 1, 0, 0, 0.01, 0]))).toBe(false); // not stopping
    expect(w.crossedYears).toBe(2);
  });
  it('with dense output, dates the crossing inside the step: the earliest root over the cells that crossed', () => {
    const w = new CrossingWatch(grid, g, levels, true, 100, 0.01);
    // Cell 5 rises linearly from 0 at t = 1 to 2·L at t = 2 (passes L at 1.5); cell 6 from 0 to 1.25·L' (passes at 1.8).
    const rise = (cell: number, top: number) => (t: number) => (cell === 5 ? 2 * levels[5] : cell === 6 ? top : 0) * (t - 1);
    const u = [1, 1, 1, 1, 0, 2 * levels[5], 1.25 * levels[6], 0];
    const densityAt = (cell: number, t: number) => rise(cell, 1.25 * levels[6])(t);
    expect(w.handle({ t: 2, tPrevious: 1, u: Float64Array.from(u), h: new Float64Array(8), densityAt })).toBe(true);
    expect(w.crossedYears).toBeCloseTo(1.5, 12);
  });
});

describe('approachCells and isPresent', () => {
  it('host cells within three movement lengths (1.5 km) before the near edge, at the Allee threshold a·h', () => {
    const app = approachCells(s, problem, geometryBetween(4, 5));
    expect(app.cells).toEqual([3, 2]); // 1 km cells: cells 3 and 2 (lengths 1 + 1 ≥ 1.5 after the second)
    expectAllClose(app.level, [a, a], { rtol: 1e-12 });
    expect(isPresent(app, Float64Array.of(0, 0, 0.19, 0.1, 0, 0, 0, 0))).toBe(false);
    expect(isPresent(app, Float64Array.of(0, 0, 0.2, 0, 0, 0, 0, 0))).toBe(true);
  });
  it('a leftward clearing looks to its right, skipping non-host cells', () => {
    const app = approachCells(s, problem, geometryBetween(5, 4));
    expect(app.cells).toEqual([5, 6]);
    expectAllClose(app.level, [a * 0.8, a * 0.8], { rtol: 1e-12 });
  });
});
