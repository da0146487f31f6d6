/**
 * The finite-volume movement operator (residence-index form, methods note §9.1) and the split diffusion step
 * kept for comparison. makeDiffusionStepper is one long factory on purpose: the step is a closure over buffers
 * allocated once per grid (the fused tridiagonal 1-D path).
 */
import type { Grid } from './grid.ts';
import { makeTridiagonalSolver } from './tridiagonal.ts';

/** What happens at a transect end. `reflecting`: zero flux. `absorbing`: density held at zero just outside. */
export type EndCondition = 'reflecting' | 'absorbing';

/**
 * Finite-volume diffusion operator `du/dt = L u` for the residence-index (rho) form.
 *
 * @remarks
 * With `u = rho v` and conductance `A = D rho`, the flux through the face between cells i and i+1 is
 * `F = -G (v_{i+1} - v_i)`, `G = 1 / (dx_i / (2 A_i) + dx_{i+1} / (2 A_{i+1}))` (length-weighted
 * harmonic mean of A, i.e. two resistances in series). Cell balance: `dx_i du_i/dt = -(F_{i+1/2} - F_{i-1/2})`.
 * Because interfaces sit on faces, the scheme reproduces flux continuity and the density jump
 * `u_R / u_L = rho_R / rho_L` without special stencils, and `sum dx_i u_i` is conserved exactly
 * (reflecting ends). An absorbing end uses the half-cell flux `-2 A_0 v_0 / dx_0`.
 * Reference for the interface conditions: Ovaskainen & Cornell (2003); Maciel & Lutscher (2013).
 */
export interface DiffusionOperator {
  readonly n: number;
  /** Row i, column i-1 of L [1/yr]; lower[0] is 0. */
  readonly lower: Float64Array;
  /** Diagonal of L [1/yr]. */
  readonly diag: Float64Array;
  /** Row i, column i+1 of L [1/yr]; upper[n-1] is 0. */
  readonly upper: Float64Array;
  /** Face conductances G [km/yr × rho units], length n + 1 (end faces: 0 if reflecting, half-cell value if absorbing). */
  readonly conductanceAtFaces: Float64Array;
}

/**
 * Assembles the diffusion operator.
 *
 * @param grid - finite-volume grid [km]
 * @param diffusionAtCells - D per cell [km²/yr], > 0
 * @param residenceAtCells - residence index rho per cell [yr/km² up to a common factor], > 0
 * @param ends - end conditions (left, right)
 */
export function makeDiffusionOperator(
  grid: Grid,
  diffusionAtCells: Float64Array,
  residenceAtCells: Float64Array,
  ends: { left: EndCondition; right: EndCondition } = { left: 'reflecting', right: 'reflecting' },
): DiffusionOperator {
  const n = grid.nCells;
  const dx = grid.widthsKm;
  const g = new Float64Array(n + 1);
  for (let f = 1; f < n; f++) {
    const aL = diffusionAtCells[f - 1] * residenceAtCells[f - 1];
    const aR = diffusionAtCells[f] * residenceAtCells[f];
    g[f] = 1 / (dx[f - 1] / (2 * aL) + dx[f] / (2 * aR));
  }
  if (ends.left === 'absorbing') g[0] = (2 * diffusionAtCells[0] * residenceAtCells[0]) / dx[0];
  if (ends.right === 'absorbing') g[n] = (2 * diffusionAtCells[n - 1] * residenceAtCells[n - 1]) / dx[n - 1];
  const lower = new Float64Array(n);
  const diag = new Float64Array(n);
  const upper = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const inv = 1 / dx[i];
    if (i > 0) lower[i] = (g[i] * inv) / residenceAtCells[i - 1];
    if (i < n - 1) upper[i] = (g[i + 1] * inv) / residenceAtCells[i + 1];
    diag[i] = (-(g[i] + g[i + 1]) * inv) / residenceAtCells[i];
  }
  return { n, lower, diag, upper, conductanceAtFaces: g };
}

/** out = L u (allocation-free; `out` must not alias `u`). */
export function applyDiffusion(op: DiffusionOperator, u: Float64Array, out: Float64Array): Float64Array {
  const { n, lower, diag, upper } = op;
  if (n === 1) {
    out[0] = diag[0] * u[0];
    return out;
  }
  out[0] = diag[0] * u[0] + upper[0] * u[1];
  for (let i = 1; i < n - 1; i++) out[i] = lower[i] * u[i - 1] + diag[i] * u[i] + upper[i] * u[i + 1];
  out[n - 1] = lower[n - 1] * u[n - 2] + diag[n - 1] * u[n - 1];
  return out;
}

/** Counters a diffusion stepper keeps for the solver report. */
export interface DiffusionCounters {
  /** Steps taken with TR-BDF2. */
  trbdf2Steps: number;
  /** Steps redone with backward Euler because TR-BDF2 would have produced a negative density. */
  fallbackSteps: number;
  /** Factorisations (one per distinct step size). */
  factorisations: number;
}

export interface DiffusionStepper {
  /** Advances u by dt [yr] in place. */
  step(u: Float64Array, dt: number): void;
  readonly counters: DiffusionCounters;
}

/** TR-BDF2 parameter gamma = 2 - sqrt(2) (Bank et al. 1985; Hosea & Shampine 1996). */
const GAMMA = 2 - Math.SQRT2;
/** Relative size of a negative value, against the profile's maximum, that triggers the positive fallback. */
const NEGATIVE_TOLERANCE = 1e-13;

