/** Ensemble chunks: the chunk-size rule by hand, and draw i the same whatever chunk it is evaluated in. */
import { describe, expect, it } from 'vitest';
import { chunkSize, evaluateChunk } from '../../../server/analysis/ensemble/chunks.ts';
import { parseScenario } from '../../../server/model/scenario.ts';

describe('chunkSize', () => {
  it('one draw per chunk on one thread; else ⌈draws/(4·threads)⌉ between 1 and 16', () => {
    expect(chunkSize(1000, 1)).toBe(1);
    expect(chunkSize(1000, 4)).toBe(16); // ⌈1000/16⌉ = 63, capped at 16
    expect(chunkSize(100, 4)).toBe(7); // ⌈100/16⌉ = 7
    expect(chunkSize(3, 8)).toBe(1);
  });
});

describe('evaluateChunk', () => {
  // Invented, small: 8 km of host forest, one uncertain value, no barrier (each draw is one short baseline run).
  const scenario = parseScenario({
    title: 'chunk test (invented)',
    pest: { name: 'chunk test pest (invented)', diffusionHost: { dist: 'uniform', min: 0.5, max: 1.5 }, diffusionOpen: 1, edgePreferenceOpen: 0.5, hostKillRate: 0, mortalityOpen: 1, growth: { form: 'logistic', rate: 1 } },
    transect: { originKm: 0, segments: [{ habitat: 'host-forest', lengthKm: 8, stocking: 1, stemsPerHa: 400 }] },
    infestation: { fromKm: 0, toKm: 1, density: 1 },
    sites: [{ name: 'test site', atKm: 6 }],
    horizonYears: 4,
    uncertainty: { draws: 4, seed: 3, resolutionFactor: 3 },
  });
  it('draws carry their index and do not depend on the other draws of their chunk', () => {
    const all = evaluateChunk({ scenario, indices: [0, 1, 2, 3] });
    expect(all.map((d) => d.index)).toEqual([0, 1, 2, 3]);
    const alone = evaluateChunk({ scenario, indices: [2] });
    expect(alone[0]).toEqual(all[2]);
    expect(all.every((d) => d.baselineArrivals[0] !== null)).toBe(true); // every draw reaches the site
    // Faster spread (larger D) reaches the site earlier: arrival order follows the drawn D (√(rD) front speed).
    const byD = [...all].sort((a, b) => a.values[0] - b.values[0]).map((d) => d.baselineArrivals[0] ?? Infinity);
    for (let k = 1; k < byD.length; k++) expect(byD[k]).toBeLessThanOrEqual(byD[k - 1]);
  });
});
