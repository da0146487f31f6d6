import { describe, expect, it } from 'vitest';
import { makeGrid } from '../../server/numerics/grid.ts';
import { ArrivalTracker, FrontTracker, leftFrontKm, makeProbe, probeValue, rightFrontKm } from '../../server/analysis/trackers.ts';
import { expectAllClose } from '../helpers/close.ts';

/**
 * Ahead of a front, density decays exponentially (the linearised leading edge, e.g. u ∝ e^{−s*(x − ct)} for
 * Fisher–KPP; Fisher 1937). The trackers interpolate in log-density, so on an exact exponential profile they
 * are exact whatever the cell size — a closed-form check independent of any solver.
 */
describe('front and arrival trackers on an exact exponential leading edge', () => {
  const grid = makeGrid([0, 7.3, 20], 0.37, 4);
  const c = 1.3; // km/yr
  const s = 0.8; // 1/km
  const profile = (t: number) => Float64Array.from(grid.centersKm, (x) => Math.min(1, Math.exp(-s * (x - 2 - c * t))));
  const level = 0.01;

  it('right and left front positions are exact', () => {
    const u = profile(3);
    // u = level where −s(x − 2 − c t) = ln(level).
    expectAllClose(rightFrontKm(grid, u, level), 2 + c * 3 - Math.log(level) / s, { rtol: 1e-12 });
    const mirrored = Float64Array.from(u).reverse();
    const g2 = makeGrid([0, 12.7, 20], 0.37, 4);
    expect(g2.nCells).toBe(grid.nCells);
    expectAllClose(20 - leftFrontKm(g2, mirrored, level), 2 + c * 3 - Math.log(level) / s, { rtol: 1e-9 });
  });

  it('arrival times at sites anywhere inside a cell are exact up to the linear-in-time step interpolation', () => {
    const sites = [8.01, 9.5, 11.111, 13.9];
    const tracker = new ArrivalTracker(grid, sites, level);
    const front = new FrontTracker(grid, level);
    const dt = 0.001;
    let u = profile(0);
    tracker.initialize({ t: 0, tPrevious: 0, u, h: u });
    front.initialize({ t: 0, tPrevious: 0, u, h: u });
    for (let k = 1; k <= 12000; k++) {
      u = profile(k * dt);
      tracker.handle({ t: k * dt, tPrevious: (k - 1) * dt, u, h: u });
      front.handle({ t: k * dt, tPrevious: (k - 1) * dt, u, h: u });
    }
    const exact = sites.map((x) => (x - 2 + Math.log(level) / s) / c);
    // Linear interpolation in time of an exponential in t: error ≤ (s c dt)²/8 × e-folding time ≈ 1e-7 yr.
    expectAllClose(tracker.arrivalYears as number[], exact, { atol: 1e-6 });
    // Half a cell (0.18 km) at 1.3 km/yr would be 0.14 yr: the probe removes that error entirely here.
  });

  it('a site within half a cell of a habitat edge reads its own cell (density may jump at the edge)', () => {
    const p = makeProbe(grid, 7.29);
    expect(p.weight).toBe(0);
    expect(grid.segmentAtCells[p.cell]).toBe(0);
    const u = profile(2);
    expect(probeValue(p, u)).toBe(u[p.cell]);
    const inside = makeProbe(grid, 4);
    expect(inside.weight).toBeGreaterThan(0);
  });
});
