/** Arrival contours: a radial arrival field gives discs of radius c·t (area π(ct)²); hole filling and contour years by hand. */
import { describe, expect, it } from 'vitest';
import { arrivalContours, contourYears, fillAcross } from '../../../server/domain/gis/contours.ts';
import { polygonArea } from '../../../server/domain/gis/geometry.ts';
import { expectAllClose } from '../../helpers/close.ts';

describe('arrivalContours', () => {
  it('arrival = distance/c from the centre: the year-t area is a disc of radius c·t', () => {
    // 80 × 80 cells of 100 m, centre at the middle, c = 500 m/yr; years 4 and 8 → radii 2 and 4 km.
    const grid = { nx: 80, ny: 80, cellM: 100, originXM: 0, originYM: 8000 };
    const arrival = new Float64Array(80 * 80);
    for (let r = 0; r < 80; r++) for (let c = 0; c < 80; c++) {
      const x = (c + 0.5) * 100 - 4000;
      const y = 4000 - (r + 0.5) * 100;
      arrival[r * 80 + c] = Math.hypot(x, y) / 500;
    }
    const out = arrivalContours(arrival, grid, [8, 4]);
    expect(out.map((c) => c.year)).toEqual([4, 8]);
    for (const c of out) {
      const area = c.polygons.reduce((s, p) => s + polygonArea(p), 0);
      const exact = Math.PI * (500 * c.year) ** 2;
      // Marching squares on the cone between cell centres: chords of a circle, error O((h/R)²) ≈ 0.1 % here.
      expectAllClose(area, exact, { rtol: 5e-3 });
      // The disc is centred on the map's middle (map metres, y up).
      const xs = c.polygons.flatMap((p) => p[0].map(([x]) => x));
      expectAllClose((Math.min(...xs) + Math.max(...xs)) / 2, 4000, { rtol: 1e-2 });
    }
  });
  it('a field never reached gives no polygon', () => {
    const out = arrivalContours(new Float64Array(9).fill(NaN), { nx: 3, ny: 3, cellM: 10, originXM: 0, originYM: 30 }, [5]);
    expect(out[0].polygons).toEqual([]);
  });
});

describe('fillAcross and contourYears', () => {
  it('fills marked non-habitat cells with the earliest neighbour, repeatedly; others stay unreached', () => {
    // 4 × 1 row: 1, lake, lake, NaN(not marked).
    const out = fillAcross([1, NaN, NaN, NaN], { nx: 4, ny: 1 }, (i) => i === 1 || i === 2);
    expect(Array.from(out)).toEqual([1, 1, 1, NaN]);
  });
  it('every step years up to the horizon', () => {
    expect(contourYears(30)).toEqual([5, 10, 15, 20, 25, 30]);
    expect(contourYears(12, 4)).toEqual([4, 8, 12]);
    expect(contourYears(3)).toEqual([]);
  });
});
