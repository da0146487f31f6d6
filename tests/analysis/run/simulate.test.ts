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

describe('runLayout with adaptive steps: event times from the dense output', () => {
  // The same uniform logistic stand with the automatic (adaptive) step: steps grow to a large share of a
  // year, so a chord between step ends would date the passage of 0.5 by up to ~0.01 yr; the root of the
  // step's interpolating polynomial dates it at the integrator's accuracy.
  const adaptive = buildProblem({ ...s, numerics: { cellM: 100 } });
  const start = (d: { grid: { nCells: number } }) => new Float64Array(d.grid.nCells).fill(0.05);
  const exact = Math.log(19) / 0.8; // Verhulst closed form, as above
  const stepEnds = runLayout({ scenario: adaptive, pieces: layoutOf(adaptive), initialDensity: start, record: false, regularOutputs: false });
  const sampled = runLayout({ scenario: adaptive, pieces: layoutOf(adaptive), initialDensity: start, record: false });
  it('the arrival is the closed form to 1e-4 yr whether observers see step ends only or a regular sample too', () => {
    const a = stepEnds.arrivals.arrivalYears[0]!;
    const b = sampled.arrivals.arrivalYears[0]!;
    const steps = stepEnds.solver.info.steps;
    console.log(`adaptive logistic run: ${steps} steps (mean ${(8 / steps).toFixed(2)} yr); arrival error ${Math.abs(a - exact).toExponential(2)} (step ends only), ${Math.abs(b - exact).toExponential(2)} (sampled)`);
    expect(8 / steps).toBeGreaterThan(0.1); // steps far longer than the sampling would be
    expect(Math.abs(a - exact)).toBeLessThan(1e-4);
    expect(Math.abs(b - exact)).toBeLessThan(1e-4);
  });
});
