/** Planar geometry on the map plane: shoelace areas, orientation (RFC 7946 §3.1.6), discs of exact area, bands of area w·L. */
import { describe, expect, it } from 'vitest';
import { bandPolygon, bbox, discPolygon, lineLength, openRing, orientPolygon, polygonArea, ringArea, type Polygon, type Xy } from '../../../server/domain/gis/geometry.ts';
import { expectAllClose } from '../../helpers/close.ts';

const square = (x0: number, y0: number, s: number): Xy[] => [[x0, y0], [x0 + s, y0], [x0 + s, y0 + s], [x0, y0 + s]];

describe('rings and polygons', () => {
  it('shoelace: +1 for the counter-clockwise unit square, −1 clockwise; a closing point changes nothing', () => {
    expect(ringArea(square(0, 0, 1))).toBe(1);
    expect(ringArea([...square(0, 0, 1)].reverse())).toBe(-1);
    expect(ringArea([...square(0, 0, 1), [0, 0]])).toBe(1);
    expect(openRing([[0, 0], [1, 0], [0, 1], [0, 0]])).toEqual([[0, 0], [1, 0], [0, 1]]);
  });
  it('outer ring counter-clockwise, holes clockwise; area = outer − holes (10 × 10 with a 2 × 2 hole: 96)', () => {
    const poly = orientPolygon([[...square(0, 0, 10)].reverse(), square(3, 3, 2)]);
    expect(ringArea(poly[0])).toBeGreaterThan(0);
    expect(ringArea(poly[1])).toBeLessThan(0);
    expect(polygonArea(poly)).toBe(96);
    expect(bbox([poly, [square(-5, 20, 1)]])).toEqual([-5, 0, 10, 21]);
  });
  it('a disc polygon has the area πr² of its disc', () => {
    for (const n of [16, 128]) expectAllClose(polygonArea(discPolygon(100, 200, 50, n)), Math.PI * 2500, { rtol: 1e-12 });
  });
  it('lineLength: 3-4-5 and 5-12-13 segments', () => {
    expect(lineLength([[0, 0], [3, 4], [8, 16]])).toBe(18);
  });
});

describe('bandPolygon', () => {
  it('a straight line gives the rectangle (corners by hand)', () => {
    const band = bandPolygon([[0, 0], [100, 0]], 20) as Polygon;
    const pts = band[0].map(([x, y]) => `${x},${y}`).sort();
    expect(pts).toEqual(['0,-10', '0,10', '100,-10', '100,10']);
  });
  it('bends are mitred and the area is exactly width × centre-line length', () => {
    const line: Xy[] = [[0, 0], [1000, 0], [1500, 800], [1500, 2000]];
    const band = bandPolygon(line, 60) as Polygon;
    expectAllClose(polygonArea(band), 60 * lineLength(line), { rtol: 1e-12 });
  });
  it('refuses a line with no length, a hairpin and a bend too sharp for its segments, naming the vertex', () => {
    expect(bandPolygon([[5, 5], [5, 5]], 10)).toMatchObject({ index: 1 });
    expect(bandPolygon([[0, 0], [100, 0], [0, 1]], 10)).toMatchObject({ index: 1, message: expect.stringMatching(/turns back/) });
    // 120° turn: the mitre reaches h·tan(60°) ≈ 173 m into each segment for a 200 m band; segments of 100 m are too short.
    expect(bandPolygon([[0, 0], [100, 0], [50, 86.6]], 200)).toMatchObject({ index: 1, message: expect.stringMatching(/fold over itself/) });
  });
});
