/** Layouts: pieces of uniform habitat with a clearing cut in, merged neighbours, and stems removed (hand sums). */
import { describe, expect, it } from 'vitest';
import { buildLayout, HA_PER_KM2, stemsRemoved } from '../../server/problem/layout.ts';
import { testScenario } from '../helpers/scenario.ts';
import { expectAllClose } from '../helpers/close.ts';

// Invented test transect: host 0–10 km (stocking 0.9, 420 stems/ha), a 60 m clearing, host 10.06–20.06 km
// (stocking 0.8, 380 stems/ha).
const s = testScenario({
  pest: { name: 'layout test pest (invented)', diffusionHost: 1, diffusionOpen: 1, edgePreferenceOpen: 0.5, hostKillRate: 0, mortalityOpen: 1, growth: { form: 'logistic', rate: 1 } },
  transect: {
    originKm: 0,
    segments: [
      { habitat: 'host-forest', lengthKm: 10, stocking: 0.9, stemsPerHa: 420 },
      { habitat: 'clearing', lengthKm: 0.06 },
      { habitat: 'host-forest', lengthKm: 10, stocking: 0.8, stemsPerHa: 380 },
    ],
  },
  infestation: { fromKm: 0, toKm: 1, density: 1 },
  horizonYears: 5,
});

const edges = (ps: ReturnType<typeof buildLayout>) => ps.map((p) => [p.fromKm, p.toKm]);

describe('buildLayout', () => {
  it('the baseline is the segments as they stand (no host stocking in the clearing)', () => {
    const ps = buildLayout(s);
    expect(ps.map((p) => p.habitat)).toEqual(['host-forest', 'clearing', 'host-forest']);
    expectAllClose(edges(ps).flat(), [0, 10, 10, 10.06, 10.06, 20.06], { rtol: 1e-14, atol: 1e-14 });
    expect(ps.map((p) => [p.stocking, p.stemsPerHa, p.segment, p.barrier])).toEqual([[0.9, 420, 0, false], [0, 0, 1, false], [0.8, 380, 2, false]]);
  });

  it('a clearing inside one segment splits it in three', () => {
    const ps = buildLayout(s, { fromKm: 4, widthM: 500, cover: 'clearing' });
    expectAllClose(edges(ps).flat(), [0, 4, 4, 4.5, 4.5, 10, 10, 10.06, 10.06, 20.06], { rtol: 1e-14, atol: 1e-14 });
    expect(ps.map((p) => p.barrier)).toEqual([false, true, false, false, false]);
    expect(ps[1]).toMatchObject({ habitat: 'clearing', stocking: 0, stemsPerHa: 0, segment: 0 });
    expect(ps[2]).toMatchObject({ habitat: 'host-forest', stocking: 0.9, segment: 0 });
  });

  it('a clearing across a segment boundary cuts both pieces; each barrier piece keeps its segment', () => {
    // [9.8, 10.3] overlaps host (9.8–10), the old clearing (10–10.06) and host (10.06–10.3).
    const ps = buildLayout(s, { fromKm: 9.8, widthM: 500, cover: 'non-host-forest' });
    expectAllClose(edges(ps).flat(), [0, 9.8, 9.8, 10, 10, 10.06, 10.06, 10.3, 10.3, 20.06], { rtol: 1e-13, atol: 1e-13 });
    expect(ps.map((p) => [p.habitat, p.segment, p.barrier])).toEqual([
      ['host-forest', 0, false],
      ['non-host-forest', 0, true],
      ['non-host-forest', 1, true],
      ['non-host-forest', 2, true],
      ['host-forest', 2, false],
    ]);
  });

  it('a clearing flush with a segment edge leaves no sliver piece', () => {
    const ps = buildLayout(s, { fromKm: 10.06, widthM: 300, cover: 'clearing' });
    expect(ps.length).toBe(4);
    expect(ps.every((p) => p.toKm - p.fromKm > 1e-3)).toBe(true);
  });
});

describe('stemsRemoved', () => {
  it('stems/ha × cut length × barrier length × 100 ha/km², host only', () => {
    expect(HA_PER_KM2).toBe(100); // 1 km² = 100 ha (definition of the hectare)
    // Inside one segment: 420 × 0.5 km × 6 km × 100 = 126 000 stems.
    expectAllClose(stemsRemoved(s, { fromKm: 4, widthM: 500, cover: 'clearing' }, 6), 126_000, { rtol: 1e-12 });
    // Across the boundary [9.8, 10.3]: 420 × 0.2 + 0 × 0.06 + 380 × 0.24 = 175.2 stems·km/ha, × 6 × 100 = 105 120.
    expectAllClose(stemsRemoved(s, { fromKm: 9.8, widthM: 500, cover: 'clearing' }, 6), 105_120, { rtol: 1e-12 });
    // Entirely in the existing clearing: nothing to fell.
    expect(stemsRemoved(s, { fromKm: 10.01, widthM: 40, cover: 'clearing' }, 6)).toBe(0);
  });
});
