/**
 * loadLandscape: resampling by area averaging, bands and the trees they remove, sites and infestation, and
 * one bad-input test for every named error of the loader.
 */
import { describe, expect, it } from 'vitest';
import { loadLandscape, treesInCover } from '../../../server/domain/gis/load.ts';
import { writeGeoTiff } from '../../../server/domain/gis/geotiff.ts';
import { bandPolygon, polygonArea, lineLength } from '../../../server/domain/gis/geometry.ts';
import {
  BandMissesForestError,
  CrsError,
  InfestationOutsideMapError,
  MapFileError,
  MapFileTooLargeError,
  MapPlacementError,
  TooManyCellsError,
} from '../../../server/domain/gis/errors.ts';
import { RASTER_CLASSES } from '../../../server/domain/raster.ts';
import { writeArrayBuffer } from 'geotiff';
import { relErr } from '../../helpers/close.ts';
import { UTM33, scenarioOn, uniformHostTiff } from './fixtures.ts';

describe('bands', () => {
  it('a centre line + width makes a band of area width × length exactly (flat ends, mitred bends)', () => {
    for (const line of [
      [[0, 0], [30_000, 0]],
      [[0, 0], [10_000, 3_000], [20_000, 2_000], [26_000, 9_000]],
    ] as [number, number][][]) {
      const b = bandPolygon(line, 750);
      if (!Array.isArray(b)) throw new Error(b.message);
      expect(relErr(polygonArea(b), 750 * lineLength(line))).toBeLessThan(1e-12);
    }
    const folded = bandPolygon([[0, 0], [1000, 0], [900, 100]], 500);
    expect(Array.isArray(folded)).toBe(false);
  });

  it('trees removed by a 10 × 30 km band through uniform host at 400 stems/ha = area × density (to float32 round-off)', async () => {
    // 40 × 40 km of uniform host at 100 m cells; the band is 30 km long, 10 km wide, at 0° and 30° to the grid.
    const files = { 'host.tif': await uniformHostTiff(400, 400, 100) };
    for (const line of [
      [[505_000, 5_820_000], [535_000, 5_820_000]],
      [[520_000 - 15_000 * Math.cos(Math.PI / 6), 5_820_000 - 15_000 * Math.sin(Math.PI / 6)], [520_000 + 15_000 * Math.cos(Math.PI / 6), 5_820_000 + 15_000 * Math.sin(Math.PI / 6)]],
    ]) {
      const s = scenarioOn({ bands: { options: [{ name: 'wide band', line: line as [number, number][], widthM: 10_000 }] } });
      const l = await loadLandscape(s, files);
      const trees = treesInCover(l, l.bands[0].cover);
      const expected = 300 * 100 * 400; // 300 km² × 100 ha/km² × 400 stems/ha
      console.log(`band trees ${trees} vs ${expected} (relative ${relErr(trees, expected).toExponential(2)}), area ${l.bands[0].areaM2} m²`);
      expect(relErr(trees, expected)).toBeLessThan(1e-6);
      expect(relErr(l.bands[0].areaM2, 3e8)).toBeLessThan(1e-6);
    }
  });
});

