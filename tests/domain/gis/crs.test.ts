/**
 * The tool's EPSG table against the EPSG registry carried by Debian's gdal-bin (`gdaltransform`): each
 * definition must map longitude/latitude to the same easting/northing to within 1 mm.
 */
import { describe, expect, it } from 'vitest';
import { crsFromEpsg, crsFromProj4, projector, utmCrsFor } from '../../../server/domain/gis/crs.ts';
import { gdal, skipWithoutGdal } from './gdal-tools.ts';

/** Codes to check, each with a test point inside its area of use [lon, lat]. */
const CASES: [number, number, number][] = [
  [32601, -175.5, 40], [32628, -16, 36], [32633, 16, 52], [32660, 178, 60],
  [32701, -176, -20], [32733, 14, -30], [32760, 176, -45],
  [25828, -16, 40], [25832, 10, 50], [25833, 14, 55], [25838, 44, 45],
  [26901, -178, 55], [26910, -122, 45], [26918, -74, 42], [26923, -44, 50],
  [3035, 10, 52], [2154, 3, 46], [3006, 16, 60], [3067, 25, 63], [2193, 173, -41], [3577, 135, -25], [5070, -96, 39],
];

describe('CRS table', () => {
  it('every definition agrees with gdaltransform (EPSG registry) to 1 mm', () => {
    if (skipWithoutGdal('the EPSG table check against gdaltransform')) return;
    for (const [code, lon, lat] of CASES) {
      const r = crsFromEpsg(code);
      expect(r.kind, `EPSG:${code}`).toBe('projected');
      if (r.kind !== 'projected') continue;
      const [x, y] = projector(r.crs).fromLonLat(lon, lat);
      const out = gdal('gdaltransform', ['-s_srs', 'EPSG:4326', '-t_srs', `EPSG:${code}`, '-output_xy'], `${lon} ${lat}\n`).trim().split(/\s+/).map(Number);
      expect(Math.abs(x - out[0]), `EPSG:${code} easting ${x} vs ${out[0]}`).toBeLessThan(1e-3);
      expect(Math.abs(y - out[1]), `EPSG:${code} northing ${y} vs ${out[1]}`).toBeLessThan(1e-3);
    }
  });

  it('names the UTM zone chosen for a longitude/latitude, north and south', () => {
    expect(utmCrsFor(15.2, 52).code).toBe('EPSG:32633');
    expect(utmCrsFor(15.2, 52).name).toBe('WGS 84 / UTM zone 33N');
    expect(utmCrsFor(-70.1, -33).code).toBe('EPSG:32719');
  });

  it('refuses geographic and distance-distorting codes, and unknown ones', () => {
    expect(crsFromEpsg(4326).kind).toBe('geographic');
    expect(crsFromEpsg(3857).kind).toBe('distorting');
    expect(crsFromEpsg(99999).kind).toBe('unknown');
    expect(crsFromProj4('+proj=longlat +datum=WGS84')).toMatch(/geographic/);
    expect(crsFromProj4('+proj=utm +zone=33 +datum=WGS84 +units=us-ft')).toMatch(/units/);
    expect(typeof crsFromProj4('+proj=utm +zone=33 +datum=WGS84 +units=m')).toBe('object');
  });
});
