import { describe, expect, it } from 'vitest';
import { expectAllClose } from '../helpers/close.ts';
import { largestEigenvalue, linearStability, solveSteadyState, sturmCountBelow, symmetrise } from '../../server/numerics/steady.ts';
import { makeGrid } from '../../server/numerics/grid.ts';
import { makeDiffusionOperator } from '../../server/numerics/diffusion.ts';

describe('Sturm count and largest eigenvalue (symmetric tridiagonal)', () => {
  // Second-difference matrix with Dirichlet ends: eigenvalues −(4/h²) sin²(kπ/(2(n+1))), k = 1..n
  // (closed form, e.g. LeVeque 2007, Finite Difference Methods for ODEs and PDEs, §2.10).
  const n = 50;
  const h = 1 / (n + 1);
  const diag = new Float64Array(n).fill(-2 / (h * h));
  const off = new Float64Array(n - 1).fill(1 / (h * h));
  const exact = Array.from({ length: n }, (_, k) => -(4 / (h * h)) * Math.sin(((k + 1) * Math.PI) / (2 * (n + 1))) ** 2);

  it('counts eigenvalues below any shift', () => {
    for (const sigma of [-1e5, -3000, -100, -9.8, 0, 10]) {
      expect(sturmCountBelow(diag, off, sigma)).toBe(exact.filter((l) => l < sigma).length);
    }
  });

  it('finds the largest eigenvalue by bisection', () => {
    // Bisection to 1e-13 of the Gershgorin width (~1e4): absolute error ~1e-9.
    expectAllClose(largestEigenvalue(diag, off), Math.max(...exact), { rtol: 1e-9 });
  });

  it('symmetrises a non-symmetric tridiagonal with a diagonal similarity (same spectrum)', () => {
    // M = D⁻¹ S D for S symmetric, D diagonal: symmetrise(M) must give back S's off-diagonals.
    const d = Array.from({ length: n }, (_, i) => 1 + 0.3 * Math.sin(i));
    const lower = new Float64Array(n);
    const upper = new Float64Array(n);
    for (let i = 0; i < n - 1; i++) {
      upper[i] = (off[i] * d[i + 1]) / d[i];
      lower[i + 1] = (off[i] * d[i]) / d[i + 1];
    }
    const sym = symmetrise({ lower, diag, upper });
    expectAllClose(sym.off, off, { rtol: 1e-14 });
  });
});

describe('Newton steady state of the unsplit finite-volume system', () => {
  it('solves a linear problem exactly: u″ = −1 with u = 0 at both ends (parabola, exact in FV at cell centres)', () => {
    // FV with absorbing ends puts u = 0 half a cell outside the first and last centres: the discrete
    // solution equals x(1−x)/2 at centres up to the O(dx²) end-condition error.
    const grid = makeGrid([0, 1], 1 / 200, 4);
    const ones = new Float64Array(grid.nCells).fill(1);
    const op = makeDiffusionOperator(grid, ones, ones, { left: 'absorbing', right: 'absorbing' });
    const r = solveSteadyState(op, (u, f, df) => {
      f.fill(1);
      df.fill(0);
    }, new Float64Array(grid.nCells), { tolerance: 1e-9 });
    expect(r.converged).toBe(true);
    expect(r.iterations).toBeLessThanOrEqual(2);
    const exact = Array.from(grid.centersKm, (x) => (x * (1 - x)) / 2);
    expectAllClose(r.u, exact, { atol: 2e-5 });
  });

  it('finds the logistic steady state on a patch above the critical size, and it is stable', () => {
    // Patch [0, L] with u = 0 outside (absorbing) and u' = u'' + u(1 − u): a positive steady state exists
    // iff L > π (Skellam 1951; Kierstead & Slobodkin 1953). Below π only u = 0, which is then stable.
    const solveOn = (L: number) => {
      const grid = makeGrid([0, L], L / 400, 4);
      const ones = new Float64Array(grid.nCells).fill(1);
      const op = makeDiffusionOperator(grid, ones, ones, { left: 'absorbing', right: 'absorbing' });
      const reaction = (u: Float64Array, f: Float64Array, df: Float64Array) => {
        for (let i = 0; i < u.length; i++) {
          f[i] = u[i] * (1 - u[i]);
          df[i] = 1 - 2 * u[i];
        }
      };
      const start = Float64Array.from(grid.centersKm, (x) => Math.sin((Math.PI * x) / L));
      const r = solveSteadyState(op, reaction, start);
      return { r, st: linearStability(op, reaction, r.u) };
    };
    const big = solveOn(6);
    expect(big.r.converged).toBe(true);
    expect(Math.max(...big.r.u)).toBeGreaterThan(0.5);
    expect(big.st.stable).toBe(true);
    const small = solveOn(3);
    expect(small.r.converged).toBe(true);
    expect(Math.max(...small.r.u)).toBeLessThan(1e-8);
    // At u = 0 the leading eigenvalue is 1 − (π/L)²: negative below the critical size.
    // FV with 400 cells: eigenvalue error O(dx²) ≈ 1e-4.
    expectAllClose(small.st.leadingEigenvalue, 1 - (Math.PI / 3) ** 2, { atol: 2e-4 });
    expect(small.st.stable).toBe(true);
  });
});
