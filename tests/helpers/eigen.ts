/**
 * Principal eigenvalue of the engine's linearised operator, u' = L u + diag(rate) u, from the problem that
 * problem/discretise.ts builds. In v = u/ρ the operator is W⁻¹ S with W = diag(dx ρ) > 0 and S symmetric
 * tridiagonal (S_ii = −G_i − G_{i+1} + dx_i ρ_i rate_i, S_{i,i+1} = G_{i+1}), so by Sylvester's law of
 * inertia the number of eigenvalues above σ equals the number of positive pivots of S − σW (a Sturm count).
 * Bisection on σ gives the largest eigenvalue to round-off, in O(n) per count.
 */
import type { TransectProblem } from '../../server/problem/discretise.ts';
import { makeDiffusionOperator } from '../../server/numerics/diffusion.ts';

/** Per-cell linear growth rates: the low-density rate in host cells, −mortality elsewhere. */
export function linearRates(p: TransectProblem, hostRate: (stocking: number) => number): Float64Array {
  return Float64Array.from({ length: p.grid.nCells }, (_, i) => (p.hostAtCells[i] ? hostRate(p.stockingAtCells[i]) : -p.mortalityAtCells[i]));
}

/** Number of eigenvalues of the linearised operator greater than sigma. */
export function countAbove(p: TransectProblem, rates: Float64Array, sigma: number): number {
  const g = makeDiffusionOperator(p.grid, p.diffusionAtCells, p.residenceAtCells, p.ends).conductanceAtFaces;
  const n = p.grid.nCells;
  let count = 0;
  let pivot = 0;
  for (let i = 0; i < n; i++) {
    const w = p.grid.widthsKm[i] * p.residenceAtCells[i];
    const diag = -g[i] - g[i + 1] + w * (rates[i] - sigma);
    // Off-diagonal S_{i,i−1} = G_i; a zero pivot is nudged (it only decides a tie).
    pivot = i === 0 ? diag : diag - (g[i] * g[i]) / (pivot === 0 ? -1e-300 : pivot);
    if (pivot > 0) count++;
  }
  return count;
}

/** Largest eigenvalue by bisection on Sturm counts, within [lo, hi]. */
export function principalEigenvalue(p: TransectProblem, rates: Float64Array, lo = -1e3, hi = 1e3): number {
  for (let it = 0; it < 200 && hi - lo > 1e-13 * Math.max(1, Math.abs(hi)); it++) {
    const mid = 0.5 * (lo + hi);
    if (countAbove(p, rates, mid) > 0) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}
