/**
 * Maps: furniture (title, legend, scale bar, north arrow, coordinates in the map CRS), vector cells for
 * small grids and a PNG raster for large ones, escaping of user text, ramps that darken monotonically
 * (greyscale-readable), and front lines checked against a closed form (circles of radius c·t).
 */
import { describe, expect, it } from 'vitest';
import { decode } from 'fast-png';
import { arrivalMap, hostCoverMap, mapsForLandscape, type MapBase } from '../../../server/report/maps/index.ts';
import { scaleBarLengthM } from '../../../server/report/maps/landscape-maps.ts';
import { arrivalColour, hostColour, luminance } from '../../../server/report/maps/ramps.ts';
import { arrivalContours } from '../../../server/domain/gis/contours.ts';
import { polygonArea, type Polygon } from '../../../server/domain/gis/geometry.ts';
import { RASTER_CLASSES } from '../../../server/domain/raster.ts';
import { texts, nonFiniteTokens, havePython, parseWithPython } from '../../helpers/svg.ts';
import { relErr } from '../../helpers/close.ts';

const HOST = RASTER_CLASSES.indexOf('host');
const OUT = RASTER_CLASSES.indexOf('outside');

function base(nx: number, ny: number, cellM = 100): MapBase {
  const classAtCells = new Uint8Array(nx * ny).fill(HOST);
  for (let i = 0; i < nx; i++) classAtCells[i] = OUT; // north row: water
  const x0 = 480_000, y0 = 4_030_000;
  const sq = (x: number, y: number, w: number): Polygon => [[[x, y], [x + w, y], [x + w, y + w], [x, y + w]]];
  return {
    grid: { nx, ny, cellM, originXM: x0, originYM: y0, crs: { code: 'EPSG:32628', name: 'WGS 84 / UTM zone 28N' } },
    classAtCells,
    hostCoverAtCells: new Float32Array(nx * ny).fill(0.8),
    bands: [{ label: 'Cut <b>&"x"', polygon: sq(x0 + 0.4 * nx * cellM, y0 - 0.8 * ny * cellM, 0.1 * nx * cellM) }],
    infested: [sq(x0, y0 - 0.6 * ny * cellM, 0.1 * nx * cellM)],
    sites: [{ name: 'Town <edge>', point: [x0 + 0.9 * nx * cellM, y0 - 0.5 * ny * cellM] }],
  };
}

/** Arrival = distance from the map centre / speed [yr]. */
function radialArrival(b: MapBase, speedMPerYr: number): Float32Array {
  const { nx, ny, cellM } = b.grid;
  return Float32Array.from({ length: nx * ny }, (_, i) => {
    const r = Math.floor(i / nx), c = i % nx;
    return Math.hypot((c + 0.5 - nx / 2) * cellM, (r + 0.5 - ny / 2) * cellM) / speedMPerYr;
  });
}

