/**
 * GeoTIFF round trip and cross-checks with Debian's gdal-bin: a raster written with a known georeference
 * reads back to the same cell centres and areas; gdalinfo reads our output with the same CRS, origin and
 * cell size; a GDAL-written (Deflate-compressed) file reads with its origin, cell size, nodata and values.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { writeArrayBuffer } from 'geotiff';
import { readGeoTiff, writeGeoTiff } from '../../../server/domain/gis/geotiff.ts';
import { crsFromEpsg, type Crs } from '../../../server/domain/gis/crs.ts';
import { CrsError, MapFileError } from '../../../server/domain/gis/errors.ts';
import { gdal, skipWithoutGdal, tempDir } from './gdal-tools.ts';

const utm33 = (crsFromEpsg(32633) as { crs: Crs }).crs;
const grid = { nx: 7, ny: 5, cellM: 250, originXM: 512_345.5, originYM: 5_804_321.25, crs: utm33 };
const values = Float32Array.from({ length: 35 }, (_, i) => i / 10);
values[3] = -9999;

describe('GeoTIFF', () => {
  it('round trip: cell centres, areas, values and nodata read back as written', async () => {
    const bytes = await writeGeoTiff({ ...grid, values, nodata: -9999 });
    const r = await readGeoTiff(bytes, 'map.file', 'x.tif');
    expect([r.width, r.height, r.resXM, r.resYM]).toEqual([7, 5, 250, 250]);
    expect(r.crs.code).toBe('EPSG:32633');
    expect(r.nodata).toBe(-9999);
    // Centre of cell (row 4, col 6) from the georeference vs the written grid.
    const cx = r.originXM + (6 + 0.5) * r.resXM;
    const cy = r.originYM - (4 + 0.5) * r.resYM;
    expect(cx).toBe(grid.originXM + 6.5 * 250);
    expect(cy).toBe(grid.originYM - 4.5 * 250);
    expect(r.resXM * r.resYM).toBe(62_500);
    expect(Array.from(r.values)).toEqual(Array.from(values).map((v) => Math.fround(v)));
  });

  it('gdalinfo reads our output with the same CRS, origin, cell size and nodata', async () => {
    if (skipWithoutGdal('the gdalinfo check of our GeoTIFF output')) return;
    const t = tempDir();
    try {
      const file = join(t.dir, 'out.tif');
      writeFileSync(file, await writeGeoTiff({ ...grid, values, nodata: -9999 }));
      const info = JSON.parse(gdal('gdalinfo', ['-json', file]));
      expect(info.size).toEqual([7, 5]);
      expect(info.geoTransform).toEqual([grid.originXM, 250, 0, grid.originYM, 0, -250]);
      expect(info.coordinateSystem.wkt).toMatch(/ID\["EPSG",32633\]\]$/);
      expect(info.bands[0].noDataValue).toBe(-9999);
      expect(info.bands[0].type).toBe('Float32');
    } finally {
      t.done();
    }
  });

  it('reads a GDAL-written Deflate GeoTIFF: origin, cell size, nodata and values', async () => {
    if (skipWithoutGdal('the read of a GDAL-written GeoTIFF')) return;
    const t = tempDir();
    try {
      const asc = join(t.dir, 'in.asc');
      writeFileSync(asc, 'ncols 4\nnrows 3\nxllcorner 400000\nyllcorner 6000000\ncellsize 30\nNODATA_value -1\n1 2 3 4\n5 -1 7 8\n9 10 11 12\n');
      const tif = join(t.dir, 'in.tif');
      gdal('gdal_translate', ['-q', '-a_srs', 'EPSG:25832', '-ot', 'Int16', '-co', 'COMPRESS=DEFLATE', '-co', 'TILED=YES', asc, tif]);
      const r = await readGeoTiff(readFileSync(tif), 'map.file', 'in.tif');
      expect([r.originXM, r.originYM, r.resXM, r.resYM]).toEqual([400000, 6000090, 30, 30]);
      expect(r.crs.code).toBe('EPSG:25832');
      expect(r.nodata).toBe(-1);
      expect(Array.from(r.values)).toEqual([1, 2, 3, 4, 5, -1, 7, 8, 9, 10, 11, 12]);
    } finally {
      t.done();
    }
  });

  it('refuses a geographic (degree) raster with a message saying so', async () => {
    const ab = await writeArrayBuffer([1, 2, 3, 4] as unknown as number[], {
      width: 2, height: 2, ModelPixelScale: [0.01, 0.01, 0], ModelTiepoint: [0, 0, 0, 15, 52, 0],
      GTModelTypeGeoKey: 2, GTRasterTypeGeoKey: 1, GeographicTypeGeoKey: 4326,
    } as Record<string, unknown>);
    const e = await readGeoTiff(new Uint8Array(ab), 'map.file', 'deg.tif').catch((x) => x);
    expect(e).toBeInstanceOf(CrsError);
    expect(e.code).toBe('MAP_CRS_UNREADABLE');
    expect(e.problems[0]).toMatchObject({ path: 'map.file', value: 'deg.tif' });
    expect(e.message).toMatch(/geographic CRS \(degrees/);
  });

  it('refuses Web Mercator and an EPSG code it does not know, pointing to map.crs', async () => {
    for (const [code, pattern] of [[3857, /stretched/], [31468, /does not know.*map\.crs/]] as const) {
      const ab = await writeArrayBuffer([1, 2, 3, 4] as unknown as number[], {
        width: 2, height: 2, ModelPixelScale: [10, 10, 0], ModelTiepoint: [0, 0, 0, 4e6, 5e6, 0],
        GTModelTypeGeoKey: 1, GTRasterTypeGeoKey: 1, ProjectedCSTypeGeoKey: code,
      } as Record<string, unknown>);
      const e = await readGeoTiff(new Uint8Array(ab), 'map.file', 'm.tif').catch((x) => x);
      expect(e).toBeInstanceOf(CrsError);
      expect(e.message).toMatch(pattern);
      // With a proj4 definition given in the scenario the same file reads.
      const ok = await readGeoTiff(new Uint8Array(ab), 'map.file', 'm.tif', '+proj=tmerc +lat_0=0 +lon_0=12 +k=1 +x_0=4500000 +y_0=0 +ellps=bessel +units=m');
      expect(ok.crs.code).toBe('custom');
    }
  });

  it('refuses bytes that are not a GeoTIFF, naming the field and the file', async () => {
    const e = await readGeoTiff(new TextEncoder().encode('not a tiff'), 'map.classes.file', 'c.tif').catch((x) => x);
    expect(e).toBeInstanceOf(MapFileError);
    expect(e.problems[0]).toMatchObject({ path: 'map.classes.file', value: 'c.tif' });
    expect(e.message).toMatch(/not a readable GeoTIFF/);
  });
});
