/**
 * Habitat coefficients (server/model/habitat.ts): the edge rule of a random walk with edge preference,
 * u(right)/u(left) = ((1 − α)/α)·(D_left/D_right), α = probability of stepping into the left habitat
 * (Ovaskainen & Cornell 2003; Maciel & Lutscher 2013; methods note (server/numerics/README.md) §1). With three habitat types the pairwise
 * jumps must multiply to 1 around a cycle (methods note §1.2), which the edge weights w (ρ = w/D) guarantee.
 */
import { describe, expect, it } from 'vitest';
import { habitatCoefficients, jumpRatio } from '../../server/model/habitat.ts';
import { expectAllClose } from '../helpers/close.ts';
import { testPest, testScenario } from '../helpers/scenario.ts';

const pest = testScenario({
  pest: testPest({
    diffusionHost: 0.6,
    diffusionOpen: 3,
    diffusionNonHost: 1.5,
    edgePreferenceOpen: 0.8,
    edgePreferenceNonHost: 0.65,
    mortalityOpen: 2,
    mortalityNonHost: 0.7,
    growth: { form: 'logistic', rate: 1 },
  }),
  transect: { segments: [{ habitat: 'host-forest', lengthKm: 5, stocking: 1, stemsPerHa: 300 }, { habitat: 'non-host-forest', lengthKm: 1 }] },
  infestation: { fromKm: 0, toKm: 1 },
  horizonYears: 5,
}).pest;

describe('habitat coefficients and edge jumps', () => {
  it('host forest → clearing: ((1 − α)/α)·(D_host/D_open) with α the preference for host forest', () => {
    expectAllClose(jumpRatio(pest, 'host-forest', 'clearing'), (0.2 / 0.8) * (0.6 / 3), { rtol: 1e-14 });
    expectAllClose(jumpRatio(pest, 'host-forest', 'non-host-forest'), (0.35 / 0.65) * (0.6 / 1.5), { rtol: 1e-14 });
  });

  it('jumps multiply to 1 around host → clearing → non-host → host (consistent residence indices)', () => {
    const cycle = jumpRatio(pest, 'host-forest', 'clearing') * jumpRatio(pest, 'clearing', 'non-host-forest') * jumpRatio(pest, 'non-host-forest', 'host-forest');
    expectAllClose(cycle, 1, { rtol: 1e-14 });
  });

  it('mortality applies off host only; host forest has edge weight 1 and residence 1/D', () => {
    expect(habitatCoefficients(pest, 'host-forest')).toEqual({ diffusion: 0.6, edgeWeight: 1, residence: 1 / 0.6, host: true, mortality: 0 });
    expect(habitatCoefficients(pest, 'clearing').mortality).toBe(2);
    expect(habitatCoefficients(pest, 'non-host-forest').mortality).toBe(0.7);
    expect(habitatCoefficients(pest, 'clearing').host).toBe(false);
  });
});
