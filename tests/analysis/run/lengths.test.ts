/** Movement and fringe lengths √(D/r), √(D/|g(0)|) for each growth form, by hand. */
import { describe, expect, it } from 'vitest';
import { fringeLengthKm, movementLengthKm } from '../../../server/analysis/run/lengths.ts';
import { hostSegment, testPest, testScenario } from '../../helpers/scenario.ts';
import { expectAllClose } from '../../helpers/close.ts';
import type { ScenarioInput } from '../../../server/model/scenario.ts';

const scenario = (growth: ScenarioInput['pest']['growth'], diffusionHost: number) =>
  testScenario({ pest: testPest({ growth, diffusionHost }), transect: { originKm: 0, segments: [hostSegment(20)] }, infestation: { fromKm: 0, toKm: 1, density: 1 }, horizonYears: 5 });

describe('movement and fringe lengths', () => {
  it('logistic: both √(D/r)', () => {
    const s = scenario({ form: 'logistic', rate: 0.5 }, 2); // √(2/0.5) = 2 km
    expectAllClose([movementLengthKm(s), fringeLengthKm(s)], [2, 2], { rtol: 1e-14 });
  });
  it('cubic Allee: movement √(D/r), fringe √(D/(r·a)) since g(0) = −r·a at full stocking', () => {
    const s = scenario({ form: 'allee-cubic', rate: 4, alleeThreshold: 0.25 }, 1);
    expectAllClose([movementLengthKm(s), fringeLengthKm(s)], [0.5, 1], { rtol: 1e-14 });
  });
  it('mate-finding: movement √(D/max(b, m)), fringe √(D/m) (g(0) = −m with mate limitation)', () => {
    const s = scenario({ form: 'mate-finding', birthRate: 4, deathRate: 0.25, crowding: 1, mating: 'saturating', mateScale: 0.2 }, 1);
    expectAllClose([movementLengthKm(s), fringeLengthKm(s)], [0.5, 2], { rtol: 1e-14 });
  });
  it('mate-finding without mate limitation and b = m: g(0) = 0, the fringe falls back to the movement length', () => {
    const s = scenario({ form: 'mate-finding', birthRate: 1, deathRate: 1, crowding: 1, mating: 'none' }, 4);
    expect(fringeLengthKm(s)).toBe(movementLengthKm(s));
    expectAllClose(movementLengthKm(s), 2, { rtol: 1e-14 });
  });
});
