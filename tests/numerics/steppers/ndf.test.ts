/**
 * The NDF stepper on small problems with exact solutions: observed order of each fixed-order formula,
 * error control (the error follows the tolerance), positivity, counters, dense output.
 */
import { describe, expect, it } from 'vitest';
import { makeNdfStepper } from '../../../server/numerics/steppers/ndf.ts';
import type { StiffSystem } from '../../../server/numerics/steppers/stiff-system.ts';
import { observedOrders, orderTable } from '../../helpers/close.ts';

/**
 * Uniform-state test system (no space): u' = r u (1 − u), h' = −c u h with u(0) = u0, h(0) = 1.
 * Exact: u = u0 e^{rt}/(1 − u0 + u0 e^{rt}) (logistic), ∫₀ᵗ u = ln(1 − u0 + u0 e^{rt})/r, h = e^{−c ∫u}.
 * Jacobian [[r(1 − 2u), 0], [−c h, −c u]]; the 2 × 2 solve is done exactly here.
 */
function logisticHost(r: number, c: number): StiffSystem & { exact(t: number, u0: number): Float64Array } {
  let J = [0, 0, 0, 0];
  let inv = [0, 0, 0, 0];
  return {
    size: 2,
    rhs(_t, y, out) {
      out[0] = r * y[0] * (1 - y[0]);
      out[1] = -c * y[0] * y[1];
    },
    jacobian(_t, y) {
      J = [r * (1 - 2 * y[0]), 0, -c * y[1], -c * y[0]];
    },
    factor(k) {
      const a = 1 - k * J[0];
      const b = -k * J[1];
      const cc = -k * J[2];
      const d = 1 - k * J[3];
      const det = a * d - b * cc;
      inv = [d / det, -b / det, -cc / det, a / det];
      return Number.isFinite(det) && det !== 0;
    },
    solve(b) {
      const x0 = inv[0] * b[0] + inv[1] * b[1];
      const x1 = inv[2] * b[0] + inv[3] * b[1];
      b[0] = x0;
      b[1] = x1;
    },
    exact(t, u0) {
      const e = Math.exp(r * t);
      const q = 1 - u0 + u0 * e;
      return Float64Array.from([(u0 * e) / q, Math.exp((-c * Math.log(q)) / r)]);
    },
  };
}

describe('NDF formulas: observed order in time', () => {
  // Order k of the NDF of order k (Shampine & Reichelt 1997, §2; κ chosen so the order is kept).
  // Started from the exact history so that no start-up error pollutes the higher orders.
  const sys = logisticHost(1, 0.5);
  const u0 = 0.05;
  const T = 4;
  for (const k of [1, 2, 3, 4, 5]) {
    it(`order ${k}: observed order → ${k} on the finest pairs`, () => {
      const hs = k >= 4 ? [0.1, 0.05, 0.025, 0.0125] : [0.05, 0.025, 0.0125, 0.00625];
      const errs = hs.map((h) => {
        const history = Array.from({ length: k + 1 }, (_, j) => sys.exact(-j * h, u0));
        const st = makeNdfStepper(sys, 0, history[0], { rtol: 1e-3, atol: 1e-6, fixed: { step: h, order: k, history } });
        while (st.t < T - 1e-12) st.step(T);
        const ex = sys.exact(T, u0);
        return Math.max(Math.abs(st.y[0] - ex[0]), Math.abs(st.y[1] - ex[1]));
      });
      orderTable(`NDF order ${k}`, hs, errs);
      const orders = observedOrders(errs);
      // Asymptotic order on the finest pair within ±0.25 (pre-asymptotic coarse pairs are not asserted).
      expect(Math.abs(orders[orders.length - 1] - k)).toBeLessThan(0.25);
    });
  }
});

describe('NDF adaptive control', () => {
  const sys = logisticHost(1, 0.5);
  it('the error follows the tolerance (about proportionally) and the counters add up', () => {
    const rows: { rtol: number; err: number; steps: number }[] = [];
    for (const rtol of [1e-3, 1e-5, 1e-7, 1e-9]) {
      const st = makeNdfStepper(sys, 0, Float64Array.from([0.05, 1]), { rtol, atol: rtol * 1e-3 });
      while (st.t < 10) expect(st.step(10)).toBe(true);
      const ex = sys.exact(10, 0.05);
      const err = Math.max(Math.abs(st.y[0] - ex[0]), Math.abs(st.y[1] - ex[1]));
      rows.push({ rtol, err, steps: st.counters.accepted });
      expect(st.t).toBe(10);
      const c = st.counters;
      expect(c.solves).toBe(c.rhsEvaluations - 3); // two right sides choose the first step, one starts the table
      expect(c.factorisations).toBeGreaterThan(0);
      expect(c.jacobianEvaluations).toBeGreaterThanOrEqual(1);
    }
    console.log('NDF tolerance → error:', rows.map((r) => `rtol ${r.rtol.toExponential(0)}: err ${r.err.toExponential(2)}, ${r.steps} steps`).join('; '));
    for (let i = 0; i + 1 < rows.length; i++) {
      expect(rows[i + 1].err).toBeLessThan(rows[i].err);
      expect(rows[i + 1].steps).toBeGreaterThan(rows[i].steps);
    }
    // Error within a factor 30 of the tolerance (global error of a local-error controller; measured 0.2–5×).
    for (const r of rows) expect(r.err).toBeLessThan(30 * r.rtol);
    // Variable order pays: at 1e-9 far fewer steps than the tolerance^(−1/2) a second-order method needs.
    expect(rows[3].steps).toBeLessThan(400);
  });

  it('dense output interpolates within the step to the tolerance', () => {
    const st = makeNdfStepper(sys, 0, Float64Array.from([0.05, 1]), { rtol: 1e-8, atol: 1e-11 });
    const out = new Float64Array(2);
    let worst = 0;
    while (st.t < 8) {
      st.step(8);
      for (const f of [0.25, 0.5, 0.75]) {
        const tq = st.tOld + f * (st.t - st.tOld);
        st.interpolate(tq, out);
        const ex = sys.exact(tq, 0.05);
        worst = Math.max(worst, Math.abs(out[0] - ex[0]), Math.abs(out[1] - ex[1]));
      }
      st.interpolate(st.t, out);
      expect(out[0]).toBeCloseTo(st.y[0], 14);
      // One component at a time (event location): the same polynomial, bit for bit.
      const tq = st.tOld + 0.3 * (st.t - st.tOld);
      st.interpolate(tq, out);
      expect([st.interpolateAt(tq, 0), st.interpolateAt(tq, 1)]).toEqual([out[0], out[1]]);
    }
    console.log(`NDF dense output: worst interpolation error ${worst.toExponential(2)} at rtol 1e-8`);
    expect(worst).toBeLessThan(1e-6);
  });

  it('rejects input it cannot use', () => {
    expect(() => makeNdfStepper(sys, 0, Float64Array.from([0.1, 1]), { rtol: 0, atol: 1e-6 })).toThrow(/rtol/);
    expect(() => makeNdfStepper(sys, 0, Float64Array.from([0.1, 1]), { rtol: 1e-3, atol: 1e-6, maxOrder: 6 })).toThrow(/maxOrder/);
  });
});
