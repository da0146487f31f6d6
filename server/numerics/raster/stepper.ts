/**
 * Coupled movement–growth step on the square raster: the transect's coupled TR-BDF2 step
 * (numerics/coupled.ts: rates frozen at a predicted mid-step state (here predicted by the same kind of
 * factorised correction on a trajectory's first step, and by linear extrapolation from the previous step on
 * the steps after it; both are O(dt²) and keep steady states exact fixed points), one L-stable second-order
 * method for movement and growth together, host loss by the trapezoidal rule in log h, a positive first-order
 * fallback) with each implicit stage solved by one approximately factorised (ADI) correction on
 * tridiagonal lines instead of a banded 2-D solve. Only the active window (cells near occupied ones) is
 * computed; it grows with the front. Outside cells (water, built-up, nodata) inside it are skipped by the
 * sweeps over cells.
 *
 * @remarks
 * Stage systems `M x = b`, `M = I − τ(Lx + Ly + G)` (G = diag of frozen per-capita rates), are solved by
 * `x = x₀ + (Px Py)⁻¹ (b − M x₀)` with `Px = I − τ(Lx + G)` (row lines, with the west/east Dirichlet faces) and `Py = I − τ Ly` (column
 * lines, with the north/south Dirichlet faces), x₀ the previous state (stage 1) or the stage-1 result (stage 2). This is the approximate
 * factorisation / Douglas correction (Douglas & Gunn 1964, Numer. Math. 6:428–453; Hundsdorfer & Verwer
 * 2003, Numerical Solution of Time-Dependent Advection-Diffusion-Reaction Equations, §IV.3–4 [MEM for the
 * sections]). Its error `τ² (Lx + G) Ly (x − x₀)` is O(dt³) per step because x − x₀ = O(dt), so the step
 * stays second order; steady states of the 2-D equations are fixed points of the step exactly (b − M x₀
 * vanishes there), and the step is not held to the explicit limit D dt/h² ≤ 1/4. Where the solution is
 * uniform along y (a strip with reflecting sides), Ly vanishes and the step is the transect's step.
 * Stability: for stiff modes in both directions the correction damps by a factor ≈ 0.94 per step instead of
 * L-stability's ≈ 0; the fallback keeps every density non-negative.
 * Fallback (any negative value, or τ max g too large): `(I − dt(Lx + G₋))(I − dt Ly) uⁿ⁺¹ = (1 + dt G₊) uⁿ`,
 * a product of inverse-positive M-matrices (positive, first order: locally one-dimensional backward Euler).
 *
 * Results do not depend on threads: the step is sequential and its order of operations fixed (the row
 * solves run four rows in lockstep, each row with its own operations in their own order).
 *
 * Longer than 400 lines on purpose: the step's sweeps (combine, line factorisations and solves, predictor,
 * stages, fallback) share one set of scratch arrays, the window and the kept factorisations in one closure;
 * split apart they would pass a dozen arrays between files.
 */
import type { RasterOperator, Window } from './operator.ts';

/** Per-capita growth g(u, h) in host cells [1/yr]. */
export type RasterPerCapita = (u: number, h: number) => number;

export interface RasterCoefficients {
  /** 1 for host cells (growth form and host loss), length nx·ny. */
  readonly hostAtCells: Uint8Array;
  /** Per-capita mortality in cells without host [1/yr], length nx·ny. */
  readonly mortalityAtCells: Float64Array;
  readonly perCapita: RasterPerCapita;
  /** Host kill rate c in dh/dt = −c u h. */
  readonly hostKillRate: number;
  /** Bound on |∂g/∂ln u| and positive rates [1/yr] (a step is cut into substeps with stiffness·substep ≤ 1). */
  readonly stiffness: number;
  /**
   * Density below which a cell at the window's edge counts as empty [fraction of capacity]. The window is
   * widened (by `pad` cells) whenever a cell on its edge exceeds it; cells outside hold exactly 0.
   */
  readonly activeFloor: number;
  /** Cells added on each side when the window grows (≥ 2). */
  readonly pad: number;
}

export interface RasterCounters {
  steps: number;
  substeps: number;
  fallbackSteps: number;
  activeCellsMax: number;
}

export interface RasterStepper {
  /**
   * Advances u and h (raster arrays, length nx·ny) by dt [yr] in place. Calls with the same u array continue
   * one trajectory (the mid-step state is extrapolated from the step before, so u must be left as this step
   * left it); another array starts a new trajectory.
   */
  step(u: Float64Array, h: Float64Array, dt: number): void;
  /** The computed window (widened before each step as needed). */
  window(): Window;
  /** Makes the whole raster active (e.g. for verification against a full-domain solution). */
  activateAll(): void;
  counters(): RasterCounters;
}

