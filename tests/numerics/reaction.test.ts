/**
 * The local growth step (log-space Heun) against closed forms: exponential decay off host, logistic growth,
 * host depletion at constant density; the low-density linear path; cell ranges and substep counts.
 */
import { describe, expect, it } from 'vitest';
import { makeReactionStepper, type ReactionCoefficients } from '../../server/numerics/reaction.ts';
import { expectAllClose, observedOrders } from '../helpers/close.ts';

const coeffs = (over: Partial<ReactionCoefficients> & Pick<ReactionCoefficients, 'perCapita'>, n = 1): ReactionCoefficients => ({
  hostAtCells: new Uint8Array(n).fill(1),
  mortalityAtCells: new Float64Array(n),
  hostKillRate: 0,
  stiffness: 1,
  ...over,
});

describe('makeReactionStepper', () => {
  it('off host: u e^{−m dt} exactly, host fraction untouched', () => {
    const r = makeReactionStepper(coeffs({ perCapita: () => 99, hostAtCells: Uint8Array.of(0, 0), mortalityAtCells: Float64Array.of(4, 0.5) }, 2));
    const u = Float64Array.of(0.3, 0.3);
    const h = Float64Array.of(1, 1);
    r.step(u, h, 0.2);
    r.step(u, h, 0.2);
    expectAllClose(u, [0.3 * Math.exp(-4 * 0.4), 0.3 * Math.exp(-0.5 * 0.4)], { rtol: 1e-14 });
    expect(Array.from(h)).toEqual([1, 1]);
  });

  it('logistic growth converges at second order to u(t) = u0 e^{rt}/(1 − u0 + u0 e^{rt}) (Verhulst)', () => {
    const rate = 2;
    const u0 = 0.05;
    const tEnd = 2;
    const exact = (u0 * Math.exp(rate * tEnd)) / (1 - u0 + u0 * Math.exp(rate * tEnd));
    const errs = [0.2, 0.1, 0.05, 0.025].map((dt) => {
      // stiffness = 1/dt: one substep per call, so dt is the Heun step.
      const r = makeReactionStepper(coeffs({ perCapita: (u) => rate * (1 - u), stiffness: 1 / dt }));
      const u = Float64Array.of(u0);
      const h = Float64Array.of(1);
      for (let k = 0; k < Math.round(tEnd / dt); k++) r.step(u, h, dt);
      return Math.abs(u[0] - exact);
    });
    const orders = observedOrders(errs);
    console.log('log-space Heun, logistic: errors', errs.map((e) => e.toExponential(2)).join(' '), 'orders', orders.map((o) => o.toFixed(2)).join(' '));
    expect(orders[orders.length - 1]).toBeGreaterThan(1.9);
    expect(errs[errs.length - 1]).toBeLessThan(1e-3);
  });

  it('host loss at zero growth is exact: h = h0 e^{−c u t}', () => {
    const r = makeReactionStepper(coeffs({ perCapita: () => 0, hostKillRate: 0.7 }));
    const u = Float64Array.of(0.4);
    const h = Float64Array.of(0.9);
    for (let k = 0; k < 7; k++) r.step(u, h, 0.3);
    expect(u[0]).toBe(0.4);
    expectAllClose(h[0], 0.9 * Math.exp(-0.7 * 0.4 * 2.1), { rtol: 1e-13 });
  });

  it('the substep count is ceil(stiffness·dt) per call', () => {
    const r = makeReactionStepper(coeffs({ perCapita: (u) => 1 - u, stiffness: 7 }));
    const u = Float64Array.of(0.5);
    const h = Float64Array.of(1);
    r.step(u, h, 0.5); // ceil(3.5) = 4
    r.step(u, h, 0.1); // ceil(0.7) = 1
    expect(r.counters.substeps).toBe(5);
  });

  it('below the linear threshold: u e^{g(0,h) dt} and h(1 − c u dt); zero stays zero; only cells lo…hi move', () => {
    const r = makeReactionStepper(coeffs({ perCapita: (u, h) => 3 * h - u, hostKillRate: 2 }, 4));
    const u = Float64Array.of(1e-10, 0, 1e-10, 1e-10);
    const h = Float64Array.of(0.5, 1, 0.5, 0.5);
    r.step(u, h, 0.1, 0, 2);
    expectAllClose(u[0], 1e-10 * Math.exp(3 * 0.5 * 0.1), { rtol: 1e-14 });
    expectAllClose(h[0], 0.5 * (1 - 2 * 1e-10 * 0.1), { rtol: 1e-15 });
    expect(u[1]).toBe(0);
    expect(u[3]).toBe(1e-10); // outside the range
    expect(r.counters.linearUpdates).toBe(2);
  });
});
