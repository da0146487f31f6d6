/**
 * The finite-volume movement operator (residence-index form) assembled by hand on a 3-cell grid, and the
 * TR-BDF2 step against its published amplification factor on an exact discrete eigenvector.
 */
import { describe, expect, it } from 'vitest';
import { applyDiffusion, makeDiffusionOperator, makeDiffusionStepper } from '../../server/numerics/diffusion.ts';
import { makeGrid } from '../../server/numerics/grid.ts';
import { piecewiseGrid } from '../helpers/solve.ts';
import { expectAllClose, observedOrders } from '../helpers/close.ts';

describe('makeDiffusionOperator', () => {
  // Cells of 1, 1 and 2 km; D = 1 everywhere; ρ = 1, 2, 1 → A = Dρ = 1, 2, 1.
  const grid = piecewiseGrid([0, 1, 2, 4], [1, 1, 1]);
  const D = Float64Array.from([1, 1, 1]);
  const rho = Float64Array.from([1, 2, 1]);
  it('face conductances are series resistances (hand computation)', () => {
    const op = makeDiffusionOperator(grid, D, rho);
    // G_1 = 1/(1/(2·1) + 1/(2·2)) = 4/3;  G_2 = 1/(1/(2·2) + 2/(2·1)) = 4/5; reflecting ends 0.
    expectAllClose(op.conductanceAtFaces, [0, 4 / 3, 4 / 5, 0], { rtol: 1e-15 });
    // Row i of L: (G_{i-1/2} v_{i-1} − (G_{i-1/2}+G_{i+1/2}) v_i + G_{i+1/2} v_{i+1}) / dx_i, with v = u/ρ.
    expectAllClose(op.lower, [0, 4 / 3, 0.2], { rtol: 1e-15 }); // G_1/(dx_1 ρ_0), G_2/(dx_2 ρ_1) = 0.8/(2·2)
    expectAllClose(op.diag, [-4 / 3, -16 / 15, -0.4], { rtol: 1e-15 }); // −G_1/(1·1), −(4/3+4/5)/(1·2), −G_2/(2·1)
    expectAllClose(op.upper, [2 / 3, 0.8, 0], { rtol: 1e-15 }); // G_1/(dx_0 ρ_1), G_2/(dx_1 ρ_2)
  });
  it('absorbing ends use the half-cell conductance 2Dρ/dx', () => {
    const op = makeDiffusionOperator(grid, D, rho, { left: 'absorbing', right: 'absorbing' });
    expectAllClose([op.conductanceAtFaces[0], op.conductanceAtFaces[3]], [2, 1], { rtol: 1e-15 }); // 2·1/1, 2·1/2
    expectAllClose(op.diag[0], -(2 + 4 / 3), { rtol: 1e-15 });
  });
  it('u = ρ (v constant) is at rest, and Σ dx·Lu = 0 for any u (reflecting ends conserve mass)', () => {
    const op = makeDiffusionOperator(grid, D, rho);
    expectAllClose(applyDiffusion(op, rho, new Float64Array(3)), [0, 0, 0], { atol: 1e-15 });
    const u = Float64Array.from([0.3, 1.7, 0.2]);
    const Lu = applyDiffusion(op, u, new Float64Array(3));
    expect(Math.abs(Lu[0] * 1 + Lu[1] * 1 + Lu[2] * 2)).toBeLessThan(1e-15);
  });
  it('applyDiffusion equals a dense matrix–vector product (independent loop), also for one cell', () => {
    const g = makeGrid([0, 1, 1.5, 3], 0.1, 4);
    const n = g.nCells;
    const Dc = new Float64Array(n).map((_, i) => 0.5 + ((i * 7) % 5) / 4);
    const rc = new Float64Array(n).map((_, i) => 1 + ((i * 3) % 4) / 3);
    const op = makeDiffusionOperator(g, Dc, rc, { left: 'absorbing', right: 'reflecting' });
    const u = new Float64Array(n).map((_, i) => Math.sin(i) + 1.5);
    const dense = Array.from({ length: n }, (_, i) => {
      let s = op.diag[i] * u[i];
      if (i > 0) s += op.lower[i] * u[i - 1];
      if (i < n - 1) s += op.upper[i] * u[i + 1];
      return s;
    });
    expectAllClose(applyDiffusion(op, u, new Float64Array(n)), dense, { rtol: 1e-14, atol: 1e-14 });
    const one = makeDiffusionOperator(piecewiseGrid([0, 1], [1]), Float64Array.of(1), Float64Array.of(1), { left: 'absorbing', right: 'reflecting' });
    expectAllClose(applyDiffusion(one, Float64Array.of(3), new Float64Array(1)), -6, { rtol: 1e-15 }); // −2·3/1
  });
});

