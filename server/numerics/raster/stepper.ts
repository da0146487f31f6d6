/**
 * Coupled movement–growth step on the square raster: the transect's coupled TR-BDF2 step
 * (numerics/coupled.ts: rates frozen at a predicted mid-step state, one L-stable second-order method for
 * movement and growth together, host loss by the trapezoidal rule in log h, a positive first-order
 * fallback) with each implicit stage solved by one approximately factorised (ADI) correction on
 * tridiagonal lines instead of a banded 2-D solve. Only the active window (cells near occupied ones) is
 * computed; it grows with the front.
 *
 * @remarks
 * Stage systems `M x = b`, `M = I − τ(Lx + Ly + G)` (G = diag of frozen per-capita rates), are solved by
 * `x = x₀ + (Px Py)⁻¹ (b − M x₀)` with `Px = I − τ(Lx + G)` (row lines) and `Py = I − τ Ly` (column
 * lines), x₀ the previous state (stage 1) or the stage-1 result (stage 2). This is the approximate
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
 * Results do not depend on threads: the step is sequential and its order of operations fixed.
 */
import { applyRasterOperator, type RasterOperator, type Window } from './operator.ts';

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
  /** Advances u and h (raster arrays, length nx·ny) by dt [yr] in place. */
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

/** exp(−x) for the host-loss factors (x ≥ 0). */
function expNeg(x: number): number {
  return Math.exp(-x);
}

