/**
 * Downloads a GIS analyst opens beside their own layers: the arrival-year GeoTIFF (gdalinfo reads the same
 * CRS, origin, cell size and nodata as the model grid) and GeoJSON front lines and bands in longitude/
 * latitude per RFC 7946 (closed rings, outer rings counter-clockwise, areas kept through the projection).
 */
import { describe, expect, it } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { arrivalGeoTiff, bandsGeoJson, contoursGeoJson, ARRIVAL_NODATA } from '../../../server/domain/gis/downloads.ts';
import { readGeoTiff } from '../../../server/domain/gis/geotiff.ts';
import { readStandMap } from '../../../server/domain/gis/geojson.ts';
import { projector } from '../../../server/domain/gis/crs.ts';
import { bandPolygon, polygonArea, ringArea, type Polygon } from '../../../server/domain/gis/geometry.ts';
import { relErr } from '../../helpers/close.ts';
import { UTM33 } from './fixtures.ts';
import { gdal, skipWithoutGdal, tempDir } from './gdal-tools.ts';

const grid = { nx: 80, ny: 60, cellM: 250, originXM: 500_000, originYM: 5_815_000, crs: UTM33 };
const arrival = Float32Array.from({ length: 80 * 60 }, (_, i) => {
  const r = Math.floor(i / 80), c = i % 80;
  const d = Math.hypot((c + 0.5 - 40) * 250, (r + 0.5 - 30) * 250) / 600;
  return d > 18 ? NaN : d;
});

describe('downloads', () => {
  it('arrival GeoTIFF: read back with nodata where never reached; gdalinfo sees the same CRS, origin and cell size', async () => {
    const bytes = await arrivalGeoTiff(arrival, grid);
    const r = await readGeoTiff(bytes, 'x', 'arrival.tif');
    expect([r.originXM, r.originYM, r.resXM, r.crs.code, r.nodata]).toEqual([500_000, 5_815_000, 250, 'EPSG:32633', ARRIVAL_NODATA]);
    expect(r.values[0]).toBe(ARRIVAL_NODATA);
    expect(r.values[30 * 80 + 40]).toBeCloseTo(arrival[30 * 80 + 40], 5);
    if (skipWithoutGdal('the gdalinfo check of the arrival GeoTIFF')) return;
    const t = tempDir();
    try {
      const file = join(t.dir, 'arrival.tif');
      writeFileSync(file, bytes);
      const info = JSON.parse(gdal('gdalinfo', ['-json', '-stats', file]));
      expect(info.geoTransform).toEqual([500_000, 250, 0, 5_815_000, 0, -250]);
      expect(info.coordinateSystem.wkt).toMatch(/WGS 84 \/ UTM zone 33N[\s\S]*ID\["EPSG",32633\]\]$/);
      expect(info.bands[0].noDataValue).toBe(ARRIVAL_NODATA);
      expect(info.bands[0].maximum).toBeLessThanOrEqual(18);
      expect(info.bands[0].minimum).toBeGreaterThanOrEqual(0);
    } finally {
      t.done();
    }
  });

  it('front lines as GeoJSON: RFC 7946 rings, and the areas survive the trip to lon/lat and back', () => {
    const p = projector(UTM33);
    const fc = contoursGeoJson([{ run: 'baseline', arrivalYears: arrival }], grid, 15, p, 5);
    const feats = fc.features as { properties: { run: string; year: number }; geometry: { type: string; coordinates: number[][][] | number[][][][] } }[];
    expect(feats.map((x) => x.properties.year)).toEqual([5, 10, 15]);
    for (const ft of feats) {
      const polys = (ft.geometry.type === 'Polygon' ? [ft.geometry.coordinates] : ft.geometry.coordinates) as number[][][][];
      for (const poly of polys) {
        poly.forEach((ring, k) => {
          expect(ring[0]).toEqual(ring[ring.length - 1]);
          expect(ringArea(ring as [number, number][]) > 0).toBe(k === 0); // outer CCW, holes CW
          for (const [lon, lat] of ring) expect(Math.abs(lon) <= 180 && Math.abs(lat) <= 90).toBe(true);
        });
      }
    }
    // Read back as stands (our GeoJSON reader, which projects lon/lat to the UTM zone): the year-10 area is π(6 km)².
    const back = readStandMap(JSON.stringify({ type: 'FeatureCollection', features: feats.map((x) => ({ ...x, properties: { habitat: 'host-forest' } })) }), 'f', 'c.geojson', 400);
    const a10 = back.stands[1].polygons.reduce((s, q) => s + polygonArea(q), 0);
    expect(relErr(a10, Math.PI * 6000 ** 2)).toBeLessThan(0.01);
  });

  it('bands as GeoJSON keep their area (10 × 30 km band: 300 km² within 1e-6 after lon/lat round trip)', () => {
    const p = projector(UTM33);
    const poly = bandPolygon([[505_000, 5_800_000], [535_000, 5_800_000]], 10_000) as Polygon;
    const fc = bandsGeoJson([{ key: 'A', label: 'wide', polygon: poly, treatment: 'clearing', widthM: 10_000, areaM2: 3e8 }], p);
    const f0 = fc.features[0] as { properties: Record<string, unknown>; geometry: { coordinates: number[][][] } };
    expect(f0.properties).toMatchObject({ key: 'A', option: 'wide', widthM: 10_000, areaHa: 30_000 });
    const back = f0.geometry.coordinates[0].map(([lon, lat]) => p.fromLonLat(lon, lat));
    expect(relErr(Math.abs(ringArea(back)), 3e8)).toBeLessThan(1e-6);
  });
});
