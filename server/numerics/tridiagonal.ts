/**
 * Tridiagonal solves by the Thomas algorithm, allocation-free after the factory call.
 *
 * @remarks
 * Gaussian elimination without pivoting is stable for the nonsingular M-matrices that implicit
 * diffusion produces (positive diagonal, non-positive off-diagonals, weighted column dominance).
 */
export interface TridiagonalSolver {
  /**
   * Factorises the matrix with sub-diagonal `lower[i]` (row i, column i-1; lower[0] unused),
   * diagonal `diag[i]` and super-diagonal `upper[i]` (row i, column i+1; upper[n-1] unused).
   */
  factor(lower: Float64Array, diag: Float64Array, upper: Float64Array): void;
  /** Solves A x = rhs with the last factorisation; writes into `out` (may alias rhs) and returns it. */
  solve(rhs: Float64Array, out: Float64Array): Float64Array;
}

/** Makes a solver for systems of size n; all scratch is allocated here, once. */
export function makeTridiagonalSolver(n: number): TridiagonalSolver {
  const cPrime = new Float64Array(n); // modified super-diagonal
  const invPivot = new Float64Array(n); // 1 / modified diagonal
  const sub = new Float64Array(n); // copy of the sub-diagonal used in forward sweeps
  return {
    factor(lower, diag, upper) {
      let pivot = diag[0];
      invPivot[0] = 1 / pivot;
      cPrime[0] = n > 1 ? upper[0] * invPivot[0] : 0;
      for (let i = 1; i < n; i++) {
        sub[i] = lower[i];
        pivot = diag[i] - lower[i] * cPrime[i - 1];
        invPivot[i] = 1 / pivot;
        cPrime[i] = i < n - 1 ? upper[i] * invPivot[i] : 0;
      }
    },
    solve(rhs, out) {
      let prev = rhs[0] * invPivot[0];
      out[0] = prev;
      for (let i = 1; i < n; i++) {
        prev = (rhs[i] - sub[i] * prev) * invPivot[i];
        out[i] = prev;
      }
      for (let i = n - 2; i >= 0; i--) out[i] -= cPrime[i] * out[i + 1];
      return out;
    },
  };
}
