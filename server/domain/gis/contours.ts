import { contours } from 'd3-contour';
import type { GridSpec } from './rasterise.ts';
import type { Polygon } from './geometry.ts';

/** The area reached by a year: polygons in map metres. */
export interface YearContour {
  year: number;
  polygons: Polygon[];
}

/** Value given to cells never reached (d3-contour needs finite numbers). */
const NEVER = 1e9;

/**
 * Fills cells that are not habitat (NaN in the arrival field, listed in `fill`) with the earliest arrival
 * among their neighbours, repeatedly, so front lines cross lakes and built-up cells instead of running
 * along every shore (for drawing only; downloads keep the cells unreached).
 */
export function fillAcross(years: ArrayLike<number>, grid: Pick<GridSpec, 'nx' | 'ny'>, fill: (i: number) => boolean, passes = 40): Float64Array {
  const { nx, ny } = grid;
  let cur = Float64Array.from(years as ArrayLike<number>, (v) => (Number.isFinite(v) ? v : NaN));
  for (let p = 0; p < passes; p++) {
    const next = cur.slice();
    let changed = false;
    for (let r = 0; r < ny; r++) for (let c = 0; c < nx; c++) {
      const i = r * nx + c;
      if (!Number.isNaN(cur[i]) || !fill(i)) continue;
      let m = Infinity;
      if (c > 0 && cur[i - 1] < m) m = cur[i - 1];
      if (c + 1 < nx && cur[i + 1] < m) m = cur[i + 1];
      if (r > 0 && cur[i - nx] < m) m = cur[i - nx];
      if (r + 1 < ny && cur[i + nx] < m) m = cur[i + nx];
      if (m < Infinity) {
        next[i] = m;
        changed = true;
      }
    }
    cur = next;
    if (!changed) break;
  }
  return cur;
}

/**
 * Areas reached by each year in `years` (arrival ≤ year), from an arrival-time field (NaN = not reached),
 * as polygons in map metres. Marching squares with linear interpolation between cell centres (d3-contour);
 * a cell value sits at its centre, so the line runs where the interpolated arrival equals the year.
 */
export function arrivalContours(arrival: ArrayLike<number>, grid: GridSpec, years: readonly number[]): YearContour[] {
  const { nx, ny, cellM, originXM, originYM } = grid;
  // d3-contour keeps values ≥ threshold: contour −arrival at −year.
  const v = new Float64Array(nx * ny);
  for (let i = 0; i < v.length; i++) {
    const a = arrival[i];
    v[i] = Number.isFinite(a) ? -a : -NEVER;
  }
  const gen = contours().size([nx, ny]).thresholds(years.map((y) => -y));
  // d3-contour returns the thresholds sorted ascending; each MultiPolygon carries its threshold as `value`.
  const out = gen(Array.from(v)).map((mp) => ({
    year: -mp.value,
    polygons: mp.coordinates.map((poly) => poly.map((ring) => ring.map(([gx, gy]) => [originXM + gx * cellM, originYM - gy * cellM] as [number, number]))),
  }));
  return out.sort((a, b) => a.year - b.year);
}

/** Years every `step` from `step` up to the horizon (e.g. 5, 10, …, 30). */
export function contourYears(horizonYears: number, step = 5): number[] {
  const out: number[] = [];
  for (let y = step; y <= horizonYears + 1e-9; y += step) out.push(y);
  return out;
}