describe('resampling and layers', () => {
  it('area averaging: block means at 3× the cell, and totals kept at a non-integer ratio (150 m from 100 m)', async () => {
    const nx = 30, ny = 21;
    const values = Float32Array.from({ length: nx * ny }, (_, i) => ((i * 37) % 11) / 10);
    const host = await writeGeoTiff({ nx, ny, cellM: 100, originXM: 500_000, originYM: 5_802_100, crs: UTM33, values, nodata: -9999 });
    const s3 = scenarioOn({ map: { cellM: 300 } });
    const l3 = await loadLandscape(s3, { 'host.tif': host });
    expect([l3.nx, l3.ny]).toEqual([10, 7]);
    for (const [R, C] of [[0, 0], [3, 4], [6, 9]]) {
      let m = 0;
      for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) m += values[(R * 3 + i) * nx + C * 3 + j] / 9;
      expect(Math.abs(l3.hostCoverAtCells[R * 10 + C] - m)).toBeLessThan(1e-6);
    }
    const l15 = await loadLandscape(scenarioOn({ map: { cellM: 150 } }), { 'host.tif': host });
    expect([l15.nx, l15.ny]).toEqual([20, 14]);
    let src = 0, dst = 0;
    for (const v of values) src += v * 1e4;
    for (const v of l15.hostCoverAtCells) dst += v * 150 * 150;
    expect(relErr(dst, src)).toBeLessThan(1e-6);
  });

  it('nodata is outside the habitat, class codes set classes, stems follow the unit', async () => {
    const nx = 4, ny = 2;
    const stems = Float32Array.from([100, 200, -9999, 400, 0, 800, 300, 300]);
    const host = await writeGeoTiff({ nx, ny, cellM: 100, originXM: 500_000, originYM: 5_800_200, crs: UTM33, values: stems, nodata: -9999 });
    const cls = await writeGeoTiff({ nx, ny, cellM: 100, originXM: 500_000, originYM: 5_800_200, crs: UTM33, values: Uint8Array.from([1, 1, 9, 1, 3, 1, 2, 1]) });
    const s = scenarioOn({
      pest: { ...scenarioOn({}).pest, diffusionNonHost: 0.4, edgePreferenceNonHost: 0.5, mortalityNonHost: 1 },
      map: { unit: 'stems-per-ha', stemsPerHaAtFullCover: 400, classes: { file: 'cls.tif', codes: { 'host-forest': [1], 'non-host-forest': [2], clearing: [3], outside: [9] } } },
      infestation: { places: [{ point: [500_050, 5_800_150] }] },
    });
    const l = await loadLandscape(s, { 'host.tif': host, 'cls.tif': cls });
    expect(Array.from(l.classAtCells).map((k) => RASTER_CLASSES[k])).toEqual(['host', 'host', 'outside', 'host', 'open', 'host', 'nonhost', 'host']);
    expect(Array.from(l.hostCoverAtCells)).toEqual([0.25, 0.5, 0, 1, 0, 1, 0, 0.75]);
    expect(Array.from(l.stemsAtCells)).toEqual([100, 200, 0, 400, 0, 400, 0, 300]);
    expect(l.infestedAtCells[0]).toBe(1);
  });

  it('sites: a point is one cell, a polygon the cells it covers; lon/lat coordinates are projected', async () => {
    const files = { 'host.tif': await uniformHostTiff(50, 50, 100) };
    const s = scenarioOn({
      sites: [
        { name: 'point', place: { point: [503_050, 5_803_050] } },
        { name: 'square', place: { polygon: [[[502_000, 5_802_000], [502_300, 5_802_000], [502_300, 5_802_200], [502_000, 5_802_200]]] } },
      ],
    });
    const l = await loadLandscape(s, files);
    expect(Array.from(l.sites[0].cells)).toEqual([(50 - 31) * 50 + 30]);
    expect(l.sites[1].cells.length).toBe(6);
    const lon = l.projector.toLonLat(503_050, 5_803_050);
    const s2 = scenarioOn({ coordinates: 'lonlat', infestation: { places: [{ point: l.projector.toLonLat(501_000, 5_801_000), radiusM: 500 }] }, sites: [{ name: 'p', place: { point: lon } }] });
    const l2 = await loadLandscape(s2, files);
    expect(Array.from(l2.sites[0].cells)).toEqual(Array.from(l.sites[0].cells));
  });
});

