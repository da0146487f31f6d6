/** The transect grid behind the Mesh interface: volumes sum to the length, faces join neighbours, locate and region cover. */
import { describe, expect, it } from 'vitest';
import { makeGrid } from '../../server/numerics/grid.ts';
import { regionCover, transectMesh } from '../../server/domain/transect-mesh.ts';
import { barrierGeometry } from '../../server/problem/geometry.ts';

describe('transect mesh', () => {
  const grid = makeGrid([0, 1, 1.3, 3], 0.1, 4);
  const mesh = transectMesh(grid);
  it('cells, volumes and interior faces', () => {
    expect(mesh.dim).toBe(1);
    expect(mesh.nCells).toBe(grid.nCells);
    expect(mesh.nFaces).toBe(grid.nCells - 1);
    expect(mesh.volumes.reduce((a, b) => a + b, 0)).toBeCloseTo(3, 12);
    for (let f = 0; f < mesh.nFaces; f++) {
      expect(mesh.faceCells[2 * f + 1] - mesh.faceCells[2 * f]).toBe(1);
      expect(mesh.faceDistances[f]).toBeCloseTo(0.5 * (grid.widthsKm[f] + grid.widthsKm[f + 1]), 12);
    }
  });
  it('locates points inside and refuses points outside', () => {
    expect(mesh.locate(0.05)).toBe(0);
    expect(mesh.locate(1.16)).toBe(grid.firstCellOfSegment[1] + 2); // 4 cells of 75 m in [1, 1.3]
    expect(mesh.locate(-0.1)).toBe(-1);
    expect(mesh.locate(3.2)).toBe(-1);
  });
  it('the clearing of a barrier geometry covers exactly its cells (edges on faces)', () => {
    const g = barrierGeometry({ infestation: { toKm: 0.5 } }, { fromKm: 1, widthM: 300 });
    expect(g).toMatchObject({ direction: 1, side: 'right', nearKm: 1, farKm: 1.3 });
    const cover = regionCover(mesh, g.region);
    let length = 0;
    cover.forEach((c, i) => {
      expect(c === 0 || c === 1).toBe(true);
      length += c * grid.widthsKm[i];
    });
    expect(length).toBeCloseTo(0.3, 12);
  });
});