export function makeRasterStepper(op: RasterOperator, coeffs: RasterCoefficients, initial?: Float64Array): RasterStepper {
  const { nx, ny, gx, gy, lethal, invResidence: ir, insideAtCells } = op;
  const n = nx * ny;
  const { hostAtCells, mortalityAtCells, perCapita, hostKillRate: c } = coeffs;
  const pad = Math.max(2, Math.round(coeffs.pad));
  const u0 = new Float64Array(n);
  const h0 = new Float64Array(n);
  const rate = new Float64Array(n);
  const mid = new Float64Array(n);
  const hMid = new Float64Array(n);
  const work = new Float64Array(n);
  const tmp = new Float64Array(n);
  // Thomas factors of the column lines (all columns of the window swept together, row by row, so that
  // memory is read in raster order) and scratch for the row lines.
  const colCp = new Float64Array(n);
  const colInv = new Float64Array(n);
  const rowCp = new Float64Array(nx);
  const rowInv = new Float64Array(nx);
  const counters: RasterCounters = { steps: 0, substeps: 0, fallbackSteps: 0, activeCellsMax: 0 };
  const theta = 0.5 * GAMMA;
  const cStar = 1 / (GAMMA * (2 - GAMMA));
  const cOld = ((1 - GAMMA) * (1 - GAMMA)) / (GAMMA * (2 - GAMMA));
  let w: Window | null = null;

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
   * out = Px⁻¹ rhs on every row of the window, Px = I − tau (Lx + diag(g)), g = rate (or only its negative
   * part when `sinksOnly`, or nothing when `noRates`). `out` may alias `rhs`.
   */
  function rowSolve(tau: number, rhs: Float64Array, out: Float64Array, mode: 'rates' | 'sinks' | 'none'): void {
    const { r0, r1, c0, c1 } = w!;
    for (let r = r0; r <= r1; r++) {
      const base = r * nx;
      let cpPrev = 0;
      let y = 0;
      for (let q = c0; q <= c1; q++) {
        const k = base + q;
        const gw = q > c0 ? gx[k - 1] : 0;
        const ge = q < c1 ? gx[k] : 0;
        const g = mode === 'rates' ? rate[k] : mode === 'sinks' ? Math.min(rate[k], 0) : 0;
        const a = q > c0 ? -tau * gw * ir[k - 1] : 0;
        const piv = 1 + tau * ((gw + ge + lethal[k]) * ir[k] - g) - a * cpPrev;
        const ip = 1 / piv;
        cpPrev = q < c1 ? -tau * ge * ir[k + 1] * ip : 0;
        rowCp[q] = cpPrev;
        rowInv[q] = ip;
        y = (rhs[k] - a * y) * ip;
        out[k] = y;
      }
      let x = 0;
      for (let q = c1; q >= c0; q--) {
        const k = base + q;
        x = q === c1 ? out[k] : out[k] - rowCp[q] * x;
        out[k] = x;
      }
    }
  }

  /** out = Py⁻¹ rhs on every column of the window, Py = I − tau Ly. `out` may alias `rhs`. */
  function colSolve(tau: number, rhs: Float64Array, out: Float64Array): void {
    const { r0, r1, c0, c1 } = w!;
    for (let r = r0; r <= r1; r++) {
      const base = r * nx;
      for (let q = c0; q <= c1; q++) {
        const k = base + q;
        const gn = r > r0 ? gy[k - nx] : 0;
        const gs = r < r1 ? gy[k] : 0;
        const a = r > r0 ? -tau * gn * ir[k - nx] : 0;
        const cpPrev = r > r0 ? colCp[k - nx] : 0;
        const yPrev = r > r0 ? out[k - nx] : 0;
        const piv = 1 + tau * (gn + gs) * ir[k] - a * cpPrev;
        const ip = 1 / piv;
        colCp[k] = r < r1 ? -tau * gs * ir[k + nx] * ip : 0;
        colInv[k] = ip;
        out[k] = (rhs[k] - a * yPrev) * ip;
      }
    }
    for (let r = r1 - 1; r >= r0; r--) {
      const base = r * nx;
      for (let q = c0; q <= c1; q++) {
        const k = base + q;
        out[k] -= colCp[k] * out[k + nx];
      }
    }
  }

  function substep(u: Float64Array, h: Float64Array, dt: number): void {
    const win = w!;
    const { r0, r1, c0, c1 } = win;
    const halfDt = 0.5 * dt;
    // Rates at the start and the predictor's right side max(1 + dt/2 g⁰, 0) uⁿ.
    for (let r = r0; r <= r1; r++) {
      for (let q = c0, k = r * nx + c0; q <= c1; q++, k++) {
        const ui = u[k];
        const hi = h[k];
        u0[k] = ui;
        h0[k] = hi;
        const g = hostAtCells[k] ? perCapita(ui > 0 ? ui : 0, hi > 0 ? hi : 0) : -mortalityAtCells[k];
        const f = 1 + halfDt * g;
        mid[k] = (f > 0 ? f : 0) * ui;
      }
    }
    // Mid-step predictor by locally one-dimensional backward Euler over dt/2 (positive, O(dt²) locally).
    rowSolve(halfDt, mid, mid, 'none');
    colSolve(halfDt, mid, mid);
    let maxPositive = 0;
    const quarter = 0.25 * c * dt;
    for (let r = r0; r <= r1; r++) {
      for (let q = c0, k = r * nx + c0; q <= c1; q++, k++) {
        const x = mid[k];
        let g: number;
        if (hostAtCells[k]) {
          const hm = c > 0 ? h0[k] * expNeg(quarter * (u0[k] + x)) : h0[k];
          hMid[k] = hm;
          g = perCapita(x > 0 ? x : 0, hm > 0 ? hm : 0);
        } else {
          hMid[k] = h0[k];
          g = insideAtCells[k] ? -mortalityAtCells[k] : 0;
        }
        rate[k] = g;
        if (g > maxPositive) maxPositive = g;
      }
    }
    let ok = theta * dt * maxPositive < STAGE_RATE_LIMIT;
    if (ok) {
      const tau = theta * dt;
      // Stage 1 (trapezoidal rule over γ dt): x = u⁰ + (Px Py)⁻¹ 2τ A u⁰.
      applyRasterOperator(op, win, u0, work, rate);
      for (let r = r0; r <= r1; r++) for (let q = c0, k = r * nx + c0; q <= c1; q++, k++) work[k] *= 2 * tau;
      rowSolve(tau, work, work, 'rates');
      colSolve(tau, work, work);
      for (let r = r0; r <= r1; r++) for (let q = c0, k = r * nx + c0; q <= c1; q++, k++) u[k] = u0[k] + work[k];
      // Stage 2 (BDF2): y = x + (Px Py)⁻¹ (c* x − c_old u⁰ − M x), M x = x − τ A x.
      applyRasterOperator(op, win, u, tmp, rate);
      for (let r = r0; r <= r1; r++) {
        for (let q = c0, k = r * nx + c0; q <= c1; q++, k++) work[k] = (cStar - 1) * u[k] - cOld * u0[k] + tau * tmp[k];
      }
      rowSolve(tau, work, work, 'rates');
      colSolve(tau, work, work);
      let min = 0;
      let max = 0;
      for (let r = r0; r <= r1; r++) {
        for (let q = c0, k = r * nx + c0; q <= c1; q++, k++) {
          const y = u[k] + work[k];
          u[k] = y;
          if (y < min) min = y;
          else if (y > max) max = y;
        }
      }
      ok = min >= -NEGATIVE_TOLERANCE * max;
      if (ok && min < 0) {
        for (let r = r0; r <= r1; r++) for (let q = c0, k = r * nx + c0; q <= c1; q++, k++) if (u[k] < 0) u[k] = 0;
      }
    }
    if (!ok) {
      for (let r = r0; r <= r1; r++) {
        for (let q = c0, k = r * nx + c0; q <= c1; q++, k++) u[k] = (1 + dt * Math.max(rate[k], 0)) * u0[k];
      }
      rowSolve(dt, u, u, 'sinks');
      colSolve(dt, u, u);
      for (let r = r0; r <= r1; r++) for (let q = c0, k = r * nx + c0; q <= c1; q++, k++) if (u[k] < 0) u[k] = 0;
      counters.fallbackSteps++;
    }
    if (c > 0) {
      const halfC = 0.5 * c * dt;
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
      for (let s = 0; s < nSub; s++) substep(u, h, tau);
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
