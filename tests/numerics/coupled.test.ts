import { describe, expect, it } from 'vitest';
import { makeGrid } from '../../server/numerics/grid.ts';
import { makeDiffusionOperator } from '../../server/numerics/diffusion.ts';
import { makeCoupledStepper } from '../../server/numerics/coupled.ts';
import { runTimeLoop } from '../../server/numerics/time-loop.ts';
import { expectAllClose, observedOrders } from '../helpers/close.ts';

function uniformSetup(n: number, D = 1) {
  const grid = makeGrid([0, 1], 1 / n, 1);
  const op = makeDiffusionOperator(grid, new Float64Array(n).fill(D), new Float64Array(n).fill(1 / D));
  return { grid, op };
}

describe('coupled step (TR-BDF2 with mid-step rates)', () => {
  it('logistic growth of a uniform population follows the closed form u = u0 e^{rt}/(1 − u0 + u0 e^{rt}) at second order (Verhulst 1838)', () => {
    const { op } = uniformSetup(4);
    const r = 1.5;
    const u0 = 0.02;
    const T = 4;
    const exact = (u0 * Math.exp(r * T)) / (1 - u0 + u0 * Math.exp(r * T));
    const errors = [0.1, 0.05, 0.025, 0.0125].map((dt) => {
      const stepper = makeCoupledStepper(op, { hostAtCells: new Uint8Array(4).fill(1), mortalityAtCells: new Float64Array(4), perCapita: (u, h) => r * (h - u), hostKillRate: 0, stiffness: 0 });
      const u = new Float64Array(4).fill(u0);
      runTimeLoop(stepper, u, new Float64Array(4).fill(1), { tEnd: T, dt });
      return Math.abs(u[0] - exact);
    });
    const orders = observedOrders(errors);
    console.log(`logistic ODE errors ${errors.map((e) => e.toExponential(2)).join(', ')}; orders ${orders.map((p) => p.toFixed(2)).join(', ')}`);
    // Pre-asymptotic at r dt = 0.15, then 2.
    expect(orders[0]).toBeGreaterThan(1.8);
    expect(orders[2]).toBeGreaterThan(1.9);
    // dt = 0.0125, second order: error ≈ 1e-6 (u ≈ 0.9).
    expect(errors[3]).toBeLessThan(1e-5);
  });

  it('host loss at constant density is exact: h = h0 e^{−c u t}', () => {
    const { op } = uniformSetup(3);
    const stepper = makeCoupledStepper(op, { hostAtCells: new Uint8Array(3).fill(1), mortalityAtCells: new Float64Array(3), perCapita: () => 0, hostKillRate: 0.7, stiffness: 0 });
    const u = new Float64Array(3).fill(0.4);
    const h = Float64Array.from([1, 0.5, 0.8]);
    runTimeLoop(stepper, u, h, { tEnd: 3, dt: 0.1 });
    expectAllClose(h, [1, 0.5, 0.8].map((h0) => h0 * Math.exp(-0.7 * 0.4 * 3)), { rtol: 1e-12 });
    expectAllClose(u, [0.4, 0.4, 0.4], { rtol: 1e-12 });
  });

  it('mortality alone decays as e^{−mt} to second order (L-stable TR-BDF2 on the linear part)', () => {
    const { op } = uniformSetup(2);
    const stepper = makeCoupledStepper(op, { hostAtCells: new Uint8Array(2), mortalityAtCells: new Float64Array(2).fill(2), perCapita: () => 0, hostKillRate: 0, stiffness: 0 });
    const u = new Float64Array(2).fill(1);
    runTimeLoop(stepper, u, new Float64Array(2), { tEnd: 1, dt: 0.01 });
    // TR-BDF2 local error constant ≈ 0.04 (m dt)³ per step: relative error ≈ 1e-5 here.
    expectAllClose(u, [Math.exp(-2), Math.exp(-2)], { rtol: 1e-4 });
  });

  it('stays non-negative from a box start with huge steps, stiff mortality and growth (fallback used, counted)', () => {
    const n = 200;
    const grid = makeGrid([0, 5, 6, 10], 0.05, 4);
    const host = Uint8Array.from(grid.segmentAtCells, (s) => (s === 1 ? 0 : 1));
    const D = Float64Array.from(grid.segmentAtCells, (s) => (s === 1 ? 20 : 1));
    const rho = Float64Array.from(grid.segmentAtCells, (s) => (s === 1 ? 0.01 : 1));
    const op = makeDiffusionOperator(grid, D, rho);
    const stepper = makeCoupledStepper(op, {
      hostAtCells: host,
      mortalityAtCells: new Float64Array(grid.nCells).fill(500),
      perCapita: (u, h) => 3 * (h - u) * (u - 0.2 * h),
      hostKillRate: 2,
      stiffness: 3 * 1.1 * (2 * 1.1 + 1.2) + 2.2,
    });
    const u = Float64Array.from(grid.centersKm, (x) => (x < 2 ? 1 : 0));
    const h = new Float64Array(grid.nCells).fill(1);
    let minSeen = 0;
    const res = runTimeLoop(stepper, u, h, {
      tEnd: 20,
      dt: 1,
      observers: [{ handle: (s) => void (minSeen = Math.min(minSeen, ...s.u, ...s.h)) }],
    });
    console.log('harsh run counters', JSON.stringify(res.info.diffusion), res.info.reaction.substeps);
    expect(n).toBe(200);
    expect(minSeen).toBeGreaterThanOrEqual(0);
    // dt × stiffness ≈ 13: each step is cut into substeps.
    expect(res.info.reaction.substeps).toBeGreaterThan(res.info.steps);
    expect(res.info.diffusion.trbdf2Steps + res.info.diffusion.fallbackSteps).toBe(res.info.reaction.substeps);
    for (const x of u) expect(Number.isFinite(x)).toBe(true);
  });

  it('a step that would go negative is redone by the positive first-order step (mass kept, counted)', () => {
    const { grid, op } = uniformSetup(50);
    const stepper = makeCoupledStepper(op, { hostAtCells: new Uint8Array(50).fill(1), mortalityAtCells: new Float64Array(50), perCapita: () => 0, hostKillRate: 0, stiffness: 0 });
    const u = new Float64Array(50);
    u[25] = 1; // a spike: D dt/dx² = 25, where the trapezoidal stage of TR-BDF2 overshoots below zero
    const res = runTimeLoop(stepper, u, new Float64Array(50).fill(1), { tEnd: 0.01, dt: 0.01 });
    expect(res.info.diffusion.fallbackSteps).toBe(1);
    expect(Math.min(...u)).toBeGreaterThan(0);
    expectAllClose(u.reduce((a, x, i) => a + x * grid.widthsKm[i], 0), 0.02, { rtol: 1e-13 });
  });

  it('growth too fast for the step (θ dt g ≥ 0.9) takes the positive explicit-growth path: u = (1 + dt g) u0', () => {
    const { op } = uniformSetup(5);
    const stepper = makeCoupledStepper(op, { hostAtCells: new Uint8Array(5).fill(1), mortalityAtCells: new Float64Array(5), perCapita: () => 10, hostKillRate: 0, stiffness: 0 });
    const u = new Float64Array(5).fill(0.01);
    const res = runTimeLoop(stepper, u, new Float64Array(5).fill(1), { tEnd: 1, dt: 1 });
    expect(res.info.diffusion.fallbackSteps).toBe(1);
    expectAllClose(u, new Array(5).fill(0.11), { rtol: 1e-12 });
  });
});
