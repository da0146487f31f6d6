/**
 * Finite-volume movement operator on a square raster, in residence-index form: `du/dt = L u`, L = Lx + Ly.
 *
 * @remarks
 * With `u = rho v` and conductance `A = D rho` per cell, the flux through the face between 4-neighbours i, j
 * (side h) is `F = −A_f (v_j − v_i)` per unit face length / h, `A_f = 2 A_i A_j / (A_i + A_j)` (harmonic
 * mean: two half-cell resistances in series), so `du_i/dt = Σ_faces A_f (v_j − v_i) / h²`. This is the
 * transect operator (numerics/diffusion.ts) applied across every face in its normal direction: flux
 * continuity and the density jump `u_j/u_i = rho_j/rho_i` hold at every habitat edge without special
 * stencils (Ovaskainen & Cornell 2003; Maciel & Lutscher 2013), and a strip uniform across reproduces the
 * 1-D operator exactly. A Dirichlet face (u = 0 beyond: lethal 'outside' cell or lethal map edge) adds the
 * half-cell term `−2 A_i v_i / h²`, the 1-D absorbing end. `Σ h² u_i` is conserved without Dirichlet faces.
 *
 * Layout: full raster arrays (length nx·ny, row-major, row 0 north); `gx[k]` is the face between k and k+1
 * (0 at the east end of a row or where either side is outside), `gy[k]` the face between k and k+nx. Cells
 * outside the mesh have zero conductances and stay at u = 0.
 */
/**
 * What the operator reads of a raster mesh (domain/raster-mesh.ts's RasterMesh has these members): cells,
 * their raster index, the interior faces with their two cells and the lethal faces per cell. Declared here
 * so that numerics imports nothing from the layers above it.
 */
export interface RasterFaces {
  readonly nx: number;
  readonly ny: number;
  /** Cell side [km]. */
  readonly cellKm: number;
  readonly nCells: number;
  readonly nFaces: number;
  /** The two cells of each interior face, length 2·nFaces. */
  readonly faceCells: Int32Array;
  /** Raster index (row·nx + col) of each mesh cell. */
  readonly rasterOfCell: Int32Array;
  /** Dirichlet faces of each mesh cell, and of those the west/east ones. */
  readonly lethalFacesAtCells: Uint8Array;
  readonly lethalFacesXAtCells: Uint8Array;
}

export interface RasterOperator {
  readonly nx: number;
  readonly ny: number;
  /** Cell side [km]. */
  readonly cellKm: number;
  /** 1 for cells of the mesh, 0 for outside cells. */
  readonly insideAtCells: Uint8Array;
  /** Residence index rho per raster cell (1 on outside cells). */
  readonly residenceAtCells: Float64Array;
  /** 1/rho per raster cell. */
  readonly invResidence: Float64Array;
  /** A_f / h² of the face east of each cell [rho units / yr], 0 where none. */
  readonly gx: Float64Array;
  /** A_f / h² of the face south of each cell, 0 where none. */
  readonly gy: Float64Array;
  /** Dirichlet terms 2 A_i / h² × (number of lethal faces) per cell, split into west/east and north/south faces. */
  readonly lethal: Float64Array;
  readonly lethalX: Float64Array;
  readonly lethalY: Float64Array;
}

/**
 * Assembles the operator from the mesh faces.
 *
 * @param mesh - raster mesh (cells, faces, lethal faces per cell)
 * @param diffusionAtCells - D per mesh cell [km²/yr], > 0
 * @param residenceAtCells - rho per mesh cell, > 0
 */
export function makeRasterOperator(mesh: RasterFaces, diffusionAtCells: Float64Array, residenceAtCells: Float64Array): RasterOperator {
  const { nx, ny, cellKm } = mesh;
  const n = nx * ny;
  const inv2 = 1 / (cellKm * cellKm);
  const insideAtCells = new Uint8Array(n);
  const rho = new Float64Array(n).fill(1);
  const invRho = new Float64Array(n).fill(1);
  const gx = new Float64Array(n);
  const gy = new Float64Array(n);
  const lethal = new Float64Array(n);
  const lethalX = new Float64Array(n);
  const lethalY = new Float64Array(n);
  for (let c = 0; c < mesh.nCells; c++) {
    const k = mesh.rasterOfCell[c];
    insideAtCells[k] = 1;
    rho[k] = residenceAtCells[c];
    invRho[k] = 1 / residenceAtCells[c];
    const one = 2 * diffusionAtCells[c] * residenceAtCells[c] * inv2;
    lethalX[k] = mesh.lethalFacesXAtCells[c] * one;
    lethalY[k] = (mesh.lethalFacesAtCells[c] - mesh.lethalFacesXAtCells[c]) * one;
    lethal[k] = lethalX[k] + lethalY[k];
  }
  for (let f = 0; f < mesh.nFaces; f++) {
    const a = mesh.faceCells[2 * f];
    const b = mesh.faceCells[2 * f + 1];
    const Aa = diffusionAtCells[a] * residenceAtCells[a];
    const Ab = diffusionAtCells[b] * residenceAtCells[b];
    const g = ((2 * Aa * Ab) / (Aa + Ab)) * inv2;
    const ka = mesh.rasterOfCell[a];
    const kb = mesh.rasterOfCell[b];
    if (kb === ka + 1) gx[ka] = g;
    else gy[ka] = g;
  }
  return { nx, ny, cellKm, insideAtCells, residenceAtCells: rho, invResidence: invRho, gx, gy, lethal, lethalX, lethalY };
}

/** The computed part of the raster: rows r0…r1 and columns c0…c1 (inclusive). Faces leaving it are closed. */
export interface Window {
  r0: number;
  r1: number;
  c0: number;
  c1: number;
}

/**
 * out = L u on the window (zero-flux at the window's sides), plus `rate[k]·u[k]` when `rate` is given.
 * `out` must not alias `u`.
 */
export function applyRasterOperator(op: RasterOperator, w: Window, u: Float64Array, out: Float64Array, rate?: Float64Array): Float64Array {
  const { nx, gx, gy, lethal, invResidence: ir } = op;
  for (let r = w.r0; r <= w.r1; r++) {
    const base = r * nx;
    for (let c = w.c0; c <= w.c1; c++) {
      const k = base + c;
      const vk = u[k] * ir[k];
      let s = -lethal[k] * vk;
      if (c > w.c0) s += gx[k - 1] * (u[k - 1] * ir[k - 1] - vk);
      if (c < w.c1) s += gx[k] * (u[k + 1] * ir[k + 1] - vk);
      if (r > w.r0) s += gy[k - nx] * (u[k - nx] * ir[k - nx] - vk);
      if (r < w.r1) s += gy[k] * (u[k + nx] * ir[k + nx] - vk);
      out[k] = rate ? s + rate[k] * u[k] : s;
    }
  }
  return out;
}
