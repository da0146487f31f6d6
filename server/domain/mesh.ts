/**
 * WHERE the model is solved: geometry without physics. A Mesh is a set of finite-volume cells and the
 * faces between them; coefficients live on faces (harmonic means), unknowns on cells. The transect
 * (1-D, piecewise-uniform) and the raster map (2-D, square cells) both sit behind this interface, so the
 * barrier geometry, bypass weights, crossing watches and trackers can be written once.
 *
 * Data layout (all typed arrays, allocated once):
 * - cells 0…nCells−1: `volumes[i]` [km² in 2-D, km in 1-D], `centres` (dim values per cell, interleaved);
 * - interior faces 0…nFaces−1: `faceCells[2f]`, `faceCells[2f+1]` (the two cells, low index first),
 *   `faceAreas[f]` (length of the face [km] in 2-D, 1 in 1-D), `faceDistances[f]` (centre-to-centre [km]);
 *   boundary faces are not listed: ends/map edges are handled by the operator (reflecting or lethal).
 */
export interface Mesh {
  readonly dim: 1 | 2;
  readonly nCells: number;
  readonly nFaces: number;
  /** Cell volumes, length nCells [km (1-D) or km² (2-D)]. */
  readonly volumes: Float64Array;
  /** Cell centres, length dim·nCells, interleaved (x0, y0, x1, y1, …) [km]. */
  readonly centres: Float64Array;
  /** The two cells of each interior face, length 2·nFaces. */
  readonly faceCells: Int32Array;
  /** Face measure, length nFaces [km in 2-D; 1 in 1-D]. */
  readonly faceAreas: Float64Array;
  /** Distance between the two cell centres of each face, length nFaces [km]. */
  readonly faceDistances: Float64Array;
  /** The cell containing a point [km in mesh coordinates], or −1 when it is outside the mesh. */
  locate(x: number, y?: number): number;
  /**
   * Cell averages on this mesh of a field that is constant on each cell of `from` (same dimension):
   * overlap-weighted, so Σ value × volume is kept wherever the two meshes cover the same ground. A transect
   * averages over the part of each cell that `from` covers (the nearest end value of `from` where it covers
   * none); a map averages over the whole cell, ground that `from` does not cover holding no insects.
   * @throws RangeError when `from` is not a mesh of the same kind, or `values` is not one per cell of `from`
   */
  remap(values: Float64Array, from: Mesh): Float64Array;
}

/**
 * A region of a mesh: an interval of a transect or a cell mask of a map. The one barrier geometry shared by
 * the clearing, the bypass weights and the crossing watch.
 */
export type Region =
  | { kind: 'interval'; fromKm: number; toKm: number }
  | { kind: 'mask'; /** share of each cell inside the region (0–1), length nCells */ cover: Float32Array };
