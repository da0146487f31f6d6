/**
 * Today's transect grid (numerics/grid.ts) behind the Mesh interface: cells are the grid's cells (volume =
 * width [km]), interior faces join neighbours i and i+1 (measure 1, distance between centres), a point is
 * located by bisection on the faces, and a field is remapped from another transect by overlap. The 1-D
 * engine keeps its fused tridiagonal path on the Grid itself (numerics/diffusion.ts, coupled.ts): the
 * bench's engine run spends most of its time in that solve, and a general face loop would add an
 * indirection per face for nothing in 1-D. Code that must work on both transects and maps (regions,
 * watches, weights) goes through this interface.
 */
import { cellIndexAt, type Grid } from '../numerics/grid.ts';
import type { Mesh, Region } from './mesh.ts';

export interface TransectMesh extends Mesh {
  readonly dim: 1;
  readonly grid: Grid;
}

export function transectMesh(grid: Grid): TransectMesh {
  const n = grid.nCells;
  const nFaces = Math.max(0, n - 1);
  const faceCells = new Int32Array(2 * nFaces);
  const faceAreas = new Float64Array(nFaces).fill(1);
  const faceDistances = new Float64Array(nFaces);
  for (let f = 0; f < nFaces; f++) {
    faceCells[2 * f] = f;
    faceCells[2 * f + 1] = f + 1;
    faceDistances[f] = grid.centersKm[f + 1] - grid.centersKm[f];
  }
  const lo = grid.facesKm[0];
  const hi = grid.facesKm[n];
  return {
    dim: 1,
    grid,
    nCells: n,
    nFaces,
    volumes: grid.widthsKm,
    centres: grid.centersKm,
    faceCells,
    faceAreas,
    faceDistances,
    locate: (x: number) => (x < lo || x > hi ? -1 : cellIndexAt(grid, x)),
    remap(values: Float64Array, from: Mesh): Float64Array {
      if (!isTransectMesh(from)) throw new RangeError(`a transect can only take a field from another transect (got a ${from.dim}-D mesh)`);
      if (values.length !== from.nCells) throw new RangeError(`the field has ${values.length} values; the mesh it comes from has ${from.nCells} cells`);
      return remapGrid(from.grid, values, grid);
    },
  };
}

function isTransectMesh(m: Mesh): m is TransectMesh {
  return m.dim === 1 && 'grid' in m;
}

/**
 * Cell averages of a piecewise-constant field (cells of `from`) over the cells of `to` (overlap-weighted).
 * Positions outside `from` take the nearest end value.
 */
function remapGrid(from: Grid, values: Float64Array, to: Grid): Float64Array {
  const out = new Float64Array(to.nCells);
  const ff = from.facesKm;
  let j = 0;
  for (let i = 0; i < to.nCells; i++) {
    const a = to.facesKm[i];
    const b = to.facesKm[i + 1];
    while (j < from.nCells - 1 && ff[j + 1] <= a) j++;
    let k = j;
    let acc = 0;
    let covered = 0;
    while (k < from.nCells && ff[k] < b) {
      const o = Math.min(b, ff[k + 1]) - Math.max(a, ff[k]);
      if (o > 0) {
        acc += o * values[k];
        covered += o;
      }
      k++;
    }
    if (covered > 0) out[i] = acc / covered;
    else out[i] = a < ff[0] ? values[0] : values[from.nCells - 1];
  }
  return out;
}

/** Share of each cell inside a region (an interval: overlap / width; a mask: its cover). */
export function regionCover(mesh: TransectMesh, region: Region): Float64Array {
  const out = new Float64Array(mesh.nCells);
  if (region.kind === 'mask') {
    out.set(region.cover);
    return out;
  }
  const f = mesh.grid.facesKm;
  for (let i = 0; i < mesh.nCells; i++) {
    const overlap = Math.min(f[i + 1], region.toKm) - Math.max(f[i], region.fromKm);
    if (overlap > 0) out[i] = Math.min(1, overlap / mesh.grid.widthsKm[i]);
  }
  return out;
}
