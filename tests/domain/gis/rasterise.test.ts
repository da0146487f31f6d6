/**
 * Rasterising polygons by cover fraction. Checks: a 10 × 30 km rectangle built in projected metres,
 * unprojected to longitude/latitude and read as GeoJSON rasterises to its area (issue's bound 1 %; the
 * exact-area scheme reaches round-off); shapes of known area (triangle, disc, polygon with a hole) sum to
 * their shoelace area; and the shares agree with Debian's gdal_rasterize burnt on a 10× finer grid and
 * averaged (an independent cell-centre rasteriser; per-cell gap bounded by its sampling error).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { addPolygonCover, polygonCover, cellAt, cellCentre, type GridSpec } from '../../../server/domain/gis/rasterise.ts';
import { discPolygon, polygonArea, type Polygon } from '../../../server/domain/gis/geometry.ts';
import { readStandMap } from '../../../server/domain/gis/geojson.ts';
import { crsFromEpsg, projector, type Crs } from '../../../server/domain/gis/crs.ts';
import { readGeoTiff } from '../../../server/domain/gis/geotiff.ts';
import { relErr } from '../../helpers/close.ts';
import { gdal, skipWithoutGdal, tempDir } from './gdal-tools.ts';

const sumArea = (cover: ArrayLike<number>, cellM: number) => {
  let s = 0;
  for (let i = 0; i < cover.length; i++) s += cover[i];
  return s * cellM * cellM;
};

/** A rectangle w × h [m] centred at (cx, cy), rotated by `deg`. */
function rectangle(cx: number, cy: number, w: number, h: number, deg: number): Polygon {
  const t = (deg * Math.PI) / 180;
  const c = Math.cos(t), s = Math.sin(t);
  return [[[-w / 2, -h / 2], [w / 2, -h / 2], [w / 2, h / 2], [-w / 2, h / 2]].map(([x, y]) => [cx + c * x - s * y, cy + s * x + c * y] as [number, number])];
}

