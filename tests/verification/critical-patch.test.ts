/**
 * Critical patch size.
 * - Lethal surroundings (u = 0 at the patch ends): a host patch of length L persists iff L > L* = π√(D/r)
 *   (Skellam 1951, Biometrika 38:196–218; Kierstead & Slobodkin 1953, J. Mar. Res. 12:141–147).
 * - A patch inside a clearing with mortality m, movement D2 and edge preference α (probability of stepping
 *   back into the patch): L* = 2√(D1/r)·arctan(((1 − α)/α)·√(m D1/(r D2))), the Skellam problem with the
 *   edge conditions of Ovaskainen & Cornell (2003) / Maciel & Lutscher (2013); closed form and check values
 *   C1–C4 in the methods note (server/numerics/README.md) §4 (own derivation there, computed independently by a finite-volume eigenvalue).
 * Checked two ways: (i) persistence or extinction in full runs of the engine at 0.9× and 1.1× L*;
 * (ii) the critical length of the engine's own discretised operator (principal eigenvalue = 0, by Sturm
 * counts and bisection on L) against the closed form.
 */
import { describe, expect, it } from 'vitest';
import { buildLayout } from '../../server/analysis/layout.ts';
import { chooseResolution, discretise } from '../../server/analysis/discretise.ts';
import { totalInsects } from '../../server/analysis/trackers.ts';
import type { PointScenario } from '../../server/model/scenario.ts';
import { lowDensityRate } from '../../server/model/growth.ts';
import { expectAllClose } from '../helpers/close.ts';
import { countAbove, linearRates, principalEigenvalue } from '../helpers/eigen.ts';
import { clearingSegment, hostSegment, runScenario, testPest, testScenario } from '../helpers/scenario.ts';

/** Host patch of length L with absorbing transect ends (lethal surroundings), logistic growth. */
function lethalPatch(L: number, D: number, r: number): PointScenario {
  return testScenario({
    pest: testPest({ diffusionHost: D, growth: { form: 'logistic', rate: r } }),
    transect: { segments: [hostSegment(L)], ends: { left: 'absorbing', right: 'absorbing' } },
    infestation: { fromKm: 0, toKm: L, density: 0.5 },
    horizonYears: 150,
  });
}

interface ClearingCase {
  label: string;
  D2: number;
  m: number;
  alpha: number;
  expected: number;
}
/** Closed form of methods note §4 with D1 = r = 1. */
const closedForm = (c: Omit<ClearingCase, 'expected' | 'label'>) => 2 * Math.atan(((1 - c.alpha) / c.alpha) * Math.sqrt(c.m / c.D2));

/** Host patch of length L (D1 = r = 1) between two clearings of ten decay lengths √(D2/m) each. */
function patchInClearing(c: ClearingCase, L: number): PointScenario {
  const side = 10 * Math.sqrt(c.D2 / c.m);
  return testScenario({
    pest: testPest({ diffusionOpen: c.D2, mortalityOpen: c.m, edgePreferenceOpen: c.alpha, growth: { form: 'logistic', rate: 1 } }),
    transect: { segments: [clearingSegment(side), hostSegment(L), clearingSegment(side)] },
    infestation: { fromKm: side, toKm: side + L, density: 0.5 },
    horizonYears: 200,
  });
}

/** Linear rates of the engine's model: the growth form's low-density rate at the stocking, −m off host. */
const ratesOf = (s: PointScenario, p: ReturnType<typeof discretise>) => linearRates(p, (h) => lowDensityRate(s.pest.growth, h));

/** True when the engine's linearised operator has a positive principal eigenvalue. */
function grows(s: PointScenario, cellKm: number): boolean {
  const pieces = buildLayout(s);
  const p = discretise(s, pieces, { ...chooseResolution(s, pieces), cellKm });
  return countAbove(p, ratesOf(s, p), 0) > 0;
}

/** Critical length of the discrete operator by bisection on L, with cells of `cellKm`. */
function discreteCriticalLength(make: (L: number) => PointScenario, guess: number, cellKm: number): number {
  let lo = 0.8 * guess;
  let hi = 1.2 * guess;
  expect(grows(make(lo), cellKm)).toBe(false);
  expect(grows(make(hi), cellKm)).toBe(true);
  for (let it = 0; it < 40; it++) {
    const mid = 0.5 * (lo + hi);
    if (grows(make(mid), cellKm)) hi = mid;
    else lo = mid;
  }
  return 0.5 * (lo + hi);
}

