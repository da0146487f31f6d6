import type { GridSpec } from './rasterise.ts';

/** Overlap of model cells with source cells along one axis: for model cell k, source indices and weights. */
export interface AxisOverlap {
  /** start[k] … start[k+1]−1 index into `index` and `weight`. */
  start: Int32Array;
  index: Int32Array;
  /** Overlap length / model cell length (sums to ≤ 1; less where the model cell runs past the source). */
  weight: Float64Array;
}

/**
 * Overlaps along one axis: model cells of length `cell` starting at `from` (n of them) against source cells
 * of length `src` starting at `srcFrom` (m of them). Both measured in the same direction.
 */
export function axisOverlap(n: number, cell: number, from: number, m: number, src: number, srcFrom: number): AxisOverlap {
  const start = new Int32Array(n + 1);
  const idx: number[] = [];
  const wts: number[] = [];
  for (let k = 0; k < n; k++) {
    start[k] = idx.length;
    const a = from + k * cell;
    const b = a + cell;
    const j0 = Math.max(0, Math.floor((a - srcFrom) / src));
    const j1 = Math.min(m - 1, Math.ceil((b - srcFrom) / src) - 1);
    for (let j = j0; j <= j1; j++) {
      const lo = Math.max(a, srcFrom + j * src);
      const hi = Math.min(b, srcFrom + (j + 1) * src);
      if (hi > lo) {
        idx.push(j);
        wts.push((hi - lo) / cell);
      }
    }
  }
  start[n] = idx.length;
  return { start, index: Int32Array.from(idx), weight: Float64Array.from(wts) };
}

/** A source grid: width × height cells of resXM × resYM, west/north edges at originXM/originYM. */
export interface SourceGrid {
  width: number;
  height: number;
  resXM: number;
  resYM: number;
  originXM: number;
  originYM: number;
}

/**
 * Area-weighted averages of several source layers on the model grid: for each model cell,
 * Σ (overlap area / model cell area) · layer value over the source cells it overlaps (conservative
 * remapping: Σ value × area is the same on both grids). Layers are per-source-cell arrays; a weight is
 * applied as-is, so a layer that is 1 on valid cells gives the valid share.
 */
export function areaAverage(src: SourceGrid, model: GridSpec, layers: readonly Float64Array[]): Float64Array[] {
  const ox = axisOverlap(model.nx, model.cellM, model.originXM, src.width, src.resXM, src.originXM);
  // Rows run southwards: measure both as distance below the north edge.
  const oy = axisOverlap(model.ny, model.cellM, -model.originYM, src.height, src.resYM, -src.originYM);
  const out = layers.map(() => new Float64Array(model.nx * model.ny));
  for (let r = 0; r < model.ny; r++) {
    for (let c = 0; c < model.nx; c++) {
      const cell = r * model.nx + c;
      for (let p = oy.start[r]; p < oy.start[r + 1]; p++) {
        const sr = oy.index[p];
        const wy = oy.weight[p];
        for (let q = ox.start[c]; q < ox.start[c + 1]; q++) {
          const w = wy * ox.weight[q];
          const s = sr * src.width + ox.index[q];
          for (let l = 0; l < layers.length; l++) out[l][cell] += w * layers[l][s];
        }
      }
    }
  }
  return out;
}
