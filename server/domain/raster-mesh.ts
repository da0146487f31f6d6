/**
 * The square raster behind the Mesh interface. Cells are the map cells that are not 'outside' (nodata,
 * water, built-up), numbered in raster order (row-major, row 0 north); faces join 4-neighbours that are
 * both inside. 'Outside' cells have no face: when they are impassable nothing crosses, when they are lethal
 * the operator holds the density at zero on the far side of the face (a Dirichlet face, listed per cell in
 * `lethalFacesAtCells`); map edges likewise (reflecting: nothing; lethal: a Dirichlet face).
 *
 * Mesh coordinates are the map's projected coordinates in km: x east, y north.
 */
import type { Mesh } from './mesh.ts';
import { RASTER_CLASSES, type RasterGeometry } from './raster.ts';
import { axisOverlap } from './gis/resample.ts';

const OUTSIDE = RASTER_CLASSES.indexOf('outside');

export interface RasterMesh extends Mesh {
  readonly dim: 2;
  readonly nx: number;
  readonly ny: number;
  /** Cell side [km]. */
  readonly cellKm: number;
  /** The map's north-west corner [km]: x of its west edge, y of its north edge. */
  readonly originKm: readonly [number, number];
  /** Raster index (row·nx + col) of each mesh cell, length nCells. */
  readonly rasterOfCell: Int32Array;
  /** Mesh cell of each raster index, −1 for outside cells, length nx·ny. */
  readonly cellOfRaster: Int32Array;
  /**
   * Number of Dirichlet (u = 0) faces of each mesh cell: sides towards a lethal 'outside' cell or a lethal
   * map edge. 0 everywhere when both are reflecting/impassable. Length nCells.
   */
  readonly lethalFacesAtCells: Uint8Array;
  /** Of those, the faces on the cell's west and east sides (the rest are north and south). Length nCells. */
  readonly lethalFacesXAtCells: Uint8Array;
}

/**
 * The faces between cells (each once, from the east and south neighbours, low index first) and, per cell,
 * its lethal faces (to the map's edge or an outside cell, as the settings say) and those among them along x.
 */
function meshFaces(
  nx: number,
  ny: number,
  nCells: number,
  cellOfRaster: Int32Array,
  outside: 'impassable' | 'lethal',
  mapEdges: 'reflecting' | 'lethal',
): { faces: Int32Array; lethalFacesAtCells: Uint8Array; lethalFacesXAtCells: Uint8Array } {
  const lethalFacesAtCells = new Uint8Array(nCells);
  const lethalFacesXAtCells = new Uint8Array(nCells);
  // At most two owned faces per cell, two cell numbers each.
  const faces = new Int32Array(4 * nCells);
  let nf = 0;
  for (let row = 0; row < ny; row++) {
    for (let col = 0; col < nx; col++) {
      const c = cellOfRaster[row * nx + col];
      if (c < 0) continue;
      let lethal = 0;
      let lethalX = 0;
      // East, south (the faces this cell owns), west, north.
      for (let side = 0; side < 4; side++) {
        const r = side === 1 ? row + 1 : side === 3 ? row - 1 : row;
        const q = side === 0 ? col + 1 : side === 2 ? col - 1 : col;
        const alongX = side === 0 || side === 2;
        if (r < 0 || r >= ny || q < 0 || q >= nx) {
          if (mapEdges === 'lethal') (lethal++, alongX && lethalX++);
          continue;
        }
        const j = cellOfRaster[r * nx + q];
        if (j < 0) {
          if (outside === 'lethal') (lethal++, alongX && lethalX++);
          continue;
        }
        if (side < 2) (faces[nf++] = c), (faces[nf++] = j);
      }
      lethalFacesAtCells[c] = lethal;
      lethalFacesXAtCells[c] = lethalX;
    }
  }
  return { faces: faces.slice(0, nf), lethalFacesAtCells, lethalFacesXAtCells };
}

/**
 * Builds the mesh of a raster.
 *
 * @param geometry - raster geometry (cell side in m, origin in m)
 * @param classAtCells - class index per raster cell (RASTER_CLASSES)
 * @param outside - what 'outside' cells are to the pest
 * @param mapEdges - what lies beyond the map's edges
 */