describe('cover-fraction rasteriser', () => {
  it('a 10 × 30 km rectangle from GeoJSON (lon/lat) rasterises to its area within 1 % (observed: round-off)', () => {
    const utm33 = (crsFromEpsg(32633) as { crs: Crs }).crs;
    const p = projector(utm33);
    for (const deg of [0, 30, 45]) {
      const rect = rectangle(500_000, 5_800_000, 10_000, 30_000, deg);
      const ring = rect[0].map(([x, y]) => p.toLonLat(x, y));
      const fc = { type: 'FeatureCollection', features: [{ type: 'Feature', properties: { habitat: 'host-forest' }, geometry: { type: 'Polygon', coordinates: [[...ring, ring[0]]] } }] };
      const { stands, projector: chosen } = readStandMap(JSON.stringify(fc), 'map.file', 'r.geojson', 400);
      expect(chosen.crs.code).toBe('EPSG:32633');
      const grid: GridSpec = { nx: 400, ny: 400, cellM: 100, originXM: 480_000, originYM: 5_820_000 };
      const area = sumArea(polygonCover(grid, stands[0].polygons[0]), 100);
      const err = relErr(area, 3e8);
      console.log(`10 × 30 km rectangle at ${deg}°: rasterised ${(area / 1e6).toFixed(6)} km², relative error ${err.toExponential(2)}`);
      expect(err).toBeLessThan(0.01);
      expect(err).toBeLessThan(1e-6); // exact-area scheme: only float32 storage and projection round-off remain
    }
  });

  it('shapes of known area: triangle, disc, polygon with a hole, a polygon running off the grid', () => {
    const grid: GridSpec = { nx: 60, ny: 50, cellM: 100, originXM: 300_000, originYM: 6_000_000 };
    const tri: Polygon = [[[300_050, 5_999_950], [303_333, 5_998_000], [301_000, 5_996_500]]];
    expect(relErr(sumArea(polygonCover(grid, tri), 100), Math.abs(polygonArea(tri)))).toBeLessThan(1e-6);
    const disc = discPolygon(303_000, 5_997_500, 1_234);
    expect(relErr(sumArea(polygonCover(grid, disc), 100), Math.PI * 1234 ** 2)).toBeLessThan(1e-6);
    const holed: Polygon = [rectangle(302_000, 5_997_000, 2_000, 3_000, 10)[0], rectangle(302_000, 5_997_000, 500, 400, 0)[0]];
    expect(relErr(sumArea(polygonCover(grid, holed), 100), 6e6 - 2e5)).toBeLessThan(1e-6);
    // Only the part inside the grid counts: a square straddling the west edge by half.
    const half: Polygon = rectangle(300_000, 5_997_000, 1_000, 1_000, 0);
    expect(relErr(sumArea(polygonCover(grid, half), 100), 5e5)).toBeLessThan(1e-6);
    // Shares stay within [0, 1] and weights add.
    const out = new Float64Array(grid.nx * grid.ny);
    addPolygonCover(grid, disc, out, 0.5);
    addPolygonCover(grid, disc, out, 0.5);
    expect(Math.max(...out)).toBeLessThanOrEqual(1);
    expect(Math.min(...out)).toBeGreaterThanOrEqual(0);
  });

  it('cellAt and cellCentre invert each other', () => {
    const grid: GridSpec = { nx: 6, ny: 4, cellM: 50, originXM: 1000, originYM: 2000 };
    for (let i = 0; i < 24; i++) {
      const [x, y] = cellCentre(grid, i);
      expect(cellAt(grid, x, y)).toBe(i);
    }
    expect(cellAt(grid, 999, 1990)).toBe(-1);
  });

  it('agrees with gdal_rasterize on a 10× finer grid, averaged (independent cell-centre rasteriser)', async () => {
    if (skipWithoutGdal('the cross-check against gdal_rasterize')) return;
    const t = tempDir();
    try {
      const grid: GridSpec = { nx: 40, ny: 30, cellM: 100, originXM: 500_000, originYM: 5_003_000 };
      const poly: Polygon = [[[500_130, 5_002_870], [503_420, 5_002_500], [502_700, 5_000_260], [501_100, 5_000_900], [500_400, 5_000_150]], rectangle(501_800, 5_001_600, 600, 500, 20)[0]];
      const ours = polygonCover(grid, poly);
      const gj = join(t.dir, 'p.geojson');
      writeFileSync(gj, JSON.stringify({ type: 'FeatureCollection', features: [{ type: 'Feature', properties: {}, geometry: { type: 'Polygon', coordinates: poly.map((r) => [...r, r[0]]) } }] }));
      const tif = join(t.dir, 'p.tif');
      gdal('gdal_rasterize', ['-q', '-burn', '1', '-ot', 'Byte', '-init', '0', '-a_srs', 'EPSG:32633', '-te', '500000', '5000000', '504000', '5003000', '-tr', '10', '10', gj, tif]);
      const fine = await readGeoTiff(readFileSync(tif), 'f', 'p.tif');
      expect([fine.width, fine.height]).toEqual([400, 300]);
      let worst = 0;
      let gdalSum = 0;
      for (let r = 0; r < 30; r++) for (let c = 0; c < 40; c++) {
        let s = 0;
        for (let i = 0; i < 10; i++) for (let j = 0; j < 10; j++) s += fine.values[(r * 10 + i) * 400 + c * 10 + j];
        gdalSum += s;
        worst = Math.max(worst, Math.abs(s / 100 - ours[r * 40 + c]));
      }
      const areaErr = relErr(gdalSum * 100, sumArea(ours, 100));
      console.log(`gdal_rasterize (10 m, averaged) vs cover fraction (100 m): worst cell ${worst.toFixed(3)}, total area ${areaErr.toExponential(2)}`);
      // A 10 × 10 sample of centres misplaces at most about one sample row along an edge crossing a cell: ≤ 0.1 + corners; observed 0.017.
      expect(worst).toBeLessThan(0.05);
      expect(areaErr).toBeLessThan(2e-3);
    } finally {
      t.done();
    }
  });
});
