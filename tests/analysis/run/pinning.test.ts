/** Which pinning verification applies to which pest (worked out from each growth form's equilibria). */
import { describe, expect, it } from 'vitest';
import { pinningMode, PINNING_METHODS } from '../../../server/analysis/run/pinning.ts';
import { hostSegment, testPest, testScenario } from '../../helpers/scenario.ts';
import type { ScenarioInput } from '../../../server/model/scenario.ts';

const scenario = (growth: ScenarioInput['pest']['growth'], hostKillRate: number) =>
  testScenario({ pest: testPest({ growth, hostKillRate }), transect: { originKm: 0, segments: [hostSegment(20)] }, infestation: { fromKm: 0, toKm: 1, density: 1 }, horizonYears: 5 });

describe('pinningMode', () => {
  it('logistic growth never pins: small groups grow (g(0) = r h > 0)', () => {
    expect(pinningMode(scenario({ form: 'logistic', rate: 1 }, 0), 1)).toBe('none');
    expect(pinningMode(scenario({ form: 'logistic', rate: 1 }, 0.3), 1)).toBe('none');
  });
  it('cubic Allee (threshold a·h, capacity h): a steady pinned front without host loss, die-out with it', () => {
    const g = { form: 'allee-cubic', rate: 2, alleeThreshold: 0.3 } as const;
    expect(pinningMode(scenario(g, 0), 1)).toBe('steady-state');
    expect(pinningMode(scenario(g, 0.2), 1)).toBe('dies-out');
    expect(pinningMode(scenario(g, 0), 0)).toBe('none'); // no hosts beyond: no equilibria at all
  });
  it('saturating mate-finding without crowding: a threshold θm/(bh − m) but no capacity', () => {
    // b = 2, m = 0.5, γ = 0: g(u) = 2h·u/(θ + u) − 0.5 has one root and grows without bound above it,
    // so there is no steady front to verify (none), yet with host loss the die-out check applies.
    const g = { form: 'mate-finding', birthRate: 2, deathRate: 0.5, crowding: 0, mating: 'saturating', mateScale: 0.2 } as const;
    expect(pinningMode(scenario(g, 0), 1)).toBe('none');
    expect(pinningMode(scenario(g, 0.1), 1)).toBe('dies-out');
    // At h = 0.25 the birth rate b h = 0.5 no longer beats deaths: no threshold, nothing can establish.
    expect(pinningMode(scenario(g, 0.1), 0.25)).toBe('none');
  });
  it('every mode has its method described', () => {
    for (const m of ['steady-state', 'dies-out', 'none'] as const) expect(PINNING_METHODS[m].length).toBeGreaterThan(40);
  });
});
