/**
 * Steady states of the semi-discrete (unsplit) finite-volume system `du/dt = L u + f(u)` and their
 * linear stability.
 *
 * Why unsplit: a time-stepping run with operator splitting converges to the steady state of the split
 * map, which differs from the true discrete steady state by O(dt²); near a saddle-node (a front that is
 * barely pinned) that shift decides the answer. Newton on the residual `R(u) = L u + f(u)` has no time
 * step at all. Stability is read from the tridiagonal Jacobian `J = L + diag(f'(u))`, symmetrised by a
 * diagonal similarity, with a Sturm count (Wilkinson, The Algebraic Eigenvalue Problem, 1965, §5.37;
 * Golub & Van Loan, Matrix Computations, §8.4).
 */
import { makeTridiagonalSolver } from './tridiagonal.ts';

/** A tridiagonal matrix: lower[i] = (i, i−1), diag[i] = (i, i), upper[i] = (i, i+1). */
export interface Tridiagonal {
  readonly lower: Float64Array;
  readonly diag: Float64Array;
  readonly upper: Float64Array;
}

/**
 * Local reaction of each cell: writes f_i(u_i) into `f` and ∂f_i/∂u_i into `df`.
 * (Cells do not couple through the reaction.)
 */
export type CellReaction = (u: Float64Array, f: Float64Array, df: Float64Array) => void;

export interface SteadyOptions {
  /** Stop when max |R_i| ≤ tolerance [density/yr]. */
  tolerance?: number;
  maxIterations?: number;
}

export interface SteadyResult {
  converged: boolean;
  /** Steady state (last iterate when not converged). */
  u: Float64Array;
  iterations: number;
  /** max |R_i| at the returned state. */
  residual: number;
  message: string;
}

/** out = M u for a tridiagonal M. */
export function applyTridiagonal(m: Tridiagonal, u: Float64Array, out: Float64Array): Float64Array {
  const n = u.length;
  if (n === 1) {
    out[0] = m.diag[0] * u[0];
    return out;
  }
  out[0] = m.diag[0] * u[0] + m.upper[0] * u[1];
  for (let i = 1; i < n - 1; i++) out[i] = m.lower[i] * u[i - 1] + m.diag[i] * u[i] + m.upper[i] * u[i + 1];
  out[n - 1] = m.lower[n - 1] * u[n - 2] + m.diag[n - 1] * u[n - 1];
  return out;
}

function maxAbs(x: Float64Array): number {
  let m = 0;
  for (let i = 0; i < x.length; i++) {
    const a = Math.abs(x[i]);
    if (a > m || Number.isNaN(a)) m = a;
  }
  return m;
}

/**
 * Newton's method with backtracking on `R(u) = L u + f(u) = 0`, keeping u ≥ 0.
 *
 * @remarks
 * Each iteration solves the tridiagonal system `(L + diag(f'(u))) δ = −R(u)` (Thomas algorithm, O(n))
 * and halves the step until max|R| decreases. Densities are clipped at 0 (the model is a density).
 * Quadratic convergence near a regular solution; at a fold (singular Jacobian) it slows, and the
 * caller treats non-convergence as "no steady state found".
 */
export function solveSteadyState(
  op: Tridiagonal,
  reaction: CellReaction,
  start: Float64Array,
  { tolerance = 1e-10, maxIterations = 60 }: SteadyOptions = {},
): SteadyResult {
  const n = start.length;
  const u = Float64Array.from(start);
  const trial = new Float64Array(n);
  const r = new Float64Array(n);
  const rTrial = new Float64Array(n);
  const f = new Float64Array(n);
  const df = new Float64Array(n);
  const lo = new Float64Array(n);
  const di = new Float64Array(n);
  const up = new Float64Array(n);
  const delta = new Float64Array(n);
  const solver = makeTridiagonalSolver(n);
  const residual = (x: Float64Array, out: Float64Array): number => {
    applyTridiagonal(op, x, out);
    reaction(x, f, df);
    for (let i = 0; i < n; i++) out[i] += f[i];
    return maxAbs(out);
  };
  let norm = residual(u, r);
  for (let it = 0; it < maxIterations; it++) {
    if (norm <= tolerance) return { converged: true, u, iterations: it, residual: norm, message: `converged in ${it} Newton iterations` };
    if (!Number.isFinite(norm)) break;
    reaction(u, f, df);
    for (let i = 0; i < n; i++) {
      lo[i] = op.lower[i];
      di[i] = op.diag[i] + df[i];
      up[i] = op.upper[i];
      delta[i] = -r[i];
    }
    solver.factor(lo, di, up);
    solver.solve(delta, delta);
    let step = 1;
    let accepted = false;
    for (let k = 0; k < 30; k++) {
      for (let i = 0; i < n; i++) {
        const x = u[i] + step * delta[i];
        trial[i] = x > 0 ? x : 0;
      }
      const tn = residual(trial, rTrial);
      if (tn < norm || (tn <= tolerance)) {
        u.set(trial);
        r.set(rTrial);
        norm = tn;
        accepted = true;
        break;
      }
      step *= 0.5;
    }
    if (!accepted) {
      return { converged: false, u, iterations: it + 1, residual: norm, message: 'line search failed (no descent direction: near a fold or no steady state nearby)' };
    }
  }
  return { converged: norm <= tolerance, u, iterations: maxIterations, residual: norm, message: norm <= tolerance ? 'converged' : `no convergence in ${maxIterations} iterations (residual ${norm.toExponential(2)})` };
}