describe('named errors for the limits', () => {
  it('upload size: a map file over the limit', async () => {
    const e = await loadLandscape(scenarioOn({}), { 'host.tif': new Uint8Array(33 * 1024 * 1024) }).catch((x) => x);
    expect(e).toBeInstanceOf(MapFileTooLargeError);
    expect(e.problems[0]).toMatchObject({ path: 'map.file', value: 'host.tif' });
    expect(e.message).toMatch(/at most 32 MB/);
  });

  it('cells: more than 2 million model cells', async () => {
    const files = { 'host.tif': await uniformHostTiff(300, 200, 100) };
    const e = await loadLandscape(scenarioOn({ map: { cellM: 10 } }), files).catch((x) => x);
    expect(e).toBeInstanceOf(TooManyCellsError);
    expect(e.problems[0]).toMatchObject({ path: 'map.cellM', value: 10 });
    expect(e.message).toMatch(/6000000 model cells; at most 2000000/);
  });

  it('a band that misses the forest', async () => {
    const nx = 40, ny = 20;
    const v = Float32Array.from({ length: nx * ny }, (_, i) => (i % nx < 20 ? 1 : 0)); // west half forest, east half open
    const files = { 'host.tif': await writeGeoTiff({ nx, ny, cellM: 100, originXM: 500_000, originYM: 5_802_000, crs: UTM33, values: v, nodata: -9999 }) };
    const s = scenarioOn({ bands: { options: [{ name: 'in the field', line: [[503_000, 5_800_200], [503_000, 5_801_800]], widthM: 200 }] } });
    const e = await loadLandscape(s, files).catch((x) => x);
    expect(e).toBeInstanceOf(BandMissesForestError);
    expect(e.problems[0]).toMatchObject({ path: 'bands.options[0]', value: 'in the field' });
  });

  it('an infestation outside the map, and one on no host', async () => {
    const files = { 'host.tif': await uniformHostTiff(20, 20, 100) };
    const e = await loadLandscape(scenarioOn({ infestation: { places: [{ point: [509_000, 5_801_000], radiusM: 300 }] } }), files).catch((x) => x);
    expect(e).toBeInstanceOf(InfestationOutsideMapError);
    expect(e.problems[0].path).toBe('infestation.places[0]');
    expect(e.message).toMatch(/outside the map \(x 500000–502000 m/);
  });

  it('a CRS that cannot be read (geographic raster)', async () => {
    const ab = await writeArrayBuffer([1, 1, 1, 1] as unknown as number[], {
      width: 2, height: 2, ModelPixelScale: [0.01, 0.01, 0], ModelTiepoint: [0, 0, 0, 15, 52, 0], GTModelTypeGeoKey: 2, GTRasterTypeGeoKey: 1, GeographicTypeGeoKey: 4326,
    } as Record<string, unknown>);
    const e = await loadLandscape(scenarioOn({}), { 'host.tif': new Uint8Array(ab) }).catch((x) => x);
    expect(e).toBeInstanceOf(CrsError);
    expect(e.message).toMatch(/geographic/);
    const bad = await loadLandscape(scenarioOn({ map: { crs: 'not a projection' } }), { 'host.tif': await uniformHostTiff(2, 2, 100) }).catch((x) => x);
    expect(bad).toBeInstanceOf(CrsError);
    expect(bad.problems[0].path).toBe('map.crs');
  });

  it('a missing file, a share above 1, a site outside the map, a band folding over itself', async () => {
    const files = { 'host.tif': await uniformHostTiff(20, 20, 100) };
    const missing = await loadLandscape(scenarioOn({ map: { file: 'other.tif' } }), files).catch((x) => x);
    expect(missing).toBeInstanceOf(MapFileError);
    expect(missing.problems[0]).toMatchObject({ path: 'map.file', value: 'other.tif' });
    const high = await writeGeoTiff({ nx: 2, ny: 1, cellM: 100, originXM: 500_000, originYM: 5_800_100, crs: UTM33, values: Float32Array.from([0.5, 7]) });
    const e2 = await loadLandscape(scenarioOn({ infestation: { places: [{ point: [500_050, 5_800_050] }] } }), { 'host.tif': high }).catch((x) => x);
    expect(e2).toBeInstanceOf(MapFileError);
    expect(e2.message).toMatch(/holds 7 at row 0, column 1; values in share must be 0–1/);
    const site = await loadLandscape(scenarioOn({ sites: [{ name: 'far', place: { point: [600_000, 5_800_000] } }] }), files).catch((x) => x);
    expect(site).toBeInstanceOf(MapPlacementError);
    expect(site.problems[0].path).toBe('sites[0].place');
    const fold = await loadLandscape(scenarioOn({ bands: { options: [{ name: 'z', line: [[500_100, 5_800_500], [501_500, 5_800_500], [500_200, 5_800_600]], widthM: 300 }] } }), files).catch((x) => x);
    expect(fold).toBeInstanceOf(MapPlacementError);
    expect(fold.problems[0].path).toBe('bands.options[0].line[1]');
  });
});
