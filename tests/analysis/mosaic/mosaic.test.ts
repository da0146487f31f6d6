/**
 * Thinning mosaics: the period's patches by hand, the principal growth rate λ(0) against the two-patch
 * periodic eigenvalue equation solved here (Shigesada, Kawasaki & Teramoto 1986, Theor. Popul. Biol. 30:143–160),
 * and the fine-grained limit c → 2√(D·r̄) with r̄ the length-weighted mean rate (same source).
 */
import { describe, expect, it } from 'vitest';
import { analyseMosaic, mosaicPatches } from '../../../server/analysis/mosaic/mosaic.ts';
import { testPest, testScenario, hostSegment } from '../../helpers/scenario.ts';
import { expectAllClose } from '../../helpers/close.ts';

const scenario = (over: Parameters<typeof testPest>[0]) =>
  testScenario({ pest: testPest(over), transect: { originKm: 0, segments: [hostSegment(20)] }, infestation: { fromKm: 0, toKm: 1, density: 1 }, horizonYears: 5 });

describe('mosaicPatches', () => {
  it('forest strip (D_host, ρ = 1/D_host, r·h) then gap (D_open, ρ = w/D_open with w = (1−α)/α, −m)', () => {
    const s = scenario({ growth: { form: 'logistic', rate: 1.5 }, diffusionOpen: 2, edgePreferenceOpen: 0.8, mortalityOpen: 3 });
    const p = mosaicPatches(s, { name: 'm', forestM: 200, gapM: 50, cover: 'clearing', stocking: 0.6 });
    expectAllClose([p[0].lengthKm, p[0].diffusion, p[0].residence, p[0].rate], [0.2, 1, 1, 1.5 * 0.6], { rtol: 1e-14 });
    expectAllClose([p[1].lengthKm, p[1].diffusion, p[1].residence, p[1].rate], [0.05, 2, 0.25 / 2, -3], { rtol: 1e-14 });
  });
});

describe('analyseMosaic (dispersion relation, no simulation)', () => {
  it('λ(0) solves k₁ tan(k₁L₁/2) = k₂ tanh(k₂L₂/2) (equal D and continuous density)', () => {
    // D = 1 in both, α = ½ (no jump), r = 1 in 300 m forest; m = 20 in 200 m of clearing (dies out), m = 0.5 in 100 m (persists).
    for (const [m, L2] of [[20, 0.2], [0.5, 0.1]]) {
    const r = 1, L1 = 0.3;
    const s = scenario({ growth: { form: 'logistic', rate: r }, diffusionOpen: 1, edgePreferenceOpen: 0.5, mortalityOpen: m });
    const res = analyseMosaic(s, { name: 'test', forestM: 300, gapM: L2 * 1000, cover: 'clearing', measure: false });
    // Even principal eigenfunction cos in the forest, cosh in the gap, matched in value and slope at the edge.
    const f = (lam: number) => {
      const k1 = Math.sqrt(r - lam);
      const k2 = Math.sqrt(m + lam);
      return k1 * Math.tan((k1 * L1) / 2) - k2 * Math.tanh((k2 * L2) / 2);
    };
    let lo = -m + 1e-12;
    let hi = r - 1e-12;
    for (let it = 0; it < 200; it++) {
      const mid = 0.5 * (lo + hi);
      if (Math.sign(f(mid)) === Math.sign(f(lo))) lo = mid;
      else hi = mid;
    }
    const lambda0 = 0.5 * (lo + hi);
    console.log(`mosaic λ(0): module ${res.lambda0.toFixed(8)}, eigenvalue equation ${lambda0.toFixed(8)} /yr`);
    expectAllClose(res.lambda0, lambda0, { rtol: 1e-6, atol: 1e-9 });
    expect(res.persists).toBe(lambda0 > 0);
    expect(res.kind).toBe(lambda0 > 0 ? 'slows' : 'stops');
    }
  });

  it('fine strips: the speed tends to 2√(D·r̄), r̄ = mean rate over the period; intact forest 2√(rD)', () => {
    // 10 m forest (r = 1) and 10 m non-host forest (no growth, no mortality, same D, α = ½): r̄ = 0.5.
    const s = scenario({ growth: { form: 'logistic', rate: 1 } });
    const res = analyseMosaic(s, { name: 'fine', forestM: 10, gapM: 10, cover: 'non-host-forest', measure: false });
    // Correction is O((L/ℓ)²) with L = 20 m against ℓ = √(D/r) = 1 km: far below 1e-3.
    expectAllClose(res.exactKmPerYear!, 2 * Math.sqrt(0.5), { rtol: 1e-3 });
    expectAllClose(res.lambda0, 0.5, { rtol: 1e-3 });
    expectAllClose(res.intactKmPerYear, 2, { rtol: 1e-6 }); // Fisher–KPP speed 2√(rD)
    expect(res.kind).toBe('slows');
    expect(res.measuredKmPerYear).toBeNull();
  });
});