/**
 * Symmetric tridiagonal matrix similar to `M` (diagonal similarity), valid when `lower[i+1]·upper[i] ≥ 0`
 * for all i (true for diffusion plus a diagonal: off-diagonals are ≥ 0).
 * Returns the diagonal and the off-diagonal `e[i] = √(M[i][i+1]·M[i+1][i])` (length n − 1).
 */
export function symmetrise(m: Tridiagonal): { diag: Float64Array; off: Float64Array } {
  const n = m.diag.length;
  const off = new Float64Array(Math.max(0, n - 1));
  for (let i = 0; i < n - 1; i++) {
    const p = m.upper[i] * m.lower[i + 1];
    if (p < 0) throw new RangeError(`symmetrise: off-diagonal product at ${i} is negative (${p})`);
    off[i] = Math.sqrt(p);
  }
  return { diag: Float64Array.from(m.diag), off };
}

/**
 * Number of eigenvalues of the symmetric tridiagonal matrix (diag, off) that are less than sigma
 * (Sturm count: negative pivots of the LDLᵀ factorisation of T − σI).
 */
export function sturmCountBelow(diag: Float64Array, off: Float64Array, sigma: number): number {
  const n = diag.length;
  let count = 0;
  let d = diag[0] - sigma;
  // A zero pivot is nudged by a tiny amount (the count is then that of a σ perturbed by round-off).
  const tiny = 1e-300;
  if (d === 0) d = -tiny;
  if (d < 0) count++;
  for (let i = 1; i < n; i++) {
    d = diag[i] - sigma - (off[i - 1] * off[i - 1]) / d;
    if (d === 0) d = -tiny;
    if (d < 0) count++;
  }
  return count;
}

/** Gershgorin interval containing every eigenvalue of the symmetric tridiagonal (diag, off). */
export function gershgorin(diag: Float64Array, off: Float64Array): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  const n = diag.length;
  for (let i = 0; i < n; i++) {
    const r = (i > 0 ? Math.abs(off[i - 1]) : 0) + (i < n - 1 ? Math.abs(off[i]) : 0);
    lo = Math.min(lo, diag[i] - r);
    hi = Math.max(hi, diag[i] + r);
  }
  return [lo, hi];
}

/**
 * The largest eigenvalue of a symmetric tridiagonal matrix by bisection on Sturm counts, to a relative
 * accuracy `rtol` of the Gershgorin width (plus an absolute floor `atol`).
 */
export function largestEigenvalue(diag: Float64Array, off: Float64Array, { rtol = 1e-13, atol = 0 } = {}): number {
  const n = diag.length;
  let [lo, hi] = gershgorin(diag, off);
  const tol = Math.max(atol, rtol * Math.max(Math.abs(lo), Math.abs(hi), 1e-300));
  // Invariant: count(< hi) = n, count(< lo) < n.
  hi += tol;
  lo -= tol;
  for (let it = 0; it < 200 && hi - lo > tol; it++) {
    const mid = 0.5 * (lo + hi);
    if (sturmCountBelow(diag, off, mid) === n) hi = mid;
    else lo = mid;
  }
  return 0.5 * (lo + hi);
}

export interface StabilityReport {
  /** Eigenvalues of the Jacobian that are ≥ 0 (0 = linearly stable). */
  unstableModes: number;
  /** Largest eigenvalue of the Jacobian [1/yr] (negative = perturbations decay at this rate). */
  leadingEigenvalue: number;
  stable: boolean;
}

/**
 * Linear stability of a steady state u*: Sturm count of `J = L + diag(f'(u*))` after symmetrisation.
 * The Jacobian of diffusion in residence-index form is similar to a symmetric matrix, so its spectrum is real.
 */
export function linearStability(op: Tridiagonal, reaction: CellReaction, u: Float64Array): StabilityReport {
  const n = u.length;
  const f = new Float64Array(n);
  const df = new Float64Array(n);
  reaction(u, f, df);
  const diag = new Float64Array(n);
  for (let i = 0; i < n; i++) diag[i] = op.diag[i] + df[i];
  const sym = symmetrise({ lower: op.lower, diag, upper: op.upper });
  const unstableModes = n - sturmCountBelow(sym.diag, sym.off, 0);
  const leadingEigenvalue = largestEigenvalue(sym.diag, sym.off);
  return { unstableModes, leadingEigenvalue, stable: unstableModes === 0 };
}