export function makeRasterMesh(
  geometry: RasterGeometry,
  classAtCells: Uint8Array,
  outside: 'impassable' | 'lethal',
  mapEdges: 'reflecting' | 'lethal' = 'reflecting',
): RasterMesh {
  const { nx, ny } = geometry;
  if (classAtCells.length !== nx * ny) throw new RangeError(`classAtCells has ${classAtCells.length} entries; the raster has ${nx}×${ny}`);
  const cellKm = geometry.cellM / 1000;
  const cellOfRaster = new Int32Array(nx * ny).fill(-1);
  let nCells = 0;
  for (let k = 0; k < nx * ny; k++) if (classAtCells[k] !== OUTSIDE) cellOfRaster[k] = nCells++;
  const rasterOfCell = new Int32Array(nCells);
  const volumes = new Float64Array(nCells).fill(cellKm * cellKm);
  const centres = new Float64Array(2 * nCells);
  const x0 = geometry.originXM / 1000;
  const y0 = geometry.originYM / 1000;
  for (let k = 0; k < nx * ny; k++) {
    const c = cellOfRaster[k];
    if (c < 0) continue;
    rasterOfCell[c] = k;
    centres[2 * c] = x0 + ((k % nx) + 0.5) * cellKm;
    centres[2 * c + 1] = y0 - (Math.floor(k / nx) + 0.5) * cellKm;
  }
  const { faces, lethalFacesAtCells, lethalFacesXAtCells } = meshFaces(nx, ny, nCells, cellOfRaster, outside, mapEdges);
  const nFaces = faces.length / 2;
  const mesh: RasterMesh = {
    dim: 2,
    nx,
    ny,
    cellKm,
    originKm: [x0, y0],
    nCells,
    nFaces,
    volumes,
    centres,
    faceCells: faces,
    faceAreas: new Float64Array(nFaces).fill(cellKm),
    faceDistances: new Float64Array(nFaces).fill(cellKm),
    rasterOfCell,
    cellOfRaster,
    lethalFacesAtCells,
    lethalFacesXAtCells,
    locate(x: number, y?: number): number {
      if (y === undefined) return -1;
      const col = Math.floor((x - x0) / cellKm);
      const row = Math.floor((y0 - y) / cellKm);
      if (col < 0 || col >= nx || row < 0 || row >= ny) return -1;
      return cellOfRaster[row * nx + col];
    },
    remap(values: Float64Array, from: Mesh): Float64Array {
      if (!isRasterMesh(from)) throw new RangeError(`a map can only take a field from another map (got a ${from.dim}-D mesh)`);
      if (values.length !== from.nCells) throw new RangeError(`the field has ${values.length} values; the mesh it comes from has ${from.nCells} cells`);
      return remapRaster(from, values, mesh);
    },
  };
  return mesh;
}

function isRasterMesh(m: Mesh): m is RasterMesh {
  return m.dim === 2 && 'cellOfRaster' in m;
}

/**
 * Area-weighted cell averages of a per-cell field of `from` on the cells of `to` (first-order conservative
 * remapping of axis-aligned square rasters). A target cell's average is over its whole area: ground that
 * `from` does not cover (beyond its map, or its 'outside' cells) holds no insects, so Σ value × area is kept.
 */
function remapRaster(from: RasterMesh, values: Float64Array, to: RasterMesh): Float64Array {
  // Weights are overlap length / target cell side per axis; rows run south, so both are measured below the north edge.
  const ox = axisOverlap(to.nx, to.cellKm, to.originKm[0], from.nx, from.cellKm, from.originKm[0]);
  const oy = axisOverlap(to.ny, to.cellKm, -to.originKm[1], from.ny, from.cellKm, -from.originKm[1]);
  const out = new Float64Array(to.nCells);
  for (let c = 0; c < to.nCells; c++) {
    const k = to.rasterOfCell[c];
    const row = Math.floor(k / to.nx);
    const col = k - row * to.nx;
    let acc = 0;
    for (let p = oy.start[row]; p < oy.start[row + 1]; p++) {
      for (let q = ox.start[col]; q < ox.start[col + 1]; q++) {
        const j = from.cellOfRaster[oy.index[p] * from.nx + ox.index[q]];
        if (j >= 0) acc += oy.weight[p] * ox.weight[q] * values[j];
      }
    }
    out[c] = acc;
  }
  return out;
}
