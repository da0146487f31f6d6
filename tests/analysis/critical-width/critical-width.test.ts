/**
 * The phase-plane (first-integral) critical width, against an independent shooting computation in this test
 * and the methods note's check values (server/numerics/README.md §5.3: G1–G4, computed there by two
 * independent root-finding routes; Keitt, Lewis & Holt 2001, Am. Nat. 157:203), and when it does not apply.
 * The bisection on full runs is checked against the same values in tests/verification/critical-width.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { phasePlaneWidth } from '../../../server/analysis/critical-width/critical-width.ts';
import { parseScenario, pointScenario, type ScenarioInput } from '../../../server/model/scenario.ts';
import { expectAllClose } from '../../helpers/close.ts';

// Cubic (Nagumo) growth, D_forest = r = 1, a = 0.25, no host loss; invented test pest.
function scenario(diffusionOpen: number, mortalityOpen: number, alpha: number, growth?: ScenarioInput['pest']['growth'], hostKillRate = 0) {
  return pointScenario(
    parseScenario({
      title: 'phase-plane check (invented)',
      pest: { name: 'cubic test pest (invented)', diffusionHost: 1, diffusionOpen, edgePreferenceOpen: alpha, growth: growth ?? { form: 'allee-cubic', rate: 1, alleeThreshold: 0.25 }, hostKillRate, mortalityOpen },
      transect: { segments: [{ habitat: 'host-forest', lengthKm: 60, stocking: 1, stemsPerHa: 400 }] },
      infestation: { fromKm: 0, toKm: 3 },
      horizonYears: 60,
      barrier: { lengthKm: 1, options: [{ name: 'check', fromKm: 20, widthM: 1000 }] },
    }),
  );
}
const option = { fromKm: 20, widthM: 1000, cover: 'clearing' as const };

/**
 * Independent shooting for equal D in forest and gap, α = ½ (no density jump): from u = 1 on the left,
 * u(0) = p, u'(0) = −√(2(F(1) − F(p))); in the gap u'' = m u, so U(W) = p cosh βW + (u'(0)/β) sinh βW; the exit
 * must lie on the decaying orbit beyond: U'(W)²/2 + F(U(W)) = 0 with 0 < U(W) ≤ θ. W* = min over p of the
 * smallest such W.
 */
function shootingWidth(m: number, a = 0.25): number {
  const F = (u: number) => -(u ** 4) / 4 + ((1 + a) * u ** 3) / 3 - (a * u * u) / 2;
  const theta = (2 * (1 + a) - Math.sqrt(4 * (1 + a) ** 2 - 18 * a)) / 3;
  const beta = Math.sqrt(m);
  let best = Infinity;
  for (let k = 1; k < 500; k++) {
    const p = k / 500;
    const dp = -Math.sqrt(2 * (F(1) - F(p)));
    const U = (w: number) => p * Math.cosh(beta * w) + (dp / beta) * Math.sinh(beta * w);
    const V = (w: number) => p * beta * Math.sinh(beta * w) + dp * Math.cosh(beta * w);
    const G = (w: number) => 0.5 * V(w) ** 2 + F(U(w));
    // Scan W for the first sign change of G with the exit density inside (0, θ], then bisect.
    let w0 = 0;
    for (let w = 0.002; w < 5 && U(w) > 0; w += 0.002) {
      if (U(w) <= theta && Math.sign(G(w)) !== Math.sign(G(w0))) {
        let lo = w0;
        let hi = w;
        for (let it = 0; it < 60; it++) {
          const mid = 0.5 * (lo + hi);
          if (Math.sign(G(mid)) === Math.sign(G(lo))) lo = mid;
          else hi = mid;
        }
        best = Math.min(best, 0.5 * (lo + hi));
        break;
      }
      w0 = w;
    }
  }
  return best;
}

describe('phasePlaneWidth', () => {
  it('G1 (D_gap = D_forest, m = 1, α = ½) against the shooting computation above and the note value 0.596095 km', () => {
    const own = shootingWidth(1);
    const r = phasePlaneWidth(scenario(1, 1, 0.5), option);
    console.log(`phase-plane G1: module ${(r.widthM! / 1000).toFixed(6)} km, shooting in the test ${own.toFixed(6)} km, note 0.596095 km`);
    expectAllClose(own, 0.596095, { rtol: 1e-4 }); // the scan over p (step 2e-3) limits the test's own value
    expectAllClose(r.widthM! / 1000, 0.596095, { rtol: 1e-5 }); // the note gives 6 digits
  });
  it('G2–G4 (D_gap = 4, m = 0.25; α = ½, continuous density, α = 0.8) against the note values', () => {
    // α = 0.2 with D_gap = 4 gives a continuous density across the edges (the note's G3, "k = 1").
    const cases: [number, number][] = [[0.5, 3.837489], [0.2, 2.384379], [0.8, 2.073929]];
    for (const [alpha, wKm] of cases) expectAllClose(phasePlaneWidth(scenario(4, 0.25, alpha), option).widthM! / 1000, wKm, { rtol: 1e-5 });
  });
  it('does not apply without a strong Allee effect, and says why', () => {
    const r = phasePlaneWidth(scenario(1, 1, 0.5, { form: 'logistic', rate: 1 }), option);
    expect(r.widthM).toBeNull();
    expect(r.note).toMatch(/no strong Allee effect/);
    const noCrowding = phasePlaneWidth(scenario(1, 1, 0.5, { form: 'mate-finding', birthRate: 2, deathRate: 0.5, crowding: 0, mating: 'saturating', mateScale: 0.2 }), option);
    expect(noCrowding.widthM).toBeNull();
    expect(noCrowding.note).toMatch(/no carrying capacity/);
  });
  it('with host loss it still answers but flags that it assumes intact hosts', () => {
    const r = phasePlaneWidth(scenario(1, 1, 0.5, undefined, 0.1), option);
    expect(r.assumesIntactHosts).toBe(true);
    expect(r.note).toMatch(/ignores host depletion/);
    expectAllClose(r.widthM! / 1000, 0.596095, { rtol: 1e-5 }); // hosts held at stocking 1: the G1 value
  });
});
