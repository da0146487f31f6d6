/**
 * Piecewise-uniform 1-D finite-volume grid whose faces include every habitat boundary.
 *
 * Data layout: `nCells` cells, `nCells + 1` faces. Cell i spans [facesKm[i], facesKm[i+1]].
 * Every breakpoint passed to {@link makeGrid} is a face, so habitat interfaces never cut a cell
 * (this is what makes the residence-index scheme exact at interfaces).
 */
export interface Grid {
  readonly nCells: number;
  /** Face positions [km], length nCells + 1, strictly increasing. */
  readonly facesKm: Float64Array;
  /** Cell centres [km], length nCells. */
  readonly centersKm: Float64Array;
  /** Cell widths [km], length nCells. */
  readonly widthsKm: Float64Array;
  /** Index of the breakpoint interval (segment) each cell belongs to, length nCells. */
  readonly segmentAtCells: Int32Array;
  /** First cell of each segment, length nSegments + 1 (last entry = nCells). */
  readonly firstCellOfSegment: Int32Array;
}

/**
 * Builds a grid over consecutive intervals [breaksKm[k], breaksKm[k+1]].
 *
 * Each interval gets `max(minCellsPerSegment, ceil(length / targetCellKm))` equal cells, so the
 * cell size never exceeds `targetCellKm` and every interval is resolved by at least a few cells.
 *
 * @param breaksKm - interval ends [km], strictly increasing, length ≥ 2
 * @param targetCellKm - largest allowed cell width [km], > 0
 * @param minCellsPerSegment - lower bound on cells per interval (default 4)
 * @throws RangeError when the breakpoints are not strictly increasing or the cell size is not positive
 */
export function makeGrid(
  breaksKm: ArrayLike<number>,
  targetCellKm: number,
  minCellsPerSegment = 4,
): Grid {
  if (!(targetCellKm > 0)) throw new RangeError(`targetCellKm must be > 0, got ${targetCellKm}`);
  const nSegments = breaksKm.length - 1;
  if (nSegments < 1) throw new RangeError('makeGrid needs at least two breakpoints');
  const cellsPerSegment = new Int32Array(nSegments);
  let nCells = 0;
  for (let k = 0; k < nSegments; k++) {
    const length = breaksKm[k + 1] - breaksKm[k];
    if (!(length > 0)) {
      throw new RangeError(`breakpoints must increase: [${breaksKm[k]}, ${breaksKm[k + 1]}]`);
    }
    const n = cellsIn(length, targetCellKm, minCellsPerSegment);
    cellsPerSegment[k] = n;
    nCells += n;
  }
  const facesKm = new Float64Array(nCells + 1);
  const centersKm = new Float64Array(nCells);
  const widthsKm = new Float64Array(nCells);
  const segmentAtCells = new Int32Array(nCells);
  const firstCellOfSegment = new Int32Array(nSegments + 1);
  let i = 0;
  for (let k = 0; k < nSegments; k++) {
    firstCellOfSegment[k] = i;
    const a = breaksKm[k];
    const b = breaksKm[k + 1];
    const n = cellsPerSegment[k];
    for (let j = 0; j < n; j++, i++) {
      // Positions from the segment ends, not by accumulation, so interfaces land exactly on faces.
      facesKm[i] = a + ((b - a) * j) / n;
      segmentAtCells[i] = k;
    }
  }
  firstCellOfSegment[nSegments] = nCells;
  facesKm[nCells] = breaksKm[nSegments];
  for (let c = 0; c < nCells; c++) {
    widthsKm[c] = facesKm[c + 1] - facesKm[c];
    centersKm[c] = 0.5 * (facesKm[c] + facesKm[c + 1]);
  }
  return { nCells, facesKm, centersKm, widthsKm, segmentAtCells, firstCellOfSegment };
}

/** Cells in one interval of {@link makeGrid} (the tolerance guards against 10.000000000000002 / 0.1 rounding up to an extra cell). */
function cellsIn(lengthKm: number, targetCellKm: number, minCellsPerSegment: number): number {
  return Math.max(minCellsPerSegment, Math.ceil(lengthKm / targetCellKm - 1e-9));
}

/** Number of cells {@link makeGrid} would make, without making the grid. */
export function countCells(breaksKm: ArrayLike<number>, targetCellKm: number, minCellsPerSegment = 4): number {
  let n = 0;
  for (let k = 0; k + 1 < breaksKm.length; k++) n += cellsIn(breaksKm[k + 1] - breaksKm[k], targetCellKm, minCellsPerSegment);
  return n;
}

/** Index of the cell containing position x [km] (faces belong to the cell on their right; the last face to the last cell). */
export function cellIndexAt(grid: Grid, xKm: number): number {
  const f = grid.facesKm;
  if (xKm <= f[0]) return 0;
  if (xKm >= f[grid.nCells]) return grid.nCells - 1;
  let lo = 0;
  let hi = grid.nCells;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (f[mid] <= xKm) lo = mid;
    else hi = mid;
  }
  return lo;
}