describe('landscape maps', () => {
  it('carry a title, legend, scale bar, north arrow and coordinates in the map CRS; user text is escaped', () => {
    const b = base(300, 200);
    const m = hostCoverMap(b);
    const t = texts(m.svg).map((x) => x.text);
    expect(m.title).toMatch(/The map/);
    expect(t).toContain('N');
    expect(t).toContain('5 km'); // 30 km wide map: the largest round length ≤ 7.5 km
    expect(t.join(' ')).toMatch(/Easting and northing \(m\), WGS 84 \/ UTM zone 28N \(EPSG:32628\)/);
    expect(t).toContain('485\u202f000');
    expect(t.join(' ')).toMatch(/A: Cut <b>&"x"/);
    expect(m.svg).not.toMatch(/<b>/);
    expect(t.join(' ')).toMatch(/1: Town <edge>/);
    expect(nonFiniteTokens(m.svg)).toEqual([]);
  });

  it('scale bar length is what it says: its segments span L × (px per m) read from the coordinate ticks', () => {
    expect(scaleBarLengthM(30_000)).toBe(5_000);
    expect(scaleBarLengthM(2_000)).toBe(500);
    const b = base(300, 200);
    const m = hostCoverMap(b);
    const ticks = texts(m.svg).filter((x) => /^\d{3}\u202f000$/.test(x.text) && x.anchor === 'middle');
    const pxPerM = (ticks[1].x - ticks[0].x) / (Number(ticks[1].text.replace('\u202f', '')) - Number(ticks[0].text.replace('\u202f', '')));
    const widths = [...m.svg.matchAll(/<rect x="[^"]*" y="[^"]*" width="([^"]*)" height="4"[^>]*class="scale-bar"/g)].map((x) => Number(x[1]));
    expect(widths.length).toBe(4);
    expect(relErr(widths.reduce((a, v) => a + v, 0), 5_000 * pxPerM)).toBeLessThan(1e-3);
  });

  it('small grids are vector cells; large grids a PNG raster of one pixel block per cell', () => {
    const small = hostCoverMap(base(40, 30));
    expect(small.svg).not.toMatch(/<image/);
    const large = hostCoverMap(base(300, 200));
    const uri = /href="data:image\/png;base64,([^"]+)"/.exec(large.svg);
    expect(uri).not.toBeNull();
    const png = decode(Buffer.from(uri![1], 'base64'));
    expect([png.width % 300, png.height % 200, png.width / 300]).toEqual([0, 0, png.height / 200]);
    expect(large.svg.length).toBeLessThan(120_000);
  });

  it('ramps darken monotonically (host cover, arrival class) and neighbouring classes differ in grey', () => {
    const host = [0, 0.25, 0.5, 0.75, 1].map((v) => luminance(hostColour(v)));
    for (let k = 1; k < host.length; k++) expect(host[k]).toBeLessThan(host[k - 1]);
    const n = 6;
    const arr = Array.from({ length: n }, (_, k) => luminance(arrivalColour(k, n)));
    for (let k = 1; k < n; k++) expect(arr[k] - arr[k - 1]).toBeGreaterThan(0.03);
  });

  it('front lines: a radial arrival field gives circles of radius speed × year (area within 1 %)', () => {
    const b = base(200, 200, 100);
    const speed = 500; // m/yr
    const lines = arrivalContours(radialArrival(b, speed), b.grid, [5, 10, 15]);
    expect(lines.map((l) => l.year)).toEqual([5, 10, 15]);
    for (const l of lines) {
      const area = l.polygons.reduce((s, p) => s + polygonArea(p), 0);
      const exact = Math.PI * (speed * l.year) ** 2;
      expect(relErr(area, exact), `year ${l.year}`).toBeLessThan(0.01);
    }
  });

  it('arrival maps: baseline and one per option, no NaN, well-formed XML (python xml.etree)', () => {
    const b = base(120, 80);
    const a = radialArrival(b, 400);
    const run = { arrival: { years: a, maxYears: 20 } };
    const maps = mapsForLandscape(b, { grid: { ...b.grid, proj4: '' }, horizonYears: 30, baseline: run, options: [{ label: b.bands[0].label, run }] } as never);
    expect(maps.map((m) => m.id)).toEqual(['map-host', 'map-arrival-baseline', 'map-arrival-a']);
    const arrival = arrivalMap(b, { arrivalYears: a, horizonYears: 30, band: 0, title: 'x' });
    const t = texts(arrival.svg).map((x) => x.text);
    expect(t).toContain('reached by year 5');
    expect(t).toContain('years 25–30');
    expect(t).toContain('not reached within 30 years');
    for (const m of maps) expect(nonFiniteTokens(m.svg)).toEqual([]);
    if (!havePython()) {
      console.warn('SKIPPED: python3 not found; XML well-formedness of the maps was not checked');
      return;
    }
    for (const r of parseWithPython(maps.map((m) => m.svg))) expect(r.error).toBe('');
  });
});