describe('critical patch size with lethal surroundings, π√(D/r) (Skellam 1951; Kierstead & Slobodkin 1953)', () => {
  for (const [D, r] of [
    [1, 1],
    [0.3, 2],
  ]) {
    const Lstar = Math.PI * Math.sqrt(D / r);
    it(`D = ${D}, r = ${r}: a patch of 1.1 L* persists and one of 0.9 L* dies out (full runs, default resolution, absorbing ends)`, () => {
      const persists = runScenario(lethalPatch(1.1 * Lstar, D, r));
      const dies = runScenario(lethalPatch(0.9 * Lstar, D, r));
      const total = (o: typeof persists) => o.front.total;
      const t1 = total(persists);
      const t0 = total(dies);
      // Linear theory: λ = r(1 − (L*/L)²) = −0.235 r at 0.9 L*, so ∫u falls by e^{−35} in 150 yr.
      console.log(
        `lethal surroundings, L* = ${Lstar.toFixed(4)} km: ∫u at 1.1 L* goes ${t1[0].toExponential(3)} → ${t1[t1.length - 1].toExponential(3)}; ` +
          `at 0.9 L* ${t0[0].toExponential(3)} → ${t0[t0.length - 1].toExponential(3)}`,
      );
      expect(t0[t0.length - 1]).toBeLessThan(1e-10 * t0[0]);
      // Persistence: a positive steady state, unchanged over the last 10 % of the run.
      const late = t1[Math.floor(0.9 * t1.length)];
      expect(t1[t1.length - 1]).toBeGreaterThan(0.05 * t1[0]);
      expectAllClose(t1[t1.length - 1], late, { rtol: 1e-6 });
    });

    it(`D = ${D}, r = ${r}: the engine's discrete operator is critical at π√(D/r) to 1e-4 (second order, 100 cells in the patch)`, () => {
      const L = discreteCriticalLength((len) => lethalPatch(len, D, r), Lstar, Lstar / 100);
      console.log(`lethal surroundings: discrete critical length ${L.toFixed(7)} vs π√(D/r) = ${Lstar.toFixed(7)} (rel. ${((L / Lstar - 1) * 100).toExponential(2)} %)`);
      // Second order: relative error ≈ (π/100)²/24 ≈ 4e-5 for the cosine mode; the half-cell Dirichlet end adds the same order.
      expectAllClose(L, Lstar, { rtol: 1e-4 });
    });
  }
});

describe('critical patch inside a clearing with mortality and edge preference (closed form and C1–C4, methods note §4)', () => {
  const cases: ClearingCase[] = [
    { label: 'C1: D2 = 1, m = 1, α = ½ (k = 1)', D2: 1, m: 1, alpha: 0.5, expected: 1.570796 },
    { label: 'C2: D2 = 4, m = 1, α = ½ (k = 0.25)', D2: 4, m: 1, alpha: 0.5, expected: 0.927295 },
    { label: 'C3: D2 = 4, m = 1, α = 0.2 (k = 1, continuous density)', D2: 4, m: 1, alpha: 0.2, expected: 2.214297 },
    { label: 'C4: D2 = 4, m = 1, α = 0.8 (k = 0.0625)', D2: 4, m: 1, alpha: 0.8, expected: 0.24871 },
    { label: 'near-lethal: D2 = 1, m = 1000, α = ½ (→ π as m → ∞)', D2: 1, m: 1000, alpha: 0.5, expected: closedForm({ D2: 1, m: 1000, alpha: 0.5 }) },
  ];
  for (const c of cases) {
    it(`${c.label}: discrete critical length = closed form ${closedForm(c).toFixed(6)} to 1e-4`, () => {
      // The check values are rounded to 6 figures; the closed form must reproduce them.
      expectAllClose(closedForm(c), c.expected, { rtol: 1e-6 });
      // 200 cells in the patch, and at least 20 per decay length √(D2/m) in the clearing.
      const L = discreteCriticalLength((len) => patchInClearing(c, len), c.expected, Math.min(c.expected / 200, Math.sqrt(c.D2 / c.m) / 20));
      console.log(`${c.label}: discrete critical length ${L.toFixed(7)}, closed form ${closedForm(c).toFixed(7)} (rel. ${((L / closedForm(c) - 1) * 100).toExponential(2)} %)`);
      // Second order: measured 3e-7 to 1.3e-5 relative.
      expectAllClose(L, closedForm(c), { rtol: 1e-4 });
    });
  }

  it('at the automatic resolution the critical lengths of C1–C4 are within 0.3 % (measured 0.05–0.2 %, always slightly small)', () => {
    const errors = cases.map((c) => {
      const make = (len: number) => patchInClearing(c, len);
      const s = make(c.expected);
      const cellKm = chooseResolution(s, buildLayout(s)).cellKm;
      return discreteCriticalLength(make, c.expected, cellKm) / closedForm(c) - 1;
    });
    console.log(`critical length at the automatic resolution, relative error: ${errors.map((e) => (100 * e).toFixed(3) + ' %').join(', ')}`);
    for (const e of errors) expect(Math.abs(e)).toBeLessThan(0.003);
  });

  it('C2 in full runs at the default resolution: 1.1 L* persists, 0.9 L* dies out', () => {
    const c = cases[1];
    const runs = [0.9, 1.1].map((f) => {
      const s = patchInClearing(c, f * c.expected);
      const out = runScenario(s);
      const pieces = buildLayout(s);
      const p = discretise(s, pieces);
      const lambda = principalEigenvalue(p, ratesOf(s, p), -5, 5);
      return { f, total: out.front.total, lambda, end: totalInsects(out.problem.grid, out.u) };
    });
    for (const r of runs) console.log(`C2 at ${r.f} L*: principal eigenvalue ${r.lambda.toFixed(5)} /yr; ∫u ${r.total[0].toExponential(3)} → ${r.end.toExponential(3)}`);
    const [dies, persists] = runs;
    expect(dies.lambda).toBeLessThan(0);
    expect(persists.lambda).toBeGreaterThan(0);
    expect(dies.end).toBeLessThan(1e-6 * dies.total[0]);
    expect(persists.end).toBeGreaterThan(0.05 * persists.total[0]);
    const late = persists.total[Math.floor(0.9 * persists.total.length)];
    expectAllClose(persists.end, late, { rtol: 1e-4 });
  });
});
