import { describe, expect, it } from 'vitest';
import { makeRasterMesh } from '../../server/domain/raster-mesh.ts';
import { RASTER_CLASSES } from '../../server/domain/raster.ts';

const geometry = { nx: 4, ny: 3, cellM: 500, originXM: 1000, originYM: 9000, crs: { code: 'EPSG:25832', proj4: '', name: 'test' } };
const O = RASTER_CLASSES.indexOf('outside');
// Row 0 north. One outside cell at (row 1, col 2).
const classes = Uint8Array.from([0, 0, 0, 0, 0, 1, O, 2, 0, 0, 0, 0]);

describe('raster mesh', () => {
  it('numbers inside cells in raster order, one face per pair of inside 4-neighbours, outside cells excluded', () => {
    const m = makeRasterMesh(geometry, classes, 'impassable');
    expect(m.nCells).toBe(11);
    expect(m.cellOfRaster[6]).toBe(-1);
    expect(m.rasterOfCell[6]).toBe(7);
    // A full 4×3 grid has 3·3 + 4·2 = 17 faces; the outside cell removes its 4.
    expect(m.nFaces).toBe(13);
    for (let f = 0; f < m.nFaces; f++) expect(m.faceCells[2 * f]).toBeLessThan(m.faceCells[2 * f + 1]);
    expect(m.volumes[0]).toBeCloseTo(0.25, 12);
    expect(m.faceAreas[0]).toBeCloseTo(0.5, 12);
    expect(Array.from(m.lethalFacesAtCells).every((x) => x === 0)).toBe(true);
  });

  it('locates points in map km (x east, y north) and counts lethal faces', () => {
    const m = makeRasterMesh(geometry, classes, 'lethal', 'lethal');
    // Cell (row 2, col 3): x ∈ [2.5, 3.0] km, y ∈ [7.5, 8.0] km.
    expect(m.locate(2.9, 7.6)).toBe(m.cellOfRaster[11]);
    expect(m.locate(0.9, 8.5)).toBe(-1);
    expect(m.locate(2.1, 8.4)).toBe(-1); // the outside cell (row 1, col 2)
    expect(m.centres[0]).toBeCloseTo(1.25, 12);
    expect(m.centres[1]).toBeCloseTo(8.75, 12);
    // Corner cell (0,0): west and north map edges.
    expect(m.lethalFacesAtCells[0]).toBe(2);
    expect(m.lethalFacesXAtCells[0]).toBe(1);
    // Cell (1,1) east of... its east neighbour (1,2) is outside: one lethal face, along x.
    expect(m.lethalFacesAtCells[m.cellOfRaster[5]]).toBe(1);
    expect(m.lethalFacesXAtCells[m.cellOfRaster[5]]).toBe(1);
    // Cell (0,2) has the outside cell to its south and the north map edge: two lethal faces, none along x.
    expect(m.lethalFacesAtCells[m.cellOfRaster[2]]).toBe(2);
    expect(m.lethalFacesXAtCells[m.cellOfRaster[2]]).toBe(0);
  });
});

describe('raster mesh remap (first-order conservative remapping of square rasters)', () => {
  const crs = geometry.crs;
  // Source: 4×3 cells of 500 m with one outside cell; target: 7×5 cells of 300 m, shifted, reaching past the
  // source's east and south edges.
  const from = makeRasterMesh(geometry, classes, 'impassable');
  const to = makeRasterMesh({ nx: 7, ny: 5, cellM: 300, originXM: 1130, originYM: 8920, crs }, new Uint8Array(35), 'impassable');
  const values = Float64Array.from({ length: from.nCells }, (_, c) => 1 + ((c * 7) % 5));
  const out = to.remap(values, from);

  it('each target value is the area average of the source field, checked by point sampling (an independent quadrature)', () => {
    // 200 × 200 midpoint samples per target cell of the piecewise-constant source (0 off the map and in
    // the outside cell): the sampling error is at most (cell edge overlap) ~ 1/200 of a cell per edge.
    const m = 200;
    for (let c = 0; c < to.nCells; c++) {
      const x0 = to.centres[2 * c] - 0.15;
      const y1 = to.centres[2 * c + 1] + 0.15;
      let sum = 0;
      for (let a = 0; a < m; a++) {
        for (let b = 0; b < m; b++) {
          const j = from.locate(x0 + ((a + 0.5) * 0.3) / m, y1 - ((b + 0.5) * 0.3) / m);
          if (j >= 0) sum += values[j];
        }
      }
      expect(Math.abs(out[c] - sum / (m * m))).toBeLessThan(5 * (4 / m) * 5 * 0.02 + 1e-12);
    }
  });
  it('keeps Σ value × area over the ground both cover, and a same-grid remap is the identity', () => {
    // The target covers x ∈ [1.13, 3.23], y ∈ [7.42, 8.92] km; the source cells inside that rectangle
    // count by their overlap with it.
    let expected = 0;
    for (let c = 0; c < from.nCells; c++) {
      const ox = Math.max(0, Math.min(from.centres[2 * c] + 0.25, 3.23) - Math.max(from.centres[2 * c] - 0.25, 1.13));
      const oy = Math.max(0, Math.min(from.centres[2 * c + 1] + 0.25, 8.92) - Math.max(from.centres[2 * c + 1] - 0.25, 7.42));
      expected += ox * oy * values[c];
    }
    expect(out.reduce((acc, v) => acc + v * 0.09, 0)).toBeCloseTo(expected, 12);
    expect(Array.from(from.remap(values, from))).toEqual(Array.from(values));
  });
  it('refuses a field from a transect or of the wrong length', () => {
    expect(() => to.remap(new Float64Array(3), from)).toThrow(/3 values; the mesh it comes from has 11 cells/);
    expect(() => to.remap(new Float64Array(1), { ...from, dim: 1 } as never)).toThrow(/only take a field from another map/);
  });
});
