import { describe, it } from 'vitest';
import { Matrix, solve } from 'ml-matrix';
import { makeTridiagonalSolver } from '../../server/numerics/tridiagonal.ts';
import { expectAllClose } from '../helpers/close.ts';

describe('tridiagonal solver', () => {
  it('matches a dense LU solve (ml-matrix) on a diagonally dominant system', () => {
    // Independent computation: ml-matrix's dense solver on the same matrix.
    const n = 50;
    const lower = new Float64Array(n);
    const diag = new Float64Array(n);
    const upper = new Float64Array(n);
    const rhs = new Float64Array(n);
    const dense = Matrix.zeros(n, n);
    for (let i = 0; i < n; i++) {
      lower[i] = i > 0 ? -0.3 - 0.01 * i : 0;
      upper[i] = i < n - 1 ? -0.5 + 0.005 * i : 0;
      diag[i] = 2 + Math.sin(i);
      rhs[i] = Math.cos(0.3 * i);
      dense.set(i, i, diag[i]);
      if (i > 0) dense.set(i, i - 1, lower[i]);
      if (i < n - 1) dense.set(i, i + 1, upper[i]);
    }
    const s = makeTridiagonalSolver(n);
    s.factor(lower, diag, upper);
    const out = s.solve(rhs, new Float64Array(n));
    const ref = solve(dense, Matrix.columnVector(Array.from(rhs))).getColumn(0);
    expectAllClose(out, ref, { rtol: 1e-12, atol: 1e-14 });
    // In place (out aliases rhs) gives the same answer.
    const again = Float64Array.from(rhs);
    s.solve(again, again);
    expectAllClose(again, ref, { rtol: 1e-12, atol: 1e-14 });
  });
});