const GAMMA = 2 - Math.SQRT2;
const MAX_RATE_STEP = 1;
const NEGATIVE_TOLERANCE = 1e-13;
const STAGE_RATE_LIMIT = 0.9;

/** Thomas factors of a set of line systems over a window: pivots' inverses, sub-diagonal and cp per cell. */
interface LineFactors {
  readonly cp: Float64Array;
  readonly ip: Float64Array;
  /** Minus the sub-diagonal, τ g/ρ of the face before each cell (kept so that a solve does not recompute it). */
  readonly sub: Float64Array;
  tau: number;
  /** What the rates were ('zeros', 'col', a stage counter); null: never reused. */
  key: unknown;
  r0: number;
  r1: number;
  c0: number;
  c1: number;
}

function lineFactors(n: number): LineFactors {
  return { cp: new Float64Array(n), ip: new Float64Array(n), sub: new Float64Array(n), tau: NaN, key: undefined, r0: 0, r1: -1, c0: 0, c1: -1 };
}

function sameWindow(f: LineFactors, w: Window): boolean {
  return f.r0 === w.r0 && f.r1 === w.r1 && f.c0 === w.c0 && f.c1 === w.c1;
}

function setWindow(f: LineFactors, w: Window): void {
  f.r0 = w.r0;
  f.r1 = w.r1;
  f.c0 = w.c0;
  f.c1 = w.c1;
}

/**
 * Runs of inside cells along each row: columns lo, hi in pairs, row r's pairs at `segs[segAt[r]] …
 * segs[segAt[r + 1] − 1]`.
 */
function insideRuns(insideAtCells: Uint8Array, nx: number, ny: number): { segs: Int32Array; segAt: Int32Array } {
  const runs: number[] = [];
  const segAt = new Int32Array(ny + 1);
  for (let r = 0; r < ny; r++) {
    segAt[r] = runs.length;
    for (let q = 0; q < nx; q++) {
      if (!insideAtCells[r * nx + q]) continue;
      const lo = q;
      while (q + 1 < nx && insideAtCells[r * nx + q + 1]) q++;
      runs.push(lo, q);
    }
  }
  segAt[ny] = runs.length;
  return { segs: Int32Array.from(runs), segAt };
}

/** exp(−x) for the host-loss factors (x ≥ 0). */
function expNeg(x: number): number {
  return Math.exp(-x);
}

/**
 * Makes the raster stepper.
 *
 * Longer than 80 lines on purpose: one closure owns the line factorisations (kept while the window and the
 * step stay the same), the window of active cells and the stage arrays that the substep, the line solves
 * and the window update share; splitting it would hand each of them the same dozen typed arrays.
 */