/**
 * Implicit diffusion step: TR-BDF2 (L-stable, second order), with a backward-Euler fallback for any
 * step that would create a negative density.
 *
 * @remarks
 * Stage 1 (trapezoidal rule over gamma dt): `(I - gamma dt/2 L) u_s = (I + gamma dt/2 L) u_n`.
 * Stage 2 (BDF2): `(I - w dt L) u_{n+1} = u_s/(gamma(2-gamma)) - (1-gamma)²/(gamma(2-gamma)) u_n`,
 * `w = (1-gamma)/(2-gamma)`. Both stages conserve `sum dx u`. L-stability damps the stiff modes that make
 * Crank–Nicolson ring near sharp fronts. Backward Euler, used as fallback, is positivity preserving because
 * `I - dt L` is an M-matrix. Scheme: Bank, Coughran, Fichtner, Grosse, Rose & Smith (1985), IEEE Trans.
 * Electron Devices 32:1992–2007; error constants in Hosea & Shampine (1996), Appl. Numer. Math. 20:21–37.
 *
 * Longer than 80 lines on purpose: one closure owns the factorisations of both stages and of the fallback
 * (kept while the step stays the same) and the scratch the step reuses.
 */
export function makeDiffusionStepper(op: DiffusionOperator): DiffusionStepper {
  const n = op.n;
  const { lower, diag, upper } = op;
  const be = makeTridiagonalSolver(n);
  const lo = new Float64Array(n);
  const di = new Float64Array(n);
  const up = new Float64Array(n);
  // Thomas factors of the two TR-BDF2 matrices, kept here so that the stages can be fused into four
  // sweeps over memory (apply + stage-1 forward, stage-1 back + stage-2 right side, stage-2 forward,
  // stage-2 back + positivity check) instead of nine.
  const sub1 = new Float64Array(n);
  const inv1 = new Float64Array(n);
  const cp1 = new Float64Array(n);
  const sub2 = new Float64Array(n);
  const inv2 = new Float64Array(n);
  const cp2 = new Float64Array(n);
  const stage = new Float64Array(n);
  const saved = new Float64Array(n);
  const counters: DiffusionCounters = { trbdf2Steps: 0, fallbackSteps: 0, factorisations: 0 };
  let factoredDt = NaN;
  let beDt = NaN;
  const w = (1 - GAMMA) / (2 - GAMMA);
  const cStar = 1 / (GAMMA * (2 - GAMMA));
  const cOld = ((1 - GAMMA) * (1 - GAMMA)) / (GAMMA * (2 - GAMMA));

  /** Thomas factors of I − θL: sub-diagonal, inverse pivots, modified super-diagonal. */
  function factorInto(theta: number, sub: Float64Array, inv: Float64Array, cp: Float64Array): void {
    let prevCp = 0;
    for (let i = 0; i < n; i++) {
      const a = i > 0 ? -theta * lower[i] : 0;
      const piv = 1 - theta * diag[i] - a * prevCp;
      const ip = 1 / piv;
      sub[i] = a;
      inv[i] = ip;
      prevCp = i < n - 1 ? -theta * upper[i] * ip : 0;
      cp[i] = prevCp;
    }
  }

  function factorImplicit(solver: typeof be, theta: number): void {
    for (let i = 0; i < n; i++) {
      lo[i] = -theta * lower[i];
      di[i] = 1 - theta * diag[i];
      up[i] = -theta * upper[i];
    }
    solver.factor(lo, di, up);
  }

  function backwardEuler(u: Float64Array, dt: number): void {
    if (dt !== beDt) {
      factorImplicit(be, dt);
      beDt = dt;
      counters.factorisations++;
    }
    be.solve(u, u);
  }

  return {
    counters,
    step(u, dt) {
      if (dt !== factoredDt) {
        factorInto((GAMMA * dt) / 2, sub1, inv1, cp1);
        factorInto(w * dt, sub2, inv2, cp2);
        factoredDt = dt;
        counters.factorisations += 2;
      }
      const half = (GAMMA * dt) / 2;
      // Sweep 1 (forward): save u; right side (I + γdt/2 L)u; forward elimination of stage 1.
      let y = 0;
      let uPrev = 0;
      let uCur = u[0];
      for (let i = 0; i < n; i++) {
        const uNext = i < n - 1 ? u[i + 1] : 0;
        saved[i] = uCur;
        const lu = lower[i] * uPrev + diag[i] * uCur + upper[i] * uNext;
        y = (uCur + half * lu - sub1[i] * y) * inv1[i];
        stage[i] = y;
        uPrev = uCur;
        uCur = uNext;
      }
      // Sweep 2 (backward): stage-1 back substitution; stage-2 right side into u.
      let x = 0;
      for (let i = n - 1; i >= 0; i--) {
        x = stage[i] - cp1[i] * x;
        u[i] = cStar * x - cOld * saved[i];
      }
      // Sweep 3 (forward): stage-2 forward elimination.
      y = 0;
      for (let i = 0; i < n; i++) {
        y = (u[i] - sub2[i] * y) * inv2[i];
        u[i] = y;
      }
      // Sweep 4 (backward): stage-2 back substitution and the range of the result.
      let min = 0;
      let max = 0;
      x = 0;
      for (let i = n - 1; i >= 0; i--) {
        x = u[i] - cp2[i] * x;
        u[i] = x;
        if (x < min) min = x;
        else if (x > max) max = x;
      }
      if (min < -NEGATIVE_TOLERANCE * max) {
        u.set(saved);
        backwardEuler(u, dt);
        counters.fallbackSteps++;
      } else {
        counters.trbdf2Steps++;
        // Round-off negatives (|u| < 1e-13 max) are cleared so reaction terms never see u < 0.
        if (min < 0) for (let i = 0; i < n; i++) if (u[i] < 0) u[i] = 0;
      }
    },
  };
}
