/**
 * Stand maps in GeoJSON (RFC 7946): projected areas against the ellipsoid's local radii, the way back to
 * longitude/latitude, and the problems that name the feature at fault.
 */
import { describe, expect, it } from 'vitest';
import { readStandMap, toFeatureCollection } from '../../../server/domain/gis/geojson.ts';
import { polygonArea } from '../../../server/domain/gis/geometry.ts';
import { MapFileError } from '../../../server/domain/gis/errors.ts';
import { expectAllClose } from '../../helpers/close.ts';

/** A lon/lat square as a closed GeoJSON ring. */
const square = (lon: number, lat: number, d: number) => [[lon, lat], [lon + d, lat], [lon + d, lat + d], [lon, lat + d], [lon, lat]];
const fc = (features: unknown[], extra: Record<string, unknown> = {}) => JSON.stringify({ type: 'FeatureCollection', features, ...extra });
const stand = (coords: unknown, properties: Record<string, unknown>) => ({ type: 'Feature', properties, geometry: { type: 'Polygon', coordinates: [coords] } });

describe('readStandMap', () => {
  it('a 0.01° square at 60° N, 10° E has the area M·N·cos φ·Δλ·Δφ times the UTM scale factor squared', () => {
    const { stands, projector } = readStandMap(fc([stand(square(10, 60, 0.01), { habitat: 'host-forest', stocking: 0.8 })]), 'map', 'stands.geojson', 400);
    expect(projector.crs).toBeTruthy();
    expect(stands[0]).toMatchObject({ habitat: 'host-forest', stocking: 0.8, stemsPerHa: 400 });
    // WGS84 a = 6378137 m, e² = 0.00669437999014; meridional radius M = a(1−e²)/W³, prime vertical N = a/W,
    // W = √(1 − e² sin²φ) (Snyder 1987, USGS Prof. Paper 1395, eqs. 4-18, 4-20), at the square's centre.
    const a = 6378137;
    const e2 = 0.00669437999014;
    const phi = (60.005 * Math.PI) / 180;
    const W = Math.sqrt(1 - e2 * Math.sin(phi) ** 2);
    const M = (a * (1 - e2)) / W ** 3;
    const N = a / W;
    const d = (0.01 * Math.PI) / 180;
    // UTM zone 32 (central meridian 9° E): k = k0 (1 + (Δλ cos φ)²/2 + …), k0 = 0.9996 (Snyder eq. 8-13, first terms).
    const k = 0.9996 * (1 + (((1.005 * Math.PI) / 180) * Math.cos(phi)) ** 2 / 2);
    expectAllClose(polygonArea(stands[0].polygons[0]), M * N * Math.cos(phi) * d * d * k * k, { rtol: 1e-5 }); // the series terms left out are ~1e-6 here
  });
  it('back to longitude/latitude: closed rings, outer ring counter-clockwise, within 1e-7°', () => {
    const { stands, projector } = readStandMap(fc([stand(square(10, 60, 0.01), { habitat: 'clearing' })]), 'map', 'stands.geojson', 400);
    const out = toFeatureCollection([{ polygons: stands[0].polygons, properties: { habitat: 'clearing' } }], projector);
    const ring = (out.features[0] as { geometry: { coordinates: number[][][] } }).geometry.coordinates[0];
    expect(ring[0]).toEqual(ring[ring.length - 1]);
    const corners = ring.slice(0, 4).map(([x, y]) => `${x.toFixed(6)},${y.toFixed(6)}`).sort();
    expect(corners).toEqual(['10.000000,60.000000', '10.000000,60.010000', '10.010000,60.000000', '10.010000,60.010000']);
  });
  it('problems name the file or the feature and what is wrong', () => {
    const problems = (text: string) => {
      try {
        readStandMap(text, 'landscape.map', 'stands.geojson', 400);
        return [];
      } catch (e) {
        expect(e).toBeInstanceOf(MapFileError);
        return (e as MapFileError).problems;
      }
    };
    expect(problems('{')[0].message).toMatch(/not valid JSON/);
    expect(problems(fc([], { crs: { type: 'name' } }))[0].message).toMatch(/pre-RFC 7946/);
    const projected = problems(fc([stand(square(500000, 6650000, 100), { habitat: 'clearing' })]));
    expect(projected[0]).toMatchObject({ path: 'stands.geojson features[0].geometry' });
    expect(projected[0].message).toMatch(/longitude, latitude/);
    const badHabitat = problems(fc([stand(square(10, 60, 0.01), { habitat: 'meadow' })]));
    expect(badHabitat[0].path).toBe('stands.geojson features[0].properties.habitat');
    expect(problems(fc([{ type: 'Feature', properties: { habitat: 'clearing' }, geometry: { type: 'Point', coordinates: [10, 60] } }]))[0].message).toMatch(/Polygon or MultiPolygon/);
  });
});
