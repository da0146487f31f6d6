/** resolve / resolveDraw: central values (midpoint, mode, median) and draws by parameter path. */
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../server/model/scenario.ts';
import { resolve, resolveDraw } from '../../server/problem/resolve.ts';

// Invented scenario with one distribution of each kind.
const scenario = parseScenario({
  title: 'resolve test (invented)',
  pest: {
    name: 'resolve test pest (invented)',
    diffusionHost: { dist: 'uniform', min: 0.5, max: 1.5 },
    diffusionOpen: { dist: 'lognormal', median: 2, spread: 1.5 },
    edgePreferenceOpen: 0.5,
    hostKillRate: 0,
    mortalityOpen: { dist: 'triangular', min: 1, mode: 2, max: 4 },
    growth: { form: 'logistic', rate: 1 },
  },
  transect: { originKm: 0, segments: [{ habitat: 'host-forest', lengthKm: 10, stocking: 1, stemsPerHa: 400 }] },
  infestation: { fromKm: 0, toKm: 1, density: 1 },
  horizonYears: 5,
});

describe('resolve', () => {
  it('uniform → midpoint, lognormal → median, triangular → mode; plain numbers unchanged', () => {
    const p = resolve(scenario);
    expect(p.pest.diffusionHost).toBe(1); // (0.5 + 1.5)/2
    expect(p.pest.diffusionOpen).toBe(2);
    expect(p.pest.mortalityOpen).toBe(2);
    expect(p.pest.edgePreferenceOpen).toBe(0.5);
    expect(p.transect.segments[0].lengthKm).toBe(10);
  });
});

describe('resolveDraw', () => {
  it('listed paths take the drawn values, every other distribution its central value', () => {
    const p = resolveDraw(scenario, [{ pathText: 'pest.mortalityOpen' }, { pathText: 'pest.diffusionHost' }], [3.5, 0.7]);
    expect(p.pest.mortalityOpen).toBe(3.5);
    expect(p.pest.diffusionHost).toBe(0.7);
    expect(p.pest.diffusionOpen).toBe(2); // not listed: median
  });
  it('a path that names no distribution changes nothing', () => {
    const p = resolveDraw(scenario, [{ pathText: 'pest.edgePreferenceOpen' }], [0.9]);
    expect(p).toEqual(resolve(scenario));
  });
  it('does not alter the scenario it reads', () => {
    const before = JSON.stringify(scenario);
    resolveDraw(scenario, [{ pathText: 'pest.diffusionHost' }], [1.2]);
    expect(JSON.stringify(scenario)).toBe(before);
  });
});
