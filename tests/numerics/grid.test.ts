import { describe, expect, it } from 'vitest';
import { cellIndexAt, makeGrid } from '../../server/numerics/grid.ts';
import { expectAllClose } from '../helpers/close.ts';

describe('makeGrid', () => {
  it('puts every breakpoint on a face and respects the cell size bound', () => {
    const breaks = [0, 10, 10.35, 25];
    const g = makeGrid(breaks, 0.1, 4);
    for (const b of breaks) expect(Array.from(g.facesKm)).toContain(b);
    for (const w of g.widthsKm) expect(w).toBeLessThanOrEqual(0.1 + 1e-12);
    expect(g.firstCellOfSegment[1] - g.firstCellOfSegment[0]).toBe(100);
    expect(g.firstCellOfSegment[2] - g.firstCellOfSegment[1]).toBe(4);
    const sum = g.widthsKm.reduce((a, b) => a + b, 0);
    expectAllClose(sum, 25, { rtol: 1e-14 });
    expect(g.segmentAtCells[g.firstCellOfSegment[1]]).toBe(1);
  });
  it('finds the cell containing a point', () => {
    const g = makeGrid([0, 1], 0.25, 1);
    expect([cellIndexAt(g, -1), cellIndexAt(g, 0), cellIndexAt(g, 0.3), cellIndexAt(g, 0.5), cellIndexAt(g, 2)]).toEqual([0, 0, 1, 2, 3]);
  });
  it('rejects non-increasing breakpoints', () => {
    expect(() => makeGrid([0, 1, 1], 0.1)).toThrow(/must increase/);
  });
});
