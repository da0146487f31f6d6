/** The transect grid behind the Mesh interface: volumes sum to the length, faces join neighbours, locate, region cover and remap. */
import { describe, expect, it } from 'vitest';
import { makeGrid } from '../../server/numerics/grid.ts';
import { regionCover, transectMesh } from '../../server/domain/transect-mesh.ts';
import { barrierGeometry } from '../../server/problem/geometry.ts';
import { makeRasterMesh } from '../../server/domain/raster-mesh.ts';
import { piecewiseGrid } from '../helpers/solve.ts';
import { expectAllClose } from '../helpers/close.ts';

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

describe('transect mesh remap (first-order conservative remapping: cell averages over overlaps)', () => {
  const remap = (a: ReturnType<typeof makeGrid>, v: Float64Array, b: ReturnType<typeof makeGrid>) => transectMesh(b).remap(v, transectMesh(a));
  it('cell averages over the overlaps (hand values) and the integral is kept', () => {
    const from = piecewiseGrid([0, 1, 2, 4], [1, 1, 1]);
    const to = piecewiseGrid([0, 0.5, 1.5, 4], [1, 1, 1]);
    const out = remap(from, Float64Array.of(1, 2, 3), to);
    // [0, 0.5]: 1; [0.5, 1.5]: (0.5·1 + 0.5·2)/1 = 1.5; [1.5, 4]: (0.5·2 + 2·3)/2.5 = 2.8.
    expectAllClose(out, [1, 1.5, 2.8], { rtol: 1e-14 });
    expectAllClose(0.5 * out[0] + 1 * out[1] + 2.5 * out[2], 1 + 2 + 6, { rtol: 1e-14 });
  });
  it('onto a finer grid each sub-cell takes its parent value; outside the source the nearest end value', () => {
    const from = piecewiseGrid([1, 2, 3], [1, 1]);
    const to = piecewiseGrid([0, 1, 3, 4], [1, 4, 1]);
    expectAllClose(remap(from, Float64Array.of(5, 7), to), [5, 5, 5, 7, 7, 7], { rtol: 1e-14 });
  });
  it('conserves ∫v dx between unrelated grids covering the same stretch', () => {
    const a = makeGrid([0, 1.3, 3], 0.07, 4);
    const b = makeGrid([0, 0.5, 3], 0.11, 4);
    const v = Float64Array.from(a.centersKm, (x) => Math.exp(-x) * (1 + Math.sin(3 * x)));
    const w = remap(a, v, b);
    const int = (g: typeof a, f: Float64Array) => f.reduce((acc, x, i) => acc + x * g.widthsKm[i], 0);
    expect(int(b, w)).toBeCloseTo(int(a, v), 12);
  });
  it('refuses a field from a map or of the wrong length, naming both sizes', () => {
    const m = transectMesh(makeGrid([0, 1], 0.25, 4));
    const map = makeRasterMesh({ nx: 2, ny: 2, cellM: 100, originXM: 0, originYM: 0, crs: { code: 'EPSG:25832', proj4: '', name: 'test' } }, new Uint8Array(4), 'impassable');
    expect(() => m.remap(new Float64Array(4), map)).toThrow(/only take a field from another transect/);
    expect(() => m.remap(new Float64Array(3), m)).toThrow(/3 values; the mesh it comes from has 4 cells/);
  });
});
