/**
 * Landscapes and runs as plain JSON for task payloads: the round trip through JSON text is exact (NaN —
 * never reached — travels as null), and a loaded map's extra members (functions) stay behind.
 */
import { describe, expect, it } from 'vitest';
import { makeLandscape } from '../../helpers/landscape.ts';
import { landscapeFromJson, landscapeToJson, rawFromJson, rawToJson } from '../../../server/analysis/landscape/json.ts';
import { landscapeProblem, type PointPest } from '../../../server/analysis/landscape/problem.ts';
import { runLandscapeProblem } from '../../../server/analysis/landscape/run.ts';

const pest = { name: 'test pest (invented)', illustrative: true, diffusionHost: 0.25, diffusionOpen: 0.25, edgePreferenceOpen: 0.8, growth: { form: 'logistic', rate: 1 }, hostKillRate: 0.2, mortalityOpen: 2 } as PointPest;
const L = makeLandscape({
  nx: 30,
  ny: 12,
  cellM: 100,
  hostCoverAt: (x, y) => 0.3 + 0.7 * Math.abs(Math.sin(x / 700 + y / 300)),
  infestedAt: (x) => (x < 400 ? 0.7 : 0),
  sites: [{ name: 'east', at: (x) => x > 2900 }],
  bands: [{ id: 'cut', inside: (x) => x > 1500 && x < 1700, widthM: 200 }],
});

describe('landscape JSON', () => {
  it('carries a landscape through JSON text exactly and leaves functions behind', () => {
    const loaded = { ...L, projector: () => 0 };
    const back = landscapeFromJson(JSON.parse(JSON.stringify(landscapeToJson(loaded))));
    expect(back).toEqual(L);
    expect('projector' in back).toBe(false);
  });

  it('carries a run through JSON text exactly, cells never reached (NaN) included', () => {
    const raw = runLandscapeProblem(landscapeProblem(L, pest, { mapEdges: 'reflecting', infestedDensity: 1, horizonYears: 1 }), pest, { horizonYears: 1, detectionLevel: 0.01 });
    expect(raw.detected.some((v) => Number.isNaN(v))).toBe(true);
    expect(raw.detected.some((v) => v > 0)).toBe(true);
    const back = rawFromJson(JSON.parse(JSON.stringify(rawToJson(raw))));
    expect(back.detected).toEqual(raw.detected);
    expect(back.established).toEqual(raw.established);
    expect(Buffer.from(back.u.buffer).equals(Buffer.from(raw.u.buffer))).toBe(true);
    expect(Buffer.from(back.h.buffer).equals(Buffer.from(raw.h.buffer))).toBe(true);
  });
});
