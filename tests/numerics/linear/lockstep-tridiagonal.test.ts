import { describe, expect, it } from 'vitest';
import { makeLockstepTridiagonal } from '../../../server/numerics/linear/lockstep-tridiagonal.ts';
import { makeTridiagonalSolver } from '../../../server/numerics/tridiagonal.ts';
import { expectAllClose } from '../../helpers/close.ts';

/** Residual max |A x − b| of a tridiagonal system (an independent check of any solve). */
function residual(lo: Float64Array, di: Float64Array, up: Float64Array, x: Float64Array, b: Float64Array, m: number): number {
  let r = 0;
  for (let i = 0; i < m; i++) {
    let ax = di[i] * x[i];
    if (i > 0) ax += lo[i] * x[i - 1];
    if (i < m - 1) ax += up[i] * x[i + 1];
    r = Math.max(r, Math.abs(ax - b[i]));
  }
  return r;
}

/** I − tau L for a random conductance chain (an M-matrix, like the implicit diffusion matrices), plus a rate term. */
function system(m: number, tau: number, rate: number, seed: number) {
  let s = seed;
  const rnd = () => ((s = (s * 1103515245 + 12345) % 2147483648) / 2147483648);
  const lo = new Float64Array(m);
  const di = new Float64Array(m);
  const up = new Float64Array(m);
  const g = Float64Array.from({ length: m + 1 }, (_, f) => (f === 0 || f === m ? 0 : 0.1 + 10 * rnd()));
  for (let i = 0; i < m; i++) {
    lo[i] = i > 0 ? -tau * g[i] : 0;
    up[i] = i < m - 1 ? -tau * g[i + 1] : 0;
    di[i] = 1 + tau * (g[i] + g[i + 1]) - tau * rate;
  }
  const b = Float64Array.from({ length: m }, () => rnd() - 0.3);
  return { lo, di, up, b };
}

describe('lockstep (4-block SPIKE) tridiagonal solve', () => {
  for (const m of [128, 129, 130, 131, 1000, 4001]) {
    it(`matches the Thomas solve and has a round-off residual (m = ${m})`, () => {
      const { lo, di, up, b } = system(m, 50, 0.01, m);
      const lock = makeLockstepTridiagonal(m + 10);
      expect(lock.factor(lo, di, up, m)).toBe('lockstep');
      const x = lock.solve(b, new Float64Array(m + 10));
      const thomas = makeTridiagonalSolver(m);
      thomas.factor(lo, di, up);
      const xt = thomas.solve(b, new Float64Array(m));
      // Both are backward stable for M-matrices: agreement to a few hundred ulps of the solution size.
      expectAllClose(x.subarray(0, m), xt, { rtol: 1e-11, atol: 1e-11 });
      expect(residual(lo, di, up, x, b, m)).toBeLessThan(1e-11);
    });
  }

  it('solves in place (out aliases rhs) and reuses one factorisation for many right sides', () => {
    const m = 500;
    const { lo, di, up, b } = system(m, 10, 0, 7);
    const lock = makeLockstepTridiagonal(m);
    lock.factor(lo, di, up, m);
    for (let k = 0; k < 3; k++) {
      const rhs = b.map((v) => v * (k + 1));
      const x = lock.solve(rhs, rhs);
      expect(residual(lo, di, up, x, b.map((v) => v * (k + 1)), m)).toBeLessThan(1e-11);
    }
  });

  it('falls back to Thomas for small systems and for matrices that are not M-matrices', () => {
    const small = system(100, 5, 0, 3);
    const lock = makeLockstepTridiagonal(5000);
    expect(lock.factor(small.lo, small.di, small.up, 100)).toBe('thomas');
    // Strong growth (tau·rate ≫ 1) makes the diagonal negative in places: not an M-matrix.
    const indefinite = system(2000, 0.01, 300, 5);
    expect(lock.factor(indefinite.lo, indefinite.di, indefinite.up, 2000)).toBe('thomas');
    const x = lock.solve(indefinite.b, new Float64Array(2000));
    expect(residual(indefinite.lo, indefinite.di, indefinite.up, x, indefinite.b, 2000)).toBeLessThan(1e-8);
    // A positive off-diagonal (not a Z-matrix) also takes the Thomas path.
    const z = system(2000, 1, 0, 9);
    z.up[10] = 0.5;
    expect(lock.factor(z.lo, z.di, z.up, 2000)).toBe('thomas');
    expect(lock.counters.thomas).toBe(3);
  });
});
