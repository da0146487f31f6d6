import { writeGeoTiff } from './geotiff.ts';
import { toFeatureCollection } from './geojson.ts';
import { arrivalContours, contourYears } from './contours.ts';
import type { Projector, Crs } from './crs.ts';
import type { GridSpec } from './rasterise.ts';
import type { Polygon } from './geometry.ts';

/** Nodata of the arrival-year raster: cells never reached within the run, and cells outside the habitat. */
export const ARRIVAL_NODATA = -9999;

/**
 * The arrival-year raster as a Float32 GeoTIFF on the model grid in the map's CRS (the input's CRS for a
 * GeoTIFF map; the chosen UTM zone for a GeoJSON map): years since the start, nodata where never reached.
 */
export async function arrivalGeoTiff(arrivalYears: ArrayLike<number>, grid: GridSpec & { crs: Crs }): Promise<Uint8Array> {
  const values = new Float32Array(grid.nx * grid.ny);
  for (let i = 0; i < values.length; i++) {
    const v = arrivalYears[i];
    values[i] = typeof v === 'number' && Number.isFinite(v) ? v : ARRIVAL_NODATA;
  }
  return writeGeoTiff({ ...grid, values, nodata: ARRIVAL_NODATA });
}

/**
 * Front contours as GeoJSON (RFC 7946, longitude/latitude): one feature per run and year, the area reached
 * by that year (arrival ≤ year), with properties `run` and `year`.
 */
export function contoursGeoJson(
  runs: readonly { run: string; arrivalYears: ArrayLike<number> }[],
  grid: GridSpec,
  horizonYears: number,
  projector: Projector,
  stepYears = 5,
): { type: 'FeatureCollection'; features: unknown[] } {
  const years = contourYears(horizonYears, stepYears);
  const features = runs.flatMap(({ run, arrivalYears }) =>
    arrivalContours(arrivalYears, grid, years).map((c) => ({ polygons: c.polygons, properties: { run, year: c.year, meaning: `area reached by year ${c.year} (detection level)` } })),
  );
  return toFeatureCollection(features, projector);
}

/** Band options as GeoJSON polygons (RFC 7946, longitude/latitude) with their name, key and treatment. */
export function bandsGeoJson(
  bands: readonly { key: string; label: string; polygon: Polygon; treatment: string; widthM?: number; areaM2: number }[],
  projector: Projector,
): { type: 'FeatureCollection'; features: unknown[] } {
  return toFeatureCollection(
    bands.map((b) => ({
      polygons: [b.polygon],
      properties: { key: b.key, option: b.label, treatment: b.treatment, ...(b.widthM !== undefined ? { widthM: b.widthM } : {}), areaHa: Math.round(b.areaM2 / 100) / 100 },
    })),
    projector,
  );
}
