/**
 * runLayout and summariseRun (server/analysis/run/simulate.ts). A stand infested everywhere with reflecting
 * ends (here: a uniform start, `initialDensity`) stays uniform, so the run must follow the logistic ODE u' = r u (1 − u) (Verhulst 1838; closed form
 * u(t) = u0 e^{rt} / (1 + u0 (e^{rt} − 1))): TR-BDF2 is second order, error ≈ 1e-5 at dt = 0.05 here.
 */
import { describe, expect, it } from 'vitest';
import { runLayout, summariseRun } from '../../../server/analysis/run/simulate.ts';
import { buildProblem, layoutOf } from '../../../server/problem/problem.ts';
import { hostSegment, testPest, testScenario } from '../../helpers/scenario.ts';

const s = testScenario({
  pest: testPest({ growth: { form: 'logistic', rate: 0.8 } }),
  transect: { segments: [hostSegment(2)] },
  infestation: { fromKm: 0, toKm: 0.1, density: 0.05 },
  sites: [{ name: 'middle', atKm: 1 }],
  detectionLevel: 0.5,
  horizonYears: 8,
  numerics: { cellM: 100, stepYears: 0.05 },
});

describe('runLayout', () => {
  const p = buildProblem(s);
  // Uniform start 0.05 everywhere in place of the infestation stretch (initialDensity).
  const out = runLayout({ scenario: p, pieces: layoutOf(p), initialDensity: (d) => new Float64Array(d.grid.nCells).fill(0.05) });
  const logistic = (t: number) => (0.05 * Math.exp(0.8 * t)) / (1 + 0.05 * (Math.exp(0.8 * t) - 1));
  it('a uniform stand follows the logistic closed form', () => {
    let worst = 0;
    for (const v of out.u) worst = Math.max(worst, Math.abs(v - logistic(8)));
    console.log(`uniform logistic run, dt 0.05: worst error ${worst.toExponential(2)} at t = 8`);
    expect(worst).toBeLessThan(5e-5);
  });
  it('the site sees the detection level when the closed form reaches it (interpolated between steps)', () => {
    // u(t) = 0.5 at t = ln(0.5/0.05 · 0.95/0.5) / 0.8 = ln 19 / 0.8.
    expect(out.arrivals.arrivalYears[0]).toBeCloseTo(Math.log(19) / 0.8, 3);
  });
  it('the summary reports the run as it was made', () => {
    const r = summariseRun(out, p);
    expect(r.numerics).toMatchObject({ status: 'completed', nCells: 20, stepYears: 0.05, steps: 160, rejectedSteps: 0, stepControl: 'fixed', autoCell: false });
    expect(r.endYears).toBe(8);
    expect(r.host.remainingFraction).toBe(1);
  });
});