export function makeRasterStepper(op: RasterOperator, coeffs: RasterCoefficients, initial?: Float64Array): RasterStepper {
  const { nx, ny, gx, gy, lethalX, lethalY, invResidence: ir, insideAtCells } = op;
  const n = nx * ny;
  const { hostAtCells, mortalityAtCells, perCapita, hostKillRate: c } = coeffs;
  const pad = Math.max(2, Math.round(coeffs.pad));
  const u0 = new Float64Array(n);
  const h0 = new Float64Array(n);
  const rate = new Float64Array(n);
  const mid = new Float64Array(n);
  const work = new Float64Array(n);
  const lethalXY = new Float64Array(n);
  // Per-capita rate of cells without host: minus the mortality inside the mesh, 0 outside it.
  const sinkAtCells = new Float64Array(n);
  for (let k = 0; k < n; k++) sinkAtCells[k] = insideAtCells[k] ? -mortalityAtCells[k] : 0;
  for (let k = 0; k < n; k++) lethalXY[k] = lethalX[k] + lethalY[k];
  // Thomas factors of the line systems, kept while their window, tau and rates stay the same (with a fixed
  // step, the column factors and the predictor's row factors are computed once per window; the stages' row
  // factors once per substep for both stages). Column lines are swept together, row by row, so that memory is
  // read in raster order.
  // The fallback reuses the stage sets (it follows a rejected stage; the next substep factors afresh).
  const predictorRows = lineFactors(n);
  const stageRows = lineFactors(n);
  const predictorCols = lineFactors(n);
  const stageCols = lineFactors(n);
  let stageKey = 0;
  // Outside cells (no habitat) hold no insects and have no faces: the sweeps over cells visit only the runs
  // of inside cells. The row line solves go over whole window rows, where outside cells decouple (their
  // faces are 0) and stay at 0; every other array keeps 0 there from its allocation.
  const { segs, segAt } = insideRuns(insideAtCells, nx, ny);
  const zeros = new Float64Array(n);
  // combineSolve's u·(1/ρ) per cell and south-face fluxes of the row above.
  const scaled = new Float64Array(n);
  const southFlux = new Float64Array(nx);
  const sinks = new Float64Array(n);
  const counters: RasterCounters = { steps: 0, substeps: 0, fallbackSteps: 0, activeCellsMax: 0 };
  const theta = 0.5 * GAMMA;
  const cStar = 1 / (GAMMA * (2 - GAMMA));
  const cOld = ((1 - GAMMA) * (1 - GAMMA)) / (GAMMA * (2 - GAMMA));
  let w: Window | null = null;
  // The trajectory the last step continued (the extrapolating predictor needs its previous start state).
  let lastU: Float64Array | null = null;
  let dtPrev = 0;

  /** Bounding box of cells above the floor, padded; null when none. */
  function boxOf(u: Float64Array): Window | null {
    let r0 = ny;
    let r1 = -1;
    let c0 = nx;
    let c1 = -1;
    for (let r = 0; r < ny; r++) {
      for (let q = 0; q < nx; q++) {
        if (u[r * nx + q] > coeffs.activeFloor) {
          if (r < r0) r0 = r;
          if (r > r1) r1 = r;
          if (q < c0) c0 = q;
          if (q > c1) c1 = q;
        }
      }
    }
    if (r1 < 0) return null;
    return { r0: Math.max(0, r0 - pad), r1: Math.min(ny - 1, r1 + pad), c0: Math.max(0, c0 - pad), c1: Math.min(nx - 1, c1 + pad) };
  }

  /** Widens the window on every side where a cell on its edge is above the floor. */
  function grow(u: Float64Array): void {
    if (w === null) {
      w = boxOf(u);
      return;
    }
    const f = coeffs.activeFloor;
    for (let changed = true; changed; ) {
      changed = false;
      const { r0, r1, c0, c1 } = w;
      let north = false;
      let south = false;
      let west = false;
      let east = false;
      for (let q = c0; q <= c1; q++) {
        if (u[r0 * nx + q] > f) north = true;
        if (u[r1 * nx + q] > f) south = true;
      }
      for (let r = r0; r <= r1; r++) {
        if (u[r * nx + c0] > f) west = true;
        if (u[r * nx + c1] > f) east = true;
      }
      if (north && r0 > 0) (w.r0 = Math.max(0, r0 - pad)), (changed = true);
      if (south && r1 < ny - 1) (w.r1 = Math.min(ny - 1, r1 + pad)), (changed = true);
      if (west && c0 > 0) (w.c0 = Math.max(0, c0 - pad)), (changed = true);
      if (east && c1 < nx - 1) (w.c1 = Math.min(nx - 1, c1 + pad)), (changed = true);
    }
  }

  /**
   * rowFactorOf's recurrence on four rows at once (the first starting at cell `a`, each `len` cells), in
   * lockstep so that their divisions overlap; each row's operations and their order are rowFactorOf's.
   */
  function factorRows4(f: LineFactors, tau: number, g: Float64Array, a: number, len: number): void {
    const { cp, ip, sub } = f;
    const b = a + nx;
    const cc = b + nx;
    const d = cc + nx;
    let pa = 0, pb = 0, pc = 0, pd = 0;
    let wa = 0, wb = 0, wc = 0, wd = 0;
    let sa = 0, sb = 0, sc = 0, sd = 0;
    for (let j = 0; j < len - 1; j++) {
      const ka = a + j;
      const kb = b + j;
      const kc = cc + j;
      const kd = d + j;
      const ea = gx[ka];
      const eb = gx[kb];
      const ec = gx[kc];
      const ed = gx[kd];
      const ia = 1 / (1 + tau * ((wa + ea + lethalX[ka]) * ir[ka] - g[ka]) - sa * pa);
      const ib = 1 / (1 + tau * ((wb + eb + lethalX[kb]) * ir[kb] - g[kb]) - sb * pb);
      const ic = 1 / (1 + tau * ((wc + ec + lethalX[kc]) * ir[kc] - g[kc]) - sc * pc);
      const id = 1 / (1 + tau * ((wd + ed + lethalX[kd]) * ir[kd] - g[kd]) - sd * pd);
      ip[ka] = ia;
      ip[kb] = ib;
      ip[kc] = ic;
      ip[kd] = id;
      pa = -tau * ea * ir[ka + 1] * ia;
      pb = -tau * eb * ir[kb + 1] * ib;
      pc = -tau * ec * ir[kc + 1] * ic;
      pd = -tau * ed * ir[kd + 1] * id;
      cp[ka] = pa;
      cp[kb] = pb;
      cp[kc] = pc;
      cp[kd] = pd;
      wa = ea;
      wb = eb;
      wc = ec;
      wd = ed;
      sa = -tau * ea * ir[ka];
      sb = -tau * eb * ir[kb];
      sc = -tau * ec * ir[kc];
      sd = -tau * ed * ir[kd];
      sub[ka + 1] = tau * ea * ir[ka];
      sub[kb + 1] = tau * eb * ir[kb];
      sub[kc + 1] = tau * ec * ir[kc];
      sub[kd + 1] = tau * ed * ir[kd];
    }
    // The last cell of each row: no east face.
    const j = len - 1;
    lastFactor(f, tau, g, a + j, wa, sa, pa);
    lastFactor(f, tau, g, b + j, wb, sb, pb);
    lastFactor(f, tau, g, cc + j, wc, sc, pc);
    lastFactor(f, tau, g, d + j, wd, sd, pd);
  }

  /** rowFactorOf's step at a row's last cell k (no east face), given the west face's carried values. */
  function lastFactor(f: LineFactors, tau: number, g: Float64Array, k: number, gw: number, aw: number, cpPrev: number): void {
    f.ip[k] = 1 / (1 + tau * ((gw + 0 + lethalX[k]) * ir[k] - g[k]) - aw * cpPrev);
    f.cp[k] = 0;
  }

  /** Row (Px) factors valid for the window and tau they were computed for; the key says which rates. */
  function rowFactorOf(f: LineFactors, tau: number, g: Float64Array, key: unknown): LineFactors {
    const win = w!;
    if (f.key === key && key !== null && f.tau === tau && sameWindow(f, win)) return f;
    const { r0, r1, c0, c1 } = win;
    const { cp, ip, sub } = f;
    let r = r0;
    for (; r + 3 <= r1; r += 4) factorRows4(f, tau, g, r * nx + c0, c1 - c0 + 1);
    for (; r <= r1; r++) {
      const first = r * nx + c0;
      const last = r * nx + c1;
      let cpPrev = 0;
      let gw = 0;
      let aw = 0;
      for (let k = first; k <= last; k++) {
        const ge = k < last ? gx[k] : 0;
        const inv = 1 / (1 + tau * ((gw + ge + lethalX[k]) * ir[k] - g[k]) - aw * cpPrev);
        ip[k] = inv;
        cpPrev = k < last ? -tau * ge * ir[k + 1] * inv : 0;
        cp[k] = cpPrev;
        // The next cell's sub-diagonal entry comes from this face.
        gw = ge;
        aw = -tau * ge * ir[k];
        if (k < last) sub[k + 1] = tau * ge * ir[k];
      }
    }
    f.tau = tau;
    f.key = key;
    setWindow(f, win);
    return f;
  }

  /**
   * solveRow on the four rows r … r + 3 at once: the four recurrences are independent, so running them in
   * lockstep lets the processor overlap their latencies; each row's operations and their order are
   * solveRow's, so the result is the same to the bit. With `cols` (rows below the window's first), each
   * value also takes colForwardRow's step as soon as its row value is final: the same operation on the same
   * operands (the row above is finished, the lanes go top to bottom), so again the same bits.
   */
  function solveRows4(f: LineFactors, x: Float64Array, r: number, cols?: LineFactors): void {
    const { cp, ip, sub } = f;
    const a = r * nx + w!.c0;
    const b = a + nx;
    const cc = b + nx;
    const d = cc + nx;
    const len = w!.c1 - w!.c0 + 1;
    let ya = x[a] * ip[a];
    let yb = x[b] * ip[b];
    let yc = x[cc] * ip[cc];
    let yd = x[d] * ip[d];
    x[a] = ya;
    x[b] = yb;
    x[cc] = yc;
    x[d] = yd;
    for (let j = 1; j < len; j++) {
      const ka = a + j;
      const kb = b + j;
      const kc = cc + j;
      const kd = d + j;
      ya = (x[ka] + sub[ka] * ya) * ip[ka];
      yb = (x[kb] + sub[kb] * yb) * ip[kb];
      yc = (x[kc] + sub[kc] * yc) * ip[kc];
      yd = (x[kd] + sub[kd] * yd) * ip[kd];
      x[ka] = ya;
      x[kb] = yb;
      x[kc] = yc;
      x[kd] = yd;
    }
    const fuse = cols !== undefined;
    const cs = fuse ? cols.sub : sub;
    const ci = fuse ? cols.ip : ip;
    if (fuse) {
      // The last cell of each row is final after the forward pass.
      const j0 = len - 1;
      x[a + j0] = (ya + cs[a + j0] * x[a + j0 - nx]) * ci[a + j0];
      x[b + j0] = (yb + cs[b + j0] * x[b + j0 - nx]) * ci[b + j0];
      x[cc + j0] = (yc + cs[cc + j0] * x[cc + j0 - nx]) * ci[cc + j0];
      x[d + j0] = (yd + cs[d + j0] * x[d + j0 - nx]) * ci[d + j0];
    }
    for (let j = len - 2; j >= 0; j--) {
      const ka = a + j;
      const kb = b + j;
      const kc = cc + j;
      const kd = d + j;
      ya = x[ka] - cp[ka] * ya;
      yb = x[kb] - cp[kb] * yb;
      yc = x[kc] - cp[kc] * yc;
      yd = x[kd] - cp[kd] * yd;
      x[ka] = fuse ? (ya + cs[ka] * x[ka - nx]) * ci[ka] : ya;
      x[kb] = fuse ? (yb + cs[kb] * x[kb - nx]) * ci[kb] : yb;
      x[kc] = fuse ? (yc + cs[kc] * x[kc - nx]) * ci[kc] : yc;
      x[kd] = fuse ? (yd + cs[kd] * x[kd - nx]) * ci[kd] : yd;
    }
  }

  /** x = Px⁻¹ x on row r of the window, in place, with factors from rowFactorOf. */
  function solveRow(f: LineFactors, x: Float64Array, r: number): void {
    const { cp, ip, sub } = f;
    const first = r * nx + w!.c0;
    const last = r * nx + w!.c1;
    let y = x[first] * ip[first];
    x[first] = y;
    for (let k = first + 1; k <= last; k++) {
      y = (x[k] + sub[k] * y) * ip[k];
      x[k] = y;
    }
    for (let k = last - 1; k >= first; k--) {
      y = x[k] - cp[k] * y;
      x[k] = y;
    }
  }

  /** Column (Py = I − tau Ly) factors for the window, kept while the window and tau stay the same. */
  function colFactorOf(f: LineFactors, tau: number): LineFactors {
    const win = w!;
    if (f.key === 'col' && f.tau === tau && sameWindow(f, win)) return f;
    const { r0, r1, c0, c1 } = win;
    const { cp, ip, sub } = f;
    for (let r = r0; r <= r1; r++) {
      const base = r * nx;
      const south = r < r1;
      for (let k = base + c0; k <= base + c1; k++) {
        const gs = south ? gy[k] : 0;
        let inv: number;
        if (r === r0) {
          inv = 1 / (1 + tau * (gs + lethalY[k]) * ir[k]);
        } else {
          const n0 = k - nx;
          const gn = gy[n0];
          const an = -tau * gn * ir[n0];
          inv = 1 / (1 + tau * (gn + gs + lethalY[k]) * ir[k] - an * cp[n0]);
          sub[k] = tau * gn * ir[n0];
        }
        ip[k] = inv;
        cp[k] = south ? -tau * gs * ir[k + nx] * inv : 0;
      }
    }
    f.tau = tau;
    f.key = 'col';
    setWindow(f, win);
    return f;
  }

  /** Forward sweep of Py⁻¹ on row r of the window, in place (rows above it swept already). */
  function colForwardRow(f: LineFactors, x: Float64Array, r: number): void {
    const { ip, sub } = f;
    const { r0, c0, c1 } = w!;
    const base = r * nx;
    for (let s = segAt[r]; s < segAt[r + 1]; s += 2) {
      const first = base + Math.max(c0, segs[s]);
      const last = base + Math.min(c1, segs[s + 1]);
      if (r === r0) for (let k = first; k <= last; k++) x[k] = x[k] * ip[k];
      else for (let k = first; k <= last; k++) x[k] = (x[k] + sub[k] * x[k - nx]) * ip[k];
    }
  }

  /** Back substitution of Py⁻¹ over the window, in place; when `add` is given, `sum = add + x` as well. */
  function colBack(f: LineFactors, x: Float64Array, add?: Float64Array, sum?: Float64Array): void {
    const { r0, r1, c0, c1 } = w!;
    const { cp } = f;
    if (add && sum) {
      const base = r1 * nx;
      for (let s = segAt[r1]; s < segAt[r1 + 1]; s += 2) {
        for (let k = base + Math.max(c0, segs[s]), last = base + Math.min(c1, segs[s + 1]); k <= last; k++) sum[k] = add[k] + x[k];
      }
    }
    for (let r = r1 - 1; r >= r0; r--) {
      const base = r * nx;
      for (let s = segAt[r]; s < segAt[r + 1]; s += 2) {
        const first = base + Math.max(c0, segs[s]);
        const last = base + Math.min(c1, segs[s + 1]);
        if (add && sum) {
          for (let k = first; k <= last; k++) {
            const y = x[k] - cp[k] * x[k + nx];
            x[k] = y;
            sum[k] = add[k] + y;
          }
        } else {
          for (let k = first; k <= last; k++) x[k] -= cp[k] * x[k + nx];
        }
      }
    }
  }

  /** x = (Px Py)⁻¹ x over the window, in place, row by row; `sum = add + x` as in colBack. */
  function lineSolve(rows: LineFactors, cols: LineFactors, x: Float64Array, add?: Float64Array, sum?: Float64Array): void {
    for (let r = w!.r0; r <= w!.r1; r++) {
      solveRow(rows, x, r);
      colForwardRow(cols, x, r);
    }
    colBack(cols, x, add, sum);
  }

  /** scaled = u·(1/ρ) on the inside cells of window row r. */
  function scaleRow(u: Float64Array, r: number): void {
    const base = r * nx;
    for (let s = segAt[r]; s < segAt[r + 1]; s += 2) {
      for (let k = base + Math.max(w!.c0, segs[s]), last = base + Math.min(w!.c1, segs[s + 1]); k <= last; k++) scaled[k] = u[k] * ir[k];
    }
  }

  /**
   * out = (Px Py)⁻¹ [alpha (L u + rate u) + beta u + gamma v] on the window (zero-flux at its sides), out ≠ u, v,
   * and `sum = add + out` when given. Each row's right-hand side is solved along the row and swept forward
   * along the columns while it is in cache (the same operations, in the same order, as one pass each).
   */
  function combineSolve(u: Float64Array, alpha: number, beta: number, gamma: number, v: Float64Array, rows: LineFactors, cols: LineFactors, out: Float64Array, add?: Float64Array, sum?: Float64Array): void {
    const { r0, r1, c0, c1 } = w!;
    // Stage 1 and the predictor add nothing to alpha (L u + rate u).
    const plain = beta === 0 && gamma === 0;
    scaleRow(u, r0);
    // Rows go in groups of four: their right-hand sides, then their row solves in lockstep, then the column
    // sweep's forward step row by row (which needs the row above finished).
    for (let g0 = r0; g0 <= r1; g0 += 4) {
      const gEnd = Math.min(r1, g0 + 3);
      for (let r = g0; r <= gEnd; r++) {
        const base = r * nx;
        // u·(1/ρ) of the row below, for this row's south faces and that row's own faces.
        if (r < r1) scaleRow(u, r + 1);
        // Faces to the north and south inside the window (none on its edge rows: zero flux there). A row's
        // north flux is minus the row above's south flux through the same face, kept in southFlux (the same
        // value: a − b = −(b − a) exactly), so each face's product is formed once; it is 0 below outside cells.
        const north = r > r0;
        const gS = r < r1 ? gy : zeros;
        const offS = r < r1 ? nx : 0;
        let col = c0;
        for (let s = segAt[r]; s < segAt[r + 1]; s += 2) {
          const lo = Math.max(c0, segs[s]);
          const hi = Math.min(c1, segs[s + 1]);
          if (lo > hi) continue;
          for (; col < lo; col++) southFlux[col - c0] = 0;
          col = hi + 1;
          const first = base + lo;
          const last = base + hi;
          // Flux through the west face of k, carried over from the east face of k − 1 (same value, one
          // product); none on a run's ends (an outside cell or the window's side).
          let fw = 0;
          for (let k = first, q = lo - c0; k <= last; k++, q++) {
            const vk = scaled[k];
            const fS = gS[k] * (scaled[k + offS] - vk);
            const fN = north ? -southFlux[q] : 0;
            southFlux[q] = fS;
            const fe = k < last ? gx[k] * (scaled[k + 1] - vk) : 0;
            const lu = fe - fw + (fN + fS) - lethalXY[k] * vk;
            const uk = u[k];
            const a = alpha * (lu + rate[k] * uk);
            out[k] = plain ? a : a + beta * uk + gamma * v[k];
            fw = fe;
          }
        }
        for (; col <= c1; col++) southFlux[col - c0] = 0;
      }
      if (gEnd === g0 + 3 && g0 > r0) {
        solveRows4(rows, out, g0, cols);
      } else {
        if (gEnd === g0 + 3) solveRows4(rows, out, g0);
        else for (let r = g0; r <= gEnd; r++) solveRow(rows, out, r);
        for (let r = g0; r <= gEnd; r++) colForwardRow(cols, out, r);
      }
    }
    colBack(cols, out, add, sum);
  }

  /**
   * One step of the scheme in the module comment over the active window.
   * Longer than 80 lines on purpose: the predictor, mid-step rates, two line-split stages, fallback and
   * host update run in sequence over the same window and stage arrays, and are read as one scheme.
   */
  function substep(u: Float64Array, h: Float64Array, dt: number, extrapolate: boolean): void {
    const win = w!;
    const { r0, r1, c0, c1 } = win;
    const halfDt = 0.5 * dt;
    const quarter = 0.25 * c * dt;
    /** Frozen per-capita rate of cell k at the mid-step state x (host at mid-step by the trapezoidal rule). */
    const midRate = (k: number, x: number): number => {
      if (!hostAtCells[k]) return sinkAtCells[k];
      const hm = c > 0 ? h0[k] * expNeg(quarter * (u0[k] + x)) : h0[k];
      return perCapita(x > 0 ? x : 0, hm > 0 ? hm : 0);
    };
    let maxPositive = 0;
    if (extrapolate) {
      // Mid-step state by linear extrapolation from the previous step, ũ = uⁿ + (dt/2)/dtₙ₋₁ (uⁿ − uⁿ⁻¹):
      // O(dt²) locally like the predictor below, exact at steady states, and without its line solves. The
      // rates at ũ are taken in the same sweep.
      const ratio = halfDt / dtPrev;
      for (let r = r0; r <= r1; r++) {
        for (let s = segAt[r], base = r * nx; s < segAt[r + 1]; s += 2) for (let k = base + Math.max(c0, segs[s]), last = base + Math.min(c1, segs[s + 1]); k <= last; k++) {
          const ui = u[k];
          const x = ui + ratio * (ui - u0[k]);
          u0[k] = ui;
          h0[k] = h[k];
          const g = midRate(k, x);
          rate[k] = g;
          if (g > maxPositive) maxPositive = g;
        }
      }
    } else {
      // Rates at the start.
      for (let r = r0; r <= r1; r++) {
        for (let s = segAt[r], base = r * nx; s < segAt[r + 1]; s += 2) for (let k = base + Math.max(c0, segs[s]), last = base + Math.min(c1, segs[s + 1]); k <= last; k++) {
          const ui = u[k];
          const hi = h[k];
          u0[k] = ui;
          h0[k] = hi;
          rate[k] = hostAtCells[k] ? perCapita(ui > 0 ? ui : 0, hi > 0 ? hi : 0) : sinkAtCells[k];
        }
      }
      // Mid-step predictor ũ = u⁰ + ((I − dt/2 Lx)(I − dt/2 Ly))⁻¹ dt/2 (L + G⁰) u⁰: O(dt²) locally, the
      // transect's predictor (I − dt/2 L)ũ = (1 + dt/2 g⁰)u⁰ where the state is uniform across, and exact at
      // steady states (so that they stay fixed points of the whole step); negative values are read as 0.
      combineSolve(u0, halfDt, 0, 0, u0, rowFactorOf(predictorRows, halfDt, zeros, 'zeros'), colFactorOf(predictorCols, halfDt), work, u0, mid);
      for (let r = r0; r <= r1; r++) {
        for (let s = segAt[r], base = r * nx; s < segAt[r + 1]; s += 2) for (let k = base + Math.max(c0, segs[s]), last = base + Math.min(c1, segs[s + 1]); k <= last; k++) {
          const g = midRate(k, mid[k]);
          rate[k] = g;
          if (g > maxPositive) maxPositive = g;
        }
      }
    }
    let ok = theta * dt * maxPositive < STAGE_RATE_LIMIT;
    // Host loss over the step by the trapezoidal rule in log h: h = h⁰ exp(−c dt (u⁰ + u)/2).
    const halfC = 0.5 * c * dt;
    let hostDone = false;
    if (ok) {
      const tau = theta * dt;
      // Stage 1 (trapezoidal rule over γ dt): x = u⁰ + (Px Py)⁻¹ 2τ A u⁰.
      const rows = rowFactorOf(stageRows, tau, rate, ++stageKey);
      const cols = colFactorOf(stageCols, tau);
      combineSolve(u0, 2 * tau, 0, 0, u0, rows, cols, work, u0, u);
      // Stage 2 (BDF2): y = x + (Px Py)⁻¹ (c* x − c_old u⁰ − M x), M x = x − τ A x.
      combineSolve(u, tau, cStar - 1, -cOld, u0, rows, cols, work, u, u);
      // The range of the result, and the host at the step's end in the same sweep (redone below for cells
      // clipped at 0 and after a fallback).
      let min = 0;
      let max = 0;
      for (let r = r0; r <= r1; r++) {
        for (let s = segAt[r], base = r * nx; s < segAt[r + 1]; s += 2) for (let k = base + Math.max(c0, segs[s]), last = base + Math.min(c1, segs[s + 1]); k <= last; k++) {
          const y = u[k];
          if (y < min) min = y;
          else if (y > max) max = y;
          if (c > 0 && hostAtCells[k]) h[k] = h0[k] * expNeg(halfC * (u0[k] + y));
        }
      }
      ok = min >= -NEGATIVE_TOLERANCE * max;
      hostDone = ok;
      if (ok && min < 0) {
        for (let r = r0; r <= r1; r++) {
          for (let s = segAt[r], base = r * nx; s < segAt[r + 1]; s += 2) for (let k = base + Math.max(c0, segs[s]), last = base + Math.min(c1, segs[s + 1]); k <= last; k++) {
            if (!(u[k] < 0)) continue;
            u[k] = 0;
            if (c > 0 && hostAtCells[k]) h[k] = h0[k] * expNeg(halfC * (u0[k] + u[k]));
          }
        }
      }
    }
    if (!ok) {
      for (let r = r0; r <= r1; r++) {
        for (let q = c0, k = r * nx + c0; q <= c1; q++, k++) u[k] = (1 + dt * Math.max(rate[k], 0)) * u0[k];
      }
      for (let r = r0; r <= r1; r++) for (let q = c0, k = r * nx + c0; q <= c1; q++, k++) sinks[k] = rate[k] < 0 ? rate[k] : 0;
      lineSolve(rowFactorOf(stageRows, dt, sinks, null), colFactorOf(stageCols, dt), u);
      for (let r = r0; r <= r1; r++) for (let q = c0, k = r * nx + c0; q <= c1; q++, k++) if (u[k] < 0) u[k] = 0;
      counters.fallbackSteps++;
    }
    if (c > 0 && !hostDone) {
      for (let r = r0; r <= r1; r++) {
        for (let q = c0, k = r * nx + c0; q <= c1; q++, k++) if (hostAtCells[k]) h[k] = h0[k] * expNeg(halfC * (u0[k] + u[k]));
      }
    }
  }

  if (initial) grow(initial);

  return {
    step(u, h, dt) {
      grow(u);
      if (w === null) {
        counters.steps++;
        return;
      }
      const cells = (w.r1 - w.r0 + 1) * (w.c1 - w.c0 + 1);
      if (cells > counters.activeCellsMax) counters.activeCellsMax = cells;
      const nSub = Math.max(1, Math.ceil((coeffs.stiffness * dt) / MAX_RATE_STEP));
      const tau = dt / nSub;
      for (let s = 0; s < nSub; s++) {
        substep(u, h, tau, lastU === u && dtPrev > 0);
        lastU = u;
        dtPrev = tau;
      }
      counters.steps++;
      counters.substeps += nSub;
    },
    window: () => (w ? { ...w } : { r0: 0, r1: -1, c0: 0, c1: -1 }),
    activateAll() {
      w = { r0: 0, r1: ny - 1, c0: 0, c1: nx - 1 };
    },
    counters: () => ({ ...counters }),
  };
}