describe('makeDiffusionStepper (TR-BDF2)', () => {
  // Uniform grid on [0, L], reflecting ends: u_i = cos(kπ x_i/L) at cell centres is an exact eigenvector of the
  // cell-centred operator with λ = −(4D/dx²) sin²(kπ dx/(2L)) (discrete cosine transform, type II).
  const L = 2;
  const n = 40;
  const dx = L / n;
  const grid = makeGrid([0, L], dx, 4);
  const Dv = 0.8;
  const op = makeDiffusionOperator(grid, new Float64Array(n).fill(Dv), new Float64Array(n).fill(1));
  const mode = (k: number) => new Float64Array(n).map((_, i) => Math.cos((k * Math.PI * (i + 0.5) * dx) / L));
  const lambda = (k: number) => -((4 * Dv) / (dx * dx)) * Math.sin((k * Math.PI * dx) / (2 * L)) ** 2;
  // TR-BDF2 amplification (Bank et al. 1985, IEEE Trans. Electron Devices 32:1992; Hosea & Shampine 1996,
  // Appl. Numer. Math. 20:21): R(z) = [(1 + γz/2)/(1 − γz/2) / (γ(2−γ)) − (1−γ)²/(γ(2−γ))] / (1 − z(1−γ)/(2−γ)), γ = 2 − √2.
  const g = 2 - Math.SQRT2;
  const R = (z: number) => (((1 + (g * z) / 2) / (1 - (g * z) / 2)) / (g * (2 - g)) - (1 - g) ** 2 / (g * (2 - g))) / (1 - (z * (1 - g)) / (2 - g));

  // The stepper falls back to backward Euler on any negative value, so the modes ride on a constant
  // (λ = 0, R = 1): u = 1 + ½ cos(kπx/L) stays positive and the cosine part is multiplied by R(λ dt).
  const positive = (k: number, a = 0.5) => mode(k).map((x) => 1 + a * x);

  it('one step multiplies an eigenvector by R(λ dt)', () => {
    for (const [k, dt] of [[1, 0.01], [3, 0.05], [10, 0.2]] as const) {
      const u = positive(k);
      const st = makeDiffusionStepper(op);
      st.step(u, dt);
      expect(st.counters).toMatchObject({ trbdf2Steps: 1, fallbackSteps: 0, factorisations: 2 });
      const factor = R(lambda(k) * dt);
      expectAllClose(u, mode(k).map((x) => 1 + 0.5 * factor * x), { rtol: 1e-12, atol: 1e-13 });
    }
  });

  it('second order in time: error against e^{λt} falls 4× per halving (observed order printed)', () => {
    const k = 2;
    const tEnd = 0.5;
    const dts = [0.1, 0.05, 0.025, 0.0125];
    const errs = dts.map((dt) => {
      const u = positive(k);
      const st = makeDiffusionStepper(op);
      for (let s = 0; s < Math.round(tEnd / dt); s++) st.step(u, dt);
      expect(st.counters.fallbackSteps).toBe(0);
      return Math.abs((u[0] - 1) / (0.5 * mode(k)[0]) - Math.exp(lambda(k) * tEnd));
    });
    const orders = observedOrders(errs);
    console.log('TR-BDF2 on a discrete eigenvector: errors', errs.map((e) => e.toExponential(2)).join(' '), 'orders', orders.map((o) => o.toFixed(2)).join(' '));
    expect(orders[orders.length - 1]).toBeGreaterThan(1.9);
  });

  it('a step that would go negative is redone by backward Euler (independent dense solve), mass kept', () => {
    // A one-cell spike at dt = 0.1 makes TR-BDF2 ring below zero (found by trying dt from 1e-4 to 2).
    const u0 = new Float64Array(n);
    u0[5] = 1 / dx;
    const u = u0.slice();
    const st = makeDiffusionStepper(op);
    st.step(u, 0.1);
    expect(st.counters).toMatchObject({ trbdf2Steps: 0, fallbackSteps: 1 });
    // (I − dt L) x = u0 by Gaussian elimination on the dense matrix.
    const A = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 - 0.1 * op.diag[i] : j === i - 1 ? -0.1 * op.lower[i] : j === i + 1 ? -0.1 * op.upper[i] : 0)));
    const b = Array.from(u0);
    for (let c = 0; c < n; c++) {
      for (let r = c + 1; r < n; r++) {
        const f = A[r][c] / A[c][c];
        for (let j = c; j < n; j++) A[r][j] -= f * A[c][j];
        b[r] -= f * b[c];
      }
    }
    const x = new Array<number>(n);
    for (let r = n - 1; r >= 0; r--) {
      let s2 = b[r];
      for (let j = r + 1; j < n; j++) s2 -= A[r][j] * x[j];
      x[r] = s2 / A[r][r];
    }
    expectAllClose(u, x, { rtol: 1e-12, atol: 1e-14 });
    expect(Math.min(...u)).toBeGreaterThanOrEqual(0);
    expectAllClose(u.reduce((a, c) => a + c, 0) * dx, 1, { rtol: 1e-12 });
  });

  it('TR-BDF2 steps conserve Σ dx·u with reflecting ends; factorisations only when dt changes', () => {
    const u = positive(4, 0.9);
    const mass = u.reduce((a, c) => a + c, 0) * dx;
    const st = makeDiffusionStepper(op);
    for (const dt of [0.01, 0.01, 0.02, 0.02, 0.02]) st.step(u, dt);
    expectAllClose(u.reduce((a, c) => a + c, 0) * dx, mass, { rtol: 1e-13 });
    expect(st.counters).toEqual({ trbdf2Steps: 5, fallbackSteps: 0, factorisations: 4 });
  });
});
