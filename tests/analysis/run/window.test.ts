/**
 * Window runs (run/window-solver.ts, run/window.ts): remapping conserves the integral, a cut end reflects,
 * and a window over the whole transect continued from a run's state at t0 ends where the run itself ends
 * (same cells, same step, absolute times through the offset).
 */
import { describe, expect, it } from 'vitest';
import { makeWindowSolver } from '../../../server/analysis/run/window-solver.ts';
import { runWindow } from '../../../server/analysis/run/window.ts';
import { runLayout } from '../../../server/analysis/run/simulate.ts';
import { buildProblem, layoutOf } from '../../../server/problem/problem.ts';
import { chooseResolution } from '../../../server/problem/resolution.ts';
import { barrierGeometry } from '../../../server/problem/geometry.ts';
import { clearingSegment, hostSegment, testPest, testScenario } from '../../helpers/scenario.ts';

const s = testScenario({
  pest: testPest({ growth: { form: 'allee-cubic', rate: 1, alleeThreshold: 0.2 }, mortalityOpen: 1 }),
  transect: { segments: [hostSegment(4), clearingSegment(0.2), hostSegment(3)] },
  infestation: { fromKm: 0, toKm: 1, density: 1 },
  horizonYears: 6,
  numerics: { cellM: 50, stepYears: 0.05 },
});

describe('window runs', () => {
  const p = buildProblem(s);
  const pieces = layoutOf(p);
  const resolution = chooseResolution(p, pieces);
  it('a cut end reflects; a transect end keeps its own condition', () => {
    const w = makeWindowSolver(p, pieces, [2, 50], resolution, 10);
    expect(w.windowKm).toEqual([2, 7.2]);
    expect(w.problem.ends).toEqual({ left: 'reflecting', right: s.transect.ends.right });
  });
  it('a whole-transect window continued from t0 = 2 yr ends where the full run ends at 6 yr', () => {
    const full = runLayout({ scenario: p, pieces, resolution, record: false });
    const first = runLayout({ scenario: p, pieces, resolution, record: false, tEnd: 2 });
    const solver = makeWindowSolver(p, pieces, [-1, 99], resolution, 4);
    const r = runWindow(solver, {
      start: { mesh: first.problem.mesh, u: first.u, h: first.h, t: 2 },
      tEnd: 6,
      geometry: barrierGeometry(s, { fromKm: 4, widthM: 200 }),
      stopOnCross: false,
    });
    expect(r.endYears).toBeCloseTo(6, 12);
    let worst = 0;
    for (let i = 0; i < full.u.length; i++) worst = Math.max(worst, Math.abs(r.u[i] - full.u[i]));
    expect(worst).toBeLessThan(1e-12);
  });
});
