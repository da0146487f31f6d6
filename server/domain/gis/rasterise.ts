import { orientPolygon, type Polygon } from './geometry.ts';

/** A north-up square grid in projected metres (the geometry part of RasterGeometry). */
export interface GridSpec {
  nx: number;
  ny: number;
  cellM: number;
  /** West edge of column 0 [m]. */
  originXM: number;
  /** North edge of row 0 [m]. */
  originYM: number;
}

/** Bounding box of rings of points. */
function boundsOf(rings: readonly (readonly (readonly [number, number])[])[]): { xmin: number; xmax: number; ymin: number; ymax: number } {
  let xmin = Infinity, xmax = -Infinity, ymin = Infinity, ymax = -Infinity;
  for (const r of rings) for (const [x, y] of r) {
    if (x < xmin) xmin = x;
    if (x > xmax) xmax = x;
    if (y < ymin) ymin = y;
    if (y > ymax) ymax = y;
  }
  return { xmin, xmax, ymin, ymax };
}

/**
 * Adds `weight × (share of each cell inside the polygon)` to `out` (row-major, row 0 north). The share is the
 * exact area of polygon ∩ cell over the cell area (to round-off), not a cell-centre test, so Σ share × cell
 * area equals the polygon's area inside the grid.
 *
 * @remarks
 * Per row strip, the area of P ∩ cell [x₀,x₁] is ∫ (x₁ − clamp(x_e(y), x₀, x₁)) dy summed over the edges e
 * with the sign of their direction (Green's theorem on the clipped polygon; the same accumulation the
 * scan-converters of outline fonts use). Each edge is split at row and column lines; the piece in column k
 * adds −dy·(x₁ − x̄) to cell k and −dy·(cell width) to every cell east of it (kept as a difference array and
 * summed once per row). Work is O(edge crossings + bounding-box cells). Coordinates are shifted to the
 * grid origin and scaled to cell units first, so map coordinates of 10⁶–10⁷ m lose no precision.
 * Rings may have any orientation and a closing point or not; holes are subtracted. Overlapping polygons
 * of one call are not merged: call once per polygon.
 */
export function addPolygonCover(grid: GridSpec, polygon: Polygon, out: Float32Array | Float64Array, weight = 1): void {
  const { nx, ny, cellM, originXM, originYM } = grid;
  const bottom = originYM - ny * cellM;
  const rings = orientPolygon(polygon).map((r) => r.map(([x, y]) => [(x - originXM) / cellM, (y - bottom) / cellM] as [number, number]));
  const { xmin, xmax, ymin, ymax } = boundsOf(rings);
  const c0 = Math.max(0, Math.floor(xmin));
  const c1 = Math.min(nx - 1, Math.floor(xmax));
  const b0 = Math.max(0, Math.floor(ymin)); // rows counted from the south edge
  const b1 = Math.min(ny - 1, Math.floor(ymax));
  if (c0 > c1 || b0 > b1 || xmax <= 0 || ymax <= 0 || ymin >= ny) return;
  const w = c1 - c0 + 1;
  const h = b1 - b0 + 1;
  const direct = new Float64Array(w * h);
  const carry = new Float64Array((w + 1) * h);

  const addPiece = (rowB: number, xa: number, xb: number, dy: number) => {
    const xm = 0.5 * (xa + xb);
    const k = Math.floor(xm);
    const rr = rowB - b0;
    if (k < c0) carry[rr * (w + 1)] -= dy;
    else if (k <= c1) {
      direct[rr * w + (k - c0)] -= dy * (k + 1 - xm);
      carry[rr * (w + 1) + (k - c0) + 1] -= dy;
    }
  };

  const ys: number[] = [];
  for (const ring of rings) {
    const n = ring.length;
    for (let i = 0; i < n; i++) {
      const [xa, ya] = ring[i];
      const [xb, yb] = ring[(i + 1) % n];
      if (ya === yb) continue;
      const sgn = yb > ya ? 1 : -1;
      const lo = Math.max(Math.min(ya, yb), b0);
      const hi = Math.min(Math.max(ya, yb), b1 + 1);
      if (!(lo < hi)) continue;
      const slope = (xb - xa) / (yb - ya);
      const xAt = (y: number) => xa + (y - ya) * slope;
      for (let rb = Math.floor(lo); rb < hi; rb++) {
        const s0 = Math.max(rb, lo);
        const s1 = Math.min(rb + 1, hi);
        if (!(s1 > s0)) continue;
        const x0 = xAt(s0);
        const x1 = xAt(s1);
        const kLo = Math.floor(Math.min(x0, x1));
        const kHi = Math.floor(Math.max(x0, x1));
        if (kLo === kHi || x0 === x1) {
          addPiece(rb, x0, x1, sgn * (s1 - s0));
          continue;
        }
        // Split at the column lines between x0 and x1 (in order of y).
        ys.length = 0;
        ys.push(s0);
        const step = x1 > x0 ? 1 : -1;
        for (let j = step > 0 ? kLo + 1 : kHi; step > 0 ? j <= kHi : j > kLo; j += step) {
          const t = s0 + ((j - x0) / (x1 - x0)) * (s1 - s0);
          if (t > ys[ys.length - 1] && t < s1) ys.push(t);
        }
        ys.push(s1);
        for (let q = 0; q + 1 < ys.length; q++) addPiece(rb, xAt(ys[q]), xAt(ys[q + 1]), sgn * (ys[q + 1] - ys[q]));
      }
    }
  }
  for (let rr = 0; rr < h; rr++) {
    const row = ny - 1 - (b0 + rr); // row index from the north
    let acc = 0;
    for (let cc = 0; cc < w; cc++) {
      acc += carry[rr * (w + 1) + cc];
      let share = direct[rr * w + cc] + acc;
      if (share <= 1e-12) continue;
      if (share > 1) share = 1;
      out[row * nx + c0 + cc] += weight * share;
    }
  }
}

/** The share of each cell inside the polygon (0–1), as a new array. */
export function polygonCover(grid: GridSpec, polygon: Polygon): Float32Array {
  const out = new Float32Array(grid.nx * grid.ny);
  addPolygonCover(grid, polygon, out);
  return out;
}

/** The cell containing a map point [m], or −1 outside the grid. */
export function cellAt(grid: GridSpec, x: number, y: number): number {
  const col = Math.floor((x - grid.originXM) / grid.cellM);
  const row = Math.floor((grid.originYM - y) / grid.cellM);
  if (col < 0 || col >= grid.nx || row < 0 || row >= grid.ny) return -1;
  return row * grid.nx + col;
}

/** Centre of a cell [m]. */
export function cellCentre(grid: GridSpec, index: number): [number, number] {
  const row = Math.floor(index / grid.nx);
  const col = index - row * grid.nx;
  return [grid.originXM + (col + 0.5) * grid.cellM, grid.originYM - (row + 0.5) * grid.cellM];
}
