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
