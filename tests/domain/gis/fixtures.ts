/** Small maps and scenarios written by the tests themselves (no files on disk). */
import { writeGeoTiff } from '../../../server/domain/gis/geotiff.ts';
import { crsFromEpsg, type Crs } from '../../../server/domain/gis/crs.ts';
import { parseLandscapeScenario, type LandscapeScenarioInput } from '../../../server/model/landscape.ts';

export const UTM33 = (crsFromEpsg(32633) as { crs: Crs }).crs;

/** Test pest (illustrative, the logistic borer of scenarios/clearing-delays.json). */
export const PEST = {
  name: 'Test borer (illustrative)',
  illustrative: true,
  diffusionHost: 0.4,
  diffusionOpen: 0.4,
  edgePreferenceOpen: 0.7,
  growth: { form: 'logistic', rate: 0.8 },
  hostKillRate: 0.5,
  mortalityOpen: 3,
} as const;

/** A uniform host raster (share 1) of nx × ny cells of cellM metres, west/south edges at (x0, y0). */
export async function uniformHostTiff(nx: number, ny: number, cellM: number, x0 = 500_000, y0 = 5_800_000, crs: Crs = UTM33): Promise<Uint8Array> {
  return writeGeoTiff({ nx, ny, cellM, originXM: x0, originYM: y0 + ny * cellM, crs, values: new Float32Array(nx * ny).fill(1), nodata: -9999 });
}

/** A landscape scenario on `host.tif` (share unit, full cover = stemsPerHa). */
export function scenarioOn(overrides: Partial<Omit<LandscapeScenarioInput, 'map'>> & { map?: Record<string, unknown> }, stemsPerHa = 400) {
  const { map, ...rest } = overrides;
  return parseLandscapeScenario({
    kind: 'landscape',
    title: 'test map',
    pest: PEST,
    map: { format: 'geotiff', file: 'host.tif', unit: 'share', stemsPerHaAtFullCover: stemsPerHa, ...map },
    infestation: { places: [{ point: [501_000, 5_801_000], radiusM: 500 }] },
    horizonYears: 10,
    ...rest,
  } as unknown);
}
